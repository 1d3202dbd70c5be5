"""Messages of the desktop app itself: opening a window, saving from a step, printing, and
what a step says about the user's own choices."""

ENTRIES = [
    ("app.no_display", "refused", "Prunella cannot open a window: no display is set (DISPLAY "
     "is empty); start it from a desktop session, or use the command line (prunella fit "
     "--help).", "Start Prunella from a desktop, or run its commands without a window."),
    ("app.missing_library", "refused", "Prunella cannot open a window: the system library "
     "{library} that Qt's display plugin needs is missing; on Debian or Ubuntu, install it "
     "with: sudo apt-get install {package} (or all of them at once: {packages}).",
     "Install the system libraries named in the README, then start Prunella again."),
    ("app.plugin_fails", "refused", "Prunella cannot open a window: Qt's display plugin does "
     "not load ({detail}); on Debian or Ubuntu, install its libraries with: sudo apt-get "
     "install {packages}", "Install the system libraries named in the README, then start "
     "Prunella again."),
    ("app.display_silent", "refused", "Prunella cannot open a window: the display {display} "
     "does not answer; start it from a desktop session, or set DISPLAY to a running one.",
     "Start Prunella from a desktop session, where the display is running."),
    ("app.unknown_platform", "refused", "Prunella cannot open a window: Qt has no display "
     "plugin called \u201c{name}\u201d (asked for by QT_QPA_PLATFORM or -platform); unset "
     "QT_QPA_PLATFORM, or name one Qt has: {available}.",
     "Unset QT_QPA_PLATFORM to let Qt choose (xcb on an X11 desktop, wayland under Wayland)."),
    ("app.no_demo", "refused", "The demo cohort is not installed with this copy of Prunella "
     "(it lives in sample_data/ of the source folder); open a spreadsheet instead.",
     "Install Prunella from its source folder (pip install -e .) to have the demo cohort."),
    ("app.cost_in_words", "note", "What this means for the tree chosen in step 3 ({boxes}): "
     "{words}", "The counts are pooled over the cross-validation folds, so they describe "
     "patients the tree did not learn from; they change when the cost or the size changes."),
    ("app.cost_in_words_old", "note", "For the earlier tree ({boxes}), grown before the "
     "choices above changed, {words} Run step 3 again to see what the new choices mean.",
     "Step 3 grows the tree for the present choices."),
    ("app.save_over_input", "refused", "That is one of your input files (the data or the "
     "project); choose another name so it stays unchanged.",
     "Prunella never writes over the files it reads; save under another name."),
    ("app.not_saved", "refused", "{file} could not be saved ({reason}); choose another "
     "folder.", "Choose a folder you may write to, with room on its disk."),
    ("app.checks_failed", "refused", "The checks could not be made: {problem}",
     "Read the problem named; the choices of step 2 may need changing."),
    ("app.printer_failed", "refused", "The printer could not be started; check it in the "
     "system settings.", "Check that the printer is on and set up, or export the PDF and "
     "print that."),
    ("app.measure_first", "warning", "{label} is needed: it is not recorded, and at box {box} "
     "no patient the tree was grown on lacked it, so the tree cannot say which way this "
     "patient goes; measure it first.", "Enter the measured value to see the outcome box."),
    ("app.lookup_not_a_number", "refused", "{label} needs a number, and \u201c{value}\u201d "
     "is not one; type it in digits{example}, or leave it blank if it was not measured.",
     "The lookup reads digits only (a decimal point is fine); words and ranges are not "
     "numbers."),
    ("app.lookup_outside_cohort", "warning", "{label} {value} lies outside the values of the "
     "patients the tree was grown on ({low} to {high}), so the tree has not learnt about such "
     "a patient; check the value before relying on the answer.",
     "Check the value that was typed; a tree says nothing reliable beyond its patients."),
    ("app.lookup_impossible", "refused", "{label} {value} is impossible for {what} "
     "({low} to {high}), so the tree gives no outcome box for it; correct the value, or leave "
     "it blank if it was not measured.",
     "Correct the value: an impossible value gets no outcome box, so a slip of the keyboard "
     "never gets an answer."),
    ("app.lookup_implausible", "refused", "{label} {value} lies outside the plausible values "
     "the data dictionary gives for it ({low} to {high}), so the tree gives no outcome box for "
     "it; correct the value, or leave it blank if it was not measured.",
     "Correct the value, or widen the column's plausible values in the data dictionary if it "
     "can be right."),
    ("app.chart_not_drawn", "refused", "The chart could not be drawn.",
     "Look at the message on step 6, or choose a smaller tree or larger paper."),
    ("app.not_the_saved_tree", "warning", "The tree grown again differs from the one saved "
     "in the project (fingerprint {fingerprint}, saved {saved}). The data file or Prunella's "
     "version may have changed; check the data before relying on this tree.",
     "Compare the data file with the one the project was saved with."),
    ("app.chart_of_checked_tree", "note", "The chart is of the tree with fingerprint {tree} "
     "and prints its check on {source}, made on this same tree (fingerprint {tree}).",
     "One fingerprint names the tree on screen, on the chart and in its check."),
    ("app.chart_of_unchecked_tree", "note", "The chart is of the tree with fingerprint {tree}; "
     "no check on separate patients was made on this tree, so it says it is not yet checked.",
     "Check the tree on step 5 (held-out patients or another file) to print the check."),
    ("app.check_of_earlier_tree", "warning", "The check on {source} belongs to the earlier "
     "tree (fingerprint {earlier}); the chart is of this tree (fingerprint {tree}), which is "
     "not checked on that file yet.", "A check counts only for the tree it was made on; "
     "step 5 checks the file again for the tree chosen now."),
    ("app.identity_kept", "warning", "“{column}” is asked about because you ticked it, "
     "although it looks like {what}. The chart prints every question the tree asks: keep it "
     "only if it identifies no one.", "Untick it unless it identifies no one."),
    ("work.out_of_memory", "refused", "The computer ran out of memory; close other programs, "
     "or use fewer rows or predictors.", "Close other programs, or use a smaller file."),
    ("work.internal_error", "refused", "Something went wrong inside Prunella ({kind}: "
     "{detail}). Your work is still open; please report this.",
     "Save the project, and report what you did to the people who look after Prunella."),
]
