"""Messages of choosing the outcome and predictors, and of the guards that run before growing."""

ENTRIES = [
    ("design.entry_too_long", "refused", "The data dictionary's {field} for {column!r} is "
     "{length} characters long, longer than a model file may hold (at most {limit}); "
     "shorten it in the dictionary.", "Keep labels, units and levels short; put explanations "
     "in the column's note."),
    ("design.no_outcome_column", "refused", "There is no column called {name!r} to use as "
     "the outcome; choose one of: {columns}.", "Pick the outcome from the listed columns."),
    ("design.bad_task", "refused", "The task must be classification or regression, not "
     "{task!r}.", "Choose classification (categories) or regression (numbers)."),
    ("design.no_predictors", "refused", "No predictors are chosen; choose at least one "
     "column to ask about.",
     "Choose predictors; columns that identify patients, dates and free text are left out by "
     "default."),
    ("design.no_predictor_column", "refused", "There is no column called {name!r} to use as "
     "a predictor; check the spelling (column names are case-sensitive).",
     "Use the column names exactly as in the header row."),
    ("design.outcome_as_predictor", "refused", "{name!r} is the outcome and cannot also be a "
     "predictor; take it out of the predictors.", "Remove it from the predictors."),
    ("design.no_role_column", "refused", "There is no column called {name!r} to use as the "
     "{role}; check the spelling.", "Use the column name exactly as in the header row."),
    ("design.predictor_kind", "refused", "{name!r} is marked as {kind}, which a tree cannot "
     "ask about; set its kind to numeric, binary, ordinal or nominal, or take it out of the "
     "predictors.", "Change its kind in the data dictionary, or leave it out."),
    ("design.predictor_identifies", "refused", "{name!r} seems to identify patients "
     "({what}), and a chart must never print it; take it out of the predictors.",
     "Leave identifying columns out; if it does not identify anyone, say so by setting its "
     "use and kind in step 1's table or the data dictionary."),
    ("design.predictor_is_date", "refused", "{name!r} holds dates, and a question on them "
     "would split patients by when they came, not by anything about them; take it out of the "
     "predictors.", "If the period matters, add a column that names it (the year, or before "
     "and after a change) and ask about that."),
    ("design.predictor_never_recorded", "refused", "{name!r} is not recorded for any patient "
     "with an outcome; take it out of the predictors.", "Leave the column out."),
    ("design.rows_without_outcome", "note", "{n} row(s) without a recorded outcome were left "
     "out.", "Nothing to do, unless the outcome should be known for them."),
    ("design.categories_need_classification", "refused", "{name!r} holds categories, so it "
     "needs a classification tree; choose the task 'classification'.", "Choose classification."),
    ("design.outcome_not_recorded", "refused", "The outcome {name!r} is not recorded for any "
     "row; choose another outcome column.", "Check the outcome column in the spreadsheet."),
    ("design.outcome_constant", "refused", "The outcome {name!r} has the same value for "
     "every patient, so there is nothing to predict; choose another outcome.",
     "Choose an outcome that varies."),
    ("design.one_class", "refused", "The outcome {name!r} has only one class ({only!r}) "
     "among the rows, so there is nothing to predict; check the outcome column or choose "
     "another.",
     "Check the outcome's spellings, or whether the file holds only one group of patients."),
    ("design.positive_not_level", "refused", "The positive class {positive!r} is not a level "
     "of {name!r}; its levels are {levels}.", "Give one of the listed levels."),
    ("guard.identity", "warning", "{column!r} is left out of the predictors: {reason}, and a "
     "chart must never print who a patient is. Name it in the predictors yourself only if it "
     "does not identify anyone.", "Leave identifying columns out of the analysis file."),
    ("guard.date_as_question", "warning", "{column!r} would split patients by when they "
     "came, not by anything about them; leave it out unless the period matters (on the "
     "command line: --exclude {column}).",
     "A date or period on a wall chart sorts next week's patients by the calendar; ask about "
     "it only to compare periods on purpose."),
    ("guard.nothing_left", "refused", "Every chosen predictor identifies patients "
     "({columns}), so none is left to ask about; choose other predictors, or name these "
     "explicitly if they truly do not identify anyone.", "Choose clinical predictors."),
    ("guard.leakage", "warning", "Probable leakage: {column!r} on its own predicts "
     "{outcome!r} almost perfectly ({evidence}). Check when it is recorded: if it is known "
     "only after, or because of, the outcome, leave it out of the predictors (on the command "
     "line: --exclude {column}).",
     "A value recorded after the decision (a bed booked, a length of stay) cannot guide the "
     "decision. Leave it out unless it is truly known beforehand."),
    ("guard.repeats_grouped", "note", "{patients} patient(s) have more than one row "
     "({n_rows} rows, up to {most} for one patient) by {column!r}; cross-validation keeps "
     "each patient's rows in the same fold.", "Nothing to do."),
    ("guard.repeats_not_grouped", "warning", "{patients} patient(s) have more than one row "
     "({n_rows} rows, up to {most} for one patient) by {column!r}, but cross-validation does "
     "not keep them together, so its error will look better than it is; turn grouping by "
     "patient on.", "Turn on 'keep each patient's rows together'."),
    ("guard.repeats_no_id", "warning", "{column!r} repeats for {patients} patient(s) "
     "({n_rows} rows): these look like repeat visits. Set it as the patient identifier (on "
     "the command line: --patient-id {column}) so cross-validation keeps each patient's rows "
     "together.",
     "Without it, one patient can be in the training and the test part, and the error looks "
     "better than it is."),
    ("design.patient_id_identifying", "refused", "{column!r} holds names, addresses, phone "
     "numbers or e-mail addresses, which are not a safe patient number (different people share "
     "them); name a record-number column as the patient number instead (on the command line: "
     "--patient-id COLUMN).",
     "Add a patient or record number column to the data and use it to keep each patient's "
     "rows together."),
    ("guard.repeats_by_name", "warning", "{column!r} repeats for {patients} name(s) "
     "({n_rows} rows): some patients probably came more than once. A name is not a safe "
     "patient identifier (different people share names), so add a patient number column and "
     "set it as the patient identifier; cross-validation then keeps each patient's rows "
     "together.",
     "Without it, one patient can be in the training and the test part, and the error looks "
     "better than it is."),
    ("guard.stray_outcome_value", "warning", "Only {n} row(s) have {label!r} for {outcome!r}, "
     "beside {others}: a value this rare is most often a typing slip or a damaged cell, and "
     "it makes the outcome {classes} classes; correct those rows in the spreadsheet, or mark "
     "{label!r} as a missing code in the dictionary (step 1).",
     "Correct the rows, or list the value as a missing code, then grow the tree again."),
    ("guard.rare_class", "warning", "Only {n} patient(s) have {label!r} for {outcome!r} "
     "(fewer than {limit}): too few to grow and cross-validate a tree on; treat the result as "
     "exploratory, or collect more patients with {label!r}.",
     "Collect more patients, or choose a more common outcome."),
]
