"""Messages of the data dictionary: what was suggested from the cells, and a saved dictionary
read or refused."""

ENTRIES = [
    ("infer.all_missing", "note", "{column!r} has no recorded values; it is left out.",
     "Nothing to do, unless the column should hold values: then check the export."),
    ("infer.constant", "note", "{column!r} has the same value in every row; it is left out.",
     "A column that never changes cannot help a tree."),
    ("infer.identifier", "note", "{column!r} is different in (almost) every row, like an "
     "identifier; it is left out of the predictors.",
     "If it is really a measurement, set its kind in the data dictionary."),
    ("infer.record_numbers", "note", "{column!r} is different in every row, like a record "
     "number; it is left out of the predictors.",
     "If it is really a measurement, set its kind to numeric in the data dictionary."),
    ("infer.patient_id", "note", "{column!r} looks like a patient identifier with repeat "
     "visits; cross-validation will keep each patient's visits together.",
     "Nothing to do; it is used only to group each patient's rows."),
    ("infer.identity", "warning", "{column!r} seems to identify patients ({reason}); it is "
     "left out of the predictors so that no chart can print it. Name it as a predictor "
     "yourself only if it does not identify anyone.",
     "Keep identifying columns out of the analysis file when you can."),
    ("infer.long_texts", "note", "{column!r} holds texts of up to {length} characters, "
     "too long for a chart question (at most {limit}); it is left out as free text.",
     "Code the texts into a few short categories in a new column to use them."),
    ("infer.too_many_levels", "note", "{column!r} has {n} different texts, too many for a "
     "chart question (at most {limit}); it is left out (group the texts into fewer categories "
     "to use it).", "Group the texts into a few categories in a new column."),
    ("infer.mixed_categories", "warning", "{column!r} mixes numbers and words{rows}; it is "
     "treated as categories. If it should be a number, correct the words or mark them as "
     "missing codes.", "Correct the words, or list them as missing-value codes."),
    ("infer.numbers_and_words", "warning", "{column!r} holds numbers and a few words "
     "({words}) in {n} cell(s){rows}; the words were treated as not recorded. If they carry "
     "information, record it in a separate column.",
     "Check the words: if they mean 'not done' this is right; if they are results, recode "
     "them."),
    ("infer.yes_no_spellings", "note", "{column!r} writes yes and no in several ways "
     "({spellings}); they were read as 'yes' and 'no'.", "Nothing to do."),
    ("infer.date_formats", "warning", "{column!r} holds dates in several formats (e.g. "
     "{examples}); where day and month could be swapped the day was read first (03/01/2024 is "
     "3 January). Check a few dates in the preview.",
     "Write dates one way, preferably yyyy-mm-dd."),
    ("infer.serial_dates", "warning", "{column!r} holds numbers such as {example}{rows} that "
     "are dates as a spreadsheet stores them ({example} is {date}); they were read as dates, "
     "from {first} to {last}, and the column is left out of the predictors.",
     "If they are not dates, set the column's kind to numeric in the data dictionary; when "
     "exporting, format date cells as dates (yyyy-mm-dd) so they stay readable."),
    ("infer.unit_disagrees", "warning", "{column!r}: the header says {header}, but the cells "
     "write {found}; Prunella does not convert units, so the column is read as text and left "
     "out. Correct the header or the values to use it.",
     "Make the header's unit and the cells' unit the same."),
    ("infer.capitals", "note", "{column!r} spells some categories with different capitals; "
     "they were merged.", "Nothing to do."),
    ("infer.one_answer_twice", "warning", "{column!r} has the categories {levels}, which may "
     "{all} mean the same answer; the tree treats them as different ones.",
     "If they mean the same, write them one way in a copy of the file and open that."),
    ("infer.sentinel", "warning", "{column!r}: the value {code}, found in {n} cell(s){rows}, "
     "looks like a code for 'not recorded' but is read as a value until you confirm it; to "
     "read it as not recorded, add it to the column's codes for 'not recorded' in the data "
     "dictionary.",
     "If it means 'not recorded', confirm it (the app's button beside this note, or the "
     "column's missing_codes in the data dictionary)."),
    ("infer.probable_missing", "warning", "{column!r} holds {found}{rows}, which may mean "
     "'not recorded'; they are read as answers of their own until you confirm them as not "
     "recorded in the column's codes for 'not recorded' in the data dictionary.",
     "If they mean 'not recorded', confirm them (the app's button beside this note, or the "
     "column's missing_codes in the data dictionary); if they are answers, nothing to do."),
    ("infer.confirmed_missing", "note", "{column!r}: {codes} now read as not recorded, as "
     "you confirmed.", "To undo it, remove them from the column's codes for 'not recorded'."),
    ("dictionary.entry_not_object", "refused", "A column of the data dictionary is written "
     "as {found}, not as an object with a 'name'; save the dictionary again from Prunella.",
     "Fix the dictionary file or save it again."),
    ("dictionary.bad_field", "refused", "The data dictionary's entry for {column!r}: '{key}' "
     "must be {expected}; correct it or save the dictionary again from Prunella.",
     "Fix that field of the dictionary."),
    ("dictionary.plausible_words", "refused", "Plausible values for {column} must be two "
     "numbers, the lowest first, such as '20 to 45'; {given!r} is not.",
     "Type the lowest and highest plausible value, or leave the cell empty for none."),
    ("dictionary.plausible_not_measurement", "refused", "{column} is not a measurement, so it "
     "has no plausible values; leave the cell empty, or make its kind a number first.",
     "Only measurements have plausible values."),
    ("dictionary.repeated_levels", "refused", "The data dictionary lists the level(s) "
     "{levels} of {column!r} more than once; keep each level once.",
     "Remove the repeated levels."),
    ("dictionary.columns_not_list", "refused", "{file}: 'columns' must be a list of column "
     "entries; save the dictionary again from Prunella.", "Fix the dictionary file."),
    ("dictionary.csv_unreadable", "refused", "{file} could not be read as a data dictionary "
     "(CSV, UTF-8); save it again as CSV UTF-8 or as JSON from Prunella.",
     "Save the dictionary again."),
    ("dictionary.absent_columns", "warning", "The data dictionary describes column(s) that "
     "are not in the data: {columns}; they were skipped.",
     "Check the column names: the dictionary must use the spreadsheet's headers exactly."),
    ("dictionary.used_whole", "note", "The data dictionary {file} was used; it describes "
     "every column.", "To guess every column from the data instead, press 'Guess again from "
     "the data' (on the command line: --dictionary none)."),
    ("dictionary.used", "note", "The data dictionary {file} was used; the columns it does "
     "not describe were guessed from the data: {guessed}.",
     "To guess every column from the data instead, press 'Guess again from the data' (on the "
     "command line: --dictionary none)."),
    ("variables.positive_not_level", "refused", "The positive class {positive!r} is not a "
     "level of {name!r} (levels: {levels}).", "Give one of the listed levels."),
    ("variables.no_column", "refused", "There is no column called {name!r}; the columns are: "
     "{columns}{more}.", "Use the column name exactly as in the header row."),
    ("variables.bad_role", "refused", "Column {name!r}: role {role!r} is not one of {roles}.",
     "Use one of the listed roles in the data dictionary."),
    ("variables.bad_kind", "refused", "Column {name!r}: kind {kind!r} is not one of {kinds}.",
     "Use one of the listed kinds in the data dictionary."),
    ("variables.no_name", "refused", "A column in the data dictionary has no 'name'; add one.",
     "Every entry of the dictionary needs the column's name."),
    ("variables.listed_twice", "refused", "The data dictionary lists {names} more than once; "
     "keep one entry per column.", "Delete the repeated entries."),
    ("variables.no_dictionary", "refused", "No data dictionary at {path}; check the path.",
     "Check the path."),
    ("variables.dictionary_csv_no_name", "refused", "{file} has no 'name' column; a "
     "dictionary CSV needs the columns name, role, kind, label, unit, missing_codes, levels.",
     "Add the header row the dictionary CSV needs."),
    ("variables.kind_not_in_tree", "refused", "Column {name!r} is of kind {kind!r}, which "
     "cannot be used in a tree; set its kind to numeric, binary, ordinal or nominal.",
     "Change its kind, or leave it out."),
]
