"""Messages of opening Prunella's own files: models, dictionaries and projects."""

ENTRIES = [
    ("file.output_empty", "refused", "{option} is given an empty file name; give the name of "
     "the file to write.", "Name the file to write, e.g. model.json."),
    ("file.output_is_folder", "refused", "{option} {target} is a folder; give a file name "
     "inside it.", "Add a file name, e.g. {target}/model.json."),
    ("file.output_is_link", "refused", "{option} {target} is a symbolic link; give the file "
     "it points to, or another name.", "Prunella does not write through links, so it cannot "
     "write over a file it was not told about."),
    ("file.output_not_regular", "refused", "{option} {target} is not an ordinary file (a "
     "pipe or device); give another name.", "Write results to an ordinary file."),
    ("file.output_folder_closed", "refused", "{option} {target} cannot be written: the "
     "folder {folder} does not allow it; choose a folder you may write to.",
     "Choose a folder you may write to."),
    ("file.output_read_only", "refused", "{option} {target} is read-only; choose another name "
     "or make it writable.", "Prunella does not replace read-only files."),
    ("file.outputs_collide", "refused", "{first} and {second} both name {target}; give each "
     "output its own file.", "Give every output its own file name."),
    ("file.not_written", "refused", "{target} could not be written ({reason}); nothing was "
     "changed: choose another folder or free some space.",
     "Choose a folder you may write to, with room on its disk."),
    ("file.leftovers_removed", "note", "Removed {count} temporary {files} left in {folder} "
     "by an earlier save that was stopped before it finished ({names}); they held a copy of "
     "what was being saved.", "Nothing to do: the files saved before are as they were."),
    ("file.missing", "refused", "No {what} file at {path}; check the path.",
     "Check the spelling of the path."),
    ("file.too_big", "refused", "{file} is {mb} MB, far larger than any Prunella {what} "
     "file; choose the file Prunella saved.", "Choose the right file."),
    ("file.not_json", "refused", "{file} is not a Prunella {what} file (not valid JSON: "
     "{detail}); choose the file saved by Prunella, or save it again.",
     "The file was damaged or edited by hand; use a backup or save it again from Prunella."),
    ("file.not_object", "refused", "{file} is not a Prunella {what} file (it does not hold a "
     "JSON object); choose the file saved by Prunella.", "Choose the right file."),
    ("file.no_format", "refused", "{file} is not a Prunella {what} file (it has no "
     "'format'); choose the file saved by Prunella.", "Choose the right file."),
    ("file.bad_format", "refused", "{file} is not a Prunella {what} file (its format is "
     "{found!r}); choose the file saved by Prunella.", "Choose the right file."),
    ("file.wrong_kind", "refused", "{file} is a Prunella {found} file, not a {what} file; "
     "choose the {what} file.", "Models, dictionaries and projects are separate files."),
    ("file.newer_version", "refused", "{file} was saved by a newer Prunella (format version "
     "{version}), which this version cannot read (it reads {readable}); update Prunella to "
     "open it.",
     "Install the newer Prunella, or save the file again from it in the older format."),
    ("file.old_version", "refused", "{file} uses format version {version}, which this "
     "Prunella no longer reads (it reads {readable}); save it again with the Prunella that "
     "wrote it.", "Open it with the Prunella that made it and save it again."),
    ("file.folder", "refused", "{path} is a folder; choose the Prunella {what} file inside "
     "it.", "Choose the file itself, not the folder that holds it."),
    ("project.damaged", "refused", "The project file {file} is damaged at {where}: "
     "{problem}; save the project again from Prunella, or start a new one.",
     "Use the project file as Prunella saved it; do not edit it by hand (or open a backup)."),
    ("project.seed_mismatch", "refused", "The project file {file} is inconsistent: its seed "
     "({seed}) differs from the seed in its settings ({settings_seed}); save the project "
     "again from Prunella.",
     "The file was edited by hand; set the seed on step 3 and save again."),
    ("project.draft_damaged", "refused", "This project file (draft layout) is damaged "
     "({problem}); start a new project.", "Open the data and choose the settings again."),
    ("project.data_missing", "warning", "The project's data file {file} is not at {path} any "
     "more; find the file (it may have been moved or renamed) to continue.",
     "Point Prunella to the moved file; its fingerprint shows whether it is the same data."),
    ("project.no_fingerprint", "note", "The project does not record a fingerprint for {file}.",
     "Nothing to do; save the project again to record it."),
    ("project.data_changed", "warning", "{file} has changed since the project was saved (its "
     "fingerprint was {saved}, now {now}). The tree will be grown again on the file as it is "
     "now and may differ from the saved one; open the original file if you want to reproduce "
     "the saved tree.",
     "Open the original file to reproduce the saved tree, or accept that the tree is grown "
     "again on the new data (and check it again)."),
    ("project.data_same", "note", "{file} is unchanged since the project was saved.",
     "Nothing to do."),
    ("model.damaged", "refused", "The model file {file} is damaged at {where}: {problem}; "
     "save the model again from Prunella.",
     "Use the model file as Prunella saved it; do not edit it by hand."),
    ("model.damaged_detail", "refused", "The model file is damaged ({kind}: {detail}); save "
     "the model again from Prunella.", "Use the model file as Prunella saved it."),
    ("model.check_not_this_tree", "warning", "The check stored in the model file does not "
     "name this tree (it lacks the tree's fingerprint, or gives another), so the tree is shown "
     "as not yet checked; run the check again on this tree.",
     "Check the tree on separate patients again (prunella check ... --checked-model, or step "
     "5 of the app); a check counts only for the tree whose fingerprint it carries."),
    ("model.numbering", "refused", "The model file is damaged (boxes are not numbered 1, 2, "
     "3, ...); save the model again from Prunella.", "Use the model file as Prunella saved it."),
    ("model.damaged_box", "refused", "The model file is damaged at box {box}; save the model "
     "again from Prunella.", "Use the model file as Prunella saved it."),
    ("model.unknown_column", "refused", "The model file is damaged: box {box} asks about an "
     "unknown column; save the model again from Prunella.",
     "Use the model file as Prunella saved it."),
]
