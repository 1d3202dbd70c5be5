"""Messages of checking a tree on separate patients, nested cross-validation and stability."""

ENTRIES = [
    ("check.no_heldout", "refused", "No patients were set aside before growing; set a "
     "held-out share (for example 0.25) and run the derivation again.",
     "Set a held-out share, or check the tree on another file."),
    ("check.no_outcome", "refused", "The file has no column {name!r} ({label}), the outcome "
     "the tree predicts; add it or rename the outcome column.",
     "Name the outcome column as in the derivation data."),
    ("check.columns_absent", "refused", "The file lacks column(s) the tree asks about: "
     "{columns}; add them, named as in the derivation data.",
     "Every column the tree asks about must be in the file."),
    ("check.columns_near", "refused", "The file lacks column(s) the tree asks about: "
     "{columns}; the file's {near} looks meant for it, so rename that column to the tree's "
     "name (or add the column).", "Every column the tree asks about must be in the file, "
     "named as in the derivation data."),
    ("check.no_outcome_near", "refused", "The file has no column {name!r} ({label}), the "
     "outcome the tree predicts; it has {near!r}, which looks meant for it: rename that "
     "column to {name!r}.", "Name the outcome column as in the derivation data."),
    ("check.no_outcome_rows", "refused", "No row of the file has a recorded {label} that the "
     "tree can be checked against; check the outcome column.",
     "Check the outcome column and its spellings."),
    ("check.other_tree", "refused", "This check was made on another tree than the one given; "
     "check the tree again before recording the result.", "Run the check again on this tree."),
    ("check.unknown_classes", "warning", "{n} row(s) have an outcome that is not one of the "
     "tree's classes ({classes}), e.g. {examples}; they were left out.",
     "Check the outcome's spellings in the new file."),
    ("check.rows_without_outcome", "note", "{n} of {total} row(s) without a usable outcome "
     "were left out.", "Nothing to do, unless the outcome should be known for them."),
    ("check.unseen_levels", "warning", "{parts} were not seen among the derivation "
     "patients and were routed as not recorded ({total} cell(s)).",
     "Check the spelling of these levels in the new file; a category the tree never saw "
     "follows the branch for values not recorded."),
    ("check.overlap", "warning", "{patients} patient(s) of this file ({rows} row(s)) were "
     "among the derivation patients, so this is not a check on separate patients.",
     "Leave the overlapping rows out (prunella check --leave-out-overlap, or the app's "
     "choice) to check on separate patients."),
    ("check.overlap_left_out", "note", "{patients} patient(s) of this file ({rows} row(s)) "
     "were among the derivation patients; their rows were left out, so the check is on "
     "separate patients.", "Nothing to do."),
    ("check.overlap_elsewhere", "warning", "Overlap with the derivation patients can only "
     "be checked on the computer the tree was grown on (it keeps the key of the identifier "
     "digests), so whether this file shares patients with them is not known.",
     "Check the file on the computer the tree was grown on to know whether its patients are "
     "separate; the rest of the check stands."),
    ("check.overlap_old_digests", "warning", "This model file was written by an earlier "
     "Prunella, whose digests of the derivation patients' identifiers are not safe to use, so "
     "whether this file shares patients with them is not known.",
     "Grow the tree again with this version to check overlap; the rest of the check stands."),
    ("check.overlap_not_known", "note", "Whether these patients include derivation patients "
     "is not known: overlap can only be checked on the computer the tree was grown on.",
     "Check the file on the computer the tree was grown on."),
    ("check.key_file_unsafe", "refused", "The identifier key file {path} is {what}, not a "
     "private regular file; make it a regular file readable only by you (chmod 600 {path}) "
     "or restore it from your backup.",
     "The key file keeps patient identifiers unrecoverable from model files; keep it private."),
    ("check.key_file_damaged", "refused", "The identifier key file {path} does not hold a key "
     "of {n} bytes; restore it from your backup, or remove it to start a new key (trees grown "
     "with the old key can then no longer be checked for overlap).",
     "Restore the key file from your backup."),
    ("check.key_made", "note", "A new identifier key was made for this computer in {path}; "
     "back it up with your projects: tree files keep patient numbers only as digests made "
     "with it, and without it no later check can tell which patients a file shares with "
     "these. The key itself never goes into any output.",
     "Copy the key file to where your projects are backed up, and restore it there if "
     "this computer is replaced."),
    ("check.key_file_unwritable", "refused", "The identifier key file {path} could not be "
     "written ({reason}); make its folder writable, or name another path in "
     "PRUNELLA_IDENTIFIER_KEY_FILE.", "The key file must be on this computer and private."),
    ("check.needs_value", "warning", "{n} row(s) were left out of the check because a value "
     "the tree asks for was not recorded where no derivation patient lacked it ({parts}).",
     "Measure these values; the tree has no evidence for where such a patient belongs."),
    ("check.scored_needs_value", "warning", "{n} row(s) got no outcome box because a value the tree "
     "asks for was not recorded where no derivation patient lacked it ({parts}); the column "
     "prunella_missing names it.",
     "Measure these values and score the rows again."),
    ("check.columns_found", "note", "{n} of the model's columns were found.", "Nothing to do."),
    ("check.column_renamed", "note", "Column {found!r} was taken as {wanted!r} (the names "
     "differ only in capitals or spaces).", "Nothing to do."),
    ("check.not_asked_missing", "note", "Not in the file, but not asked by the tree (no "
     "effect): {columns}.", "Nothing to do."),
    ("check.columns_unused", "note", "{n} column(s) of the file are not used by the model: "
     "{columns}.", "Nothing to do."),
    ("nested.outer_folds", "refused", "Nested cross-validation needs at least 2 outer folds.",
     "Use 2 or more outer folds (5 is usual)."),
    ("stability.resamples", "refused", "The number of bootstrap resamples must be at least 1 "
     "(200 is usual).", "Give a positive number of resamples."),
]
