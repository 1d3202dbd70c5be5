"""Messages that other modules word themselves, listed for the README table and for
:func:`core.messages.explain`: (code, severity, template, advice, source module).

A test (tests/test_messages.py) checks that each module still says exactly this, so a changed
wording shows up here and in the README.
"""

from __future__ import annotations

# Messages worded in the module named last; a test checks each still reads as written here.
ELSEWHERE = [
    ("design.no_outcome_column", "refused", "There is no column called {name!r} to use as the "
     "outcome; choose one of: {columns}.", "Pick the outcome from the listed columns.",
     "core/design/analysis.py"),
    ("design.bad_task", "refused", "The task must be classification or regression, not "
     "{task!r}.", "Choose classification (categories) or regression (numbers).", "core/design/analysis.py"),
    ("design.no_predictors", "refused", "No predictors are chosen; choose at least one column "
     "to ask about.", "Choose predictors; columns that identify patients, dates and free text "
     "are left out by default.", "core/design/analysis.py"),
    ("design.no_predictor_column", "refused", "There is no column called {name!r} to use as a "
     "predictor; check the spelling (column names are case-sensitive).",
     "Use the column names exactly as in the header row.", "core/design/analysis.py"),
    ("design.outcome_as_predictor", "refused", "{name!r} is the outcome and cannot also be a "
     "predictor; take it out of the predictors.", "Remove it from the predictors.",
     "core/design/analysis.py"),
    ("design.no_role_column", "refused", "There is no column called {name!r} to use as the "
     "{role}; check the spelling.", "Use the column name exactly as in the header row.",
     "core/design/analysis.py"),
    ("design.predictor_kind", "refused", "{name!r} is marked as {kind}, which a tree cannot ask "
     "about; set its kind to numeric, binary, ordinal or nominal, or take it out of the "
     "predictors.", "Change its kind in the data dictionary, or leave it out.", "core/design/analysis.py"),
    ("design.predictor_never_recorded", "refused", "{name!r} is not recorded for any patient "
     "with an outcome; take it out of the predictors.", "Leave the column out.",
     "core/design/analysis.py"),
    ("design.rows_without_outcome", "note", "{n} row(s) without a recorded outcome were left "
     "out.", "Nothing to do, unless the outcome should be known for them.", "core/design/analysis.py"),
    ("design.categories_need_classification", "refused", "{name!r} holds categories, so it "
     "needs a classification tree; choose the task 'classification'.",
     "Choose classification.", "core/design/analysis.py"),
    ("design.outcome_not_recorded", "refused", "The outcome {name!r} is not recorded for any "
     "row; choose another outcome column.", "Check the outcome column in the spreadsheet.",
     "core/design/analysis.py"),
    ("design.outcome_constant", "refused", "The outcome {name!r} has the same value for every "
     "patient, so there is nothing to predict; choose another outcome.",
     "Choose an outcome that varies.", "core/design/analysis.py"),
    ("design.one_class", "refused", "The outcome {name!r} has only one class ({only!r}) among "
     "the rows, so there is nothing to predict; check the outcome column or choose another.",
     "Check the outcome's spellings, or whether the file holds only one group of patients.",
     "core/design/analysis.py"),
    ("design.positive_not_level", "refused", "The positive class {positive!r} is not a level "
     "of {name!r}; its levels are {levels}.", "Give one of the listed levels.",
     "core/design/analysis.py"),
    ("variables.positive_not_level", "refused", "The positive class {positive!r} is not a "
     "level of {name!r} (levels: {levels}).", "Give one of the listed levels.",
     "core/dictionary/typed_columns.py"),
    ("variables.no_column", "refused", "There is no column called {name!r}; the columns are: "
     "{columns}{more}.", "Use the column name exactly as in the header row.",
     "core/dictionary/columns.py"),
    ("variables.bad_role", "refused", "Column {name!r}: role {role!r} is not one of {roles}.",
     "Use one of the listed roles in the data dictionary.", "core/dictionary/columns.py"),
    ("variables.bad_kind", "refused", "Column {name!r}: kind {kind!r} is not one of {kinds}.",
     "Use one of the listed kinds in the data dictionary.", "core/dictionary/columns.py"),
    ("variables.no_name", "refused", "A column in the data dictionary has no 'name'; add one.",
     "Every entry of the dictionary needs the column's name.", "core/dictionary/columns.py"),
    ("variables.listed_twice", "refused", "The data dictionary lists {names} more than once; "
     "keep one entry per column.", "Delete the repeated entries.", "core/dictionary/columns.py"),
    ("variables.no_dictionary", "refused", "No data dictionary at {path}; check the path.",
     "Check the path.", "core/dictionary/columns.py"),
    ("variables.dictionary_csv_no_name", "refused", "{file} has no 'name' column; a dictionary "
     "CSV needs the columns name, role, kind, label, unit, missing_codes, levels.",
     "Add the header row the dictionary CSV needs.", "core/dictionary/columns.py"),
    ("variables.kind_not_in_tree", "refused", "Column {name!r} is of kind {kind!r}, which "
     "cannot be used in a tree; set its kind to numeric, binary, ordinal or nominal.",
     "Change its kind, or leave it out.", "core/dictionary/typed_columns.py"),
    ("derive.held_out", "note", "{n} of {total} rows were set aside before growing, to check "
     "the tree on patients it never saw.", "Nothing to do.", "core/sizing/derivation.py"),
    ("derive.class_left_out", "refused", "After setting patients aside, one outcome class has "
     "no patients left for growing; use a smaller held-out share.",
     "Use a smaller --holdout share.", "core/sizing/derivation.py"),
    ("resample.unknown_plan", "refused", "Unknown cross-validation plan {plan!r}; use one of "
     "{plans}.", "Choose one of the listed plans.", "core/sizing/folds.py"),
    ("resample.folds_at_least_2", "refused", "Cross-validation needs at least 2 folds.",
     "Use 2 or more folds (10 is usual).", "core/sizing/folds.py"),
    ("resample.too_few_units", "refused", "{k} folds need at least {k} {units}; there are {n}. "
     "Use fewer folds.", "Use fewer folds, or leave-one-out.", "core/sizing/folds.py"),
    ("resample.holdout_share", "refused", "The held-out share must be between 0 and 1 (for "
     "example 0.25).", "Give a share such as 0.25.", "core/sizing/folds.py"),
    ("resample.validation_share", "refused", "The validation share must be between 0 and 1 "
     "(for example 0.25).", "Give a share such as 0.25.", "core/sizing/folds.py"),
    ("resample.site_needs_column", "refused", "Leave-one-site-out needs a site column; choose "
     "which column names the site.", "Name the site column (--site COL).", "core/sizing/folds.py"),
    ("resample.site_needs_two", "refused", "Leave-one-site-out needs at least two sites; the "
     "site column has one.", "Use k-fold cross-validation instead.", "core/sizing/folds.py"),
    ("grow.min_leaf", "refused", "The minimum number of patients per leaf must be at least 1.",
     "Give a whole number of at least 1.", "core/sizing/grow.py"),
    ("grow.criterion_classification", "refused", "The split criterion for classification must "
     "be one of {choices}, not {given!r}.", "Use gini or entropy.", "core/sizing/grow.py"),
    ("grow.criterion_regression", "refused", "The split criterion for regression must be one "
     "of {choices}, not {given!r}.", "Use squared_error or friedman_mse.", "core/sizing/grow.py"),
    ("grow.risk", "refused", "The pruning risk must be 'cost' or 'impurity', not {given!r}.",
     "Use cost or impurity.", "core/sizing/grow.py"),
    ("grow.priors_count", "refused", "Give {n} non-negative class priors (one per class).",
     "One prior per class, in class order.", "core/sizing/grow.py"),
    ("grow.costs_table", "refused", "The misclassification costs must be a {n}×{n} table of "
     "non-negative numbers with zeros on the diagonal.", "Fix the table of costs.",
     "core/sizing/grow.py"),
    ("grow.priors_word", "refused", "Class priors must be 'observed', 'equal' or one number "
     "per class, not {given!r}.", "Use observed, equal or numbers.", "core/sizing/grow.py"),
    ("grow.miss_cost_two_classes", "refused", "A single 'missing a positive' cost only applies "
     "to two classes; give a full table of costs for more classes.",
     "Give a full table of costs.", "core/sizing/grow.py"),
    ("grow.miss_cost_positive", "refused", "The cost of missing a positive must be a positive "
     "number (1 means as bad as a needless alarm).", "Give a number above 0.", "core/sizing/grow.py"),
    ("pathcv.too_few_rows", "refused", "There are {n} rows with an outcome, too few for leaves "
     "of at least {min_leaf} patients; lower the minimum leaf size or add rows.",
     "Lower --min-leaf, or use more patients.", "core/sizing/cross_validated_path.py"),
    ("pathcv.size_at_least_one", "refused", "A tree needs at least one leaf; sizes on the "
     "pruning path are {sizes}.", "Pick one of the listed sizes.", "core/sizing/cross_validated_path.py"),
    ("pathcv.size_word", "refused", "The tree size must be '1se', 'min' or a number of leaves, "
     "not {size!r}.", "Use 1se, min or a number.", "core/sizing/cross_validated_path.py"),
    ("cli.priors", "refused", "--priors must be observed, equal, or numbers separated by "
     "commas (one per class).", "For example --priors 0.7,0.3.", "core/cli/fit.py"),
    ("cli.size", "refused", "--size must be 1se, min or a number of leaves.",
     "For example --size 1se or --size 4.", "core/cli/fit.py"),
    ("cli.report_needs_pdf", "refused", "--out must name a PDF file (ending in .pdf).",
     "Give an output name ending in .pdf.", "core/cli/checking.py"),
    ("cli.bootstrap", "refused", "--bootstrap must be 0 (none) or a positive number of "
     "resamples.", "200 is usual.", "core/cli/checking.py"),
    ("cli.report_data_differs", "warning", "The data file's SHA-256 ({found}...) differs from "
     "the one the model was fitted on ({expected}...): this report re-derives the tree from the "
     "data given, which is not the model's data.",
     "Give the report the data file the model was fitted on.", "core/cli/checking.py"),
    ("cli.report_no_settings", "refused", "The model file holds no derivation settings, so "
     "the derivation cannot be rerun for the report; fit the model again with Prunella.",
     "Fit the model again.", "core/cli/checking.py"),
    ("cli.report_tree_differs", "warning", "The tree re-derived from the data differs from the "
     "tree in the model file; the report describes the re-derived tree.",
     "Check that the data and the Prunella version are those the model was fitted with.",
     "core/cli/checking.py"),
    ("cli.chart_date", "refused", "--date must be a date written YYYY-MM-DD, not {given!r}.",
     "For example --date 2025-03-01.", "core/cli/chart.py"),
    ("cli.chart_bands", "refused", "--bands must be one or two numbers separated by a comma, "
     "e.g. 10,30.", "For example --bands 10,30.", "core/cli/chart.py"),
    ("cli.chart_not_printed", "refused", "The model was saved to {model}, but no chart was "
     "printed. {reason}", "Choose the size the message names, or larger paper, and print the "
     "chart with 'prunella chart'.", "core/cli/chart.py"),
    ("chart.paper", "refused", "Paper {paper!r} is not one Prunella prints on; choose a4, "
     "letter, a3 or tabloid.", "Use one of the four papers.", "core/chart/options.py"),
    ("chart.orientation", "refused", "Orientation {given!r} is not one of {choices}.",
     "Use auto, portrait or landscape.", "core/chart/options.py"),
    ("chart.direction", "refused", "Direction {given!r} is not one of {choices}.",
     "Use one of the listed directions.", "core/chart/options.py"),
    ("chart.min_text", "refused", "The minimum text size must lie between 6 and 40 points, not "
     "{given}; {default} pt is the default on {paper}.", "Give a size in points, e.g. 9.",
     "core/chart/options.py"),
    ("chart.small_cell", "refused", "The small-group threshold must be 0 or more patients.",
     "Give 0 (never flag) or a number of patients, e.g. 10.", "core/chart/options.py"),
    ("chart.band_ratio", "refused", "The band ratio must be above 1 (e.g. 1.25: HIGHER at 1.25 "
     "times the cohort's rate or more).", "Give a ratio above 1.", "core/chart/options.py"),
    ("chart.band_cuts", "refused", "Give one or two increasing band cut-points, e.g. 10,30 "
     "(percent for rates, outcome units for means).", "For example --bands 10,30.",
     "core/chart/options.py"),
    ("chart.form", "refused", "Chart form {given!r} is not one of {choices}.",
     "Use tree (boxes and arrows) or rules (one row per outcome box).", ""),
    ("chart.rules_too_large", "refused", "Even as numbered rules, the tree's {leaves} outcome "
     "boxes do not fit on one {paper} page with text of at least {size} pt; choose a smaller "
     "tree or larger paper.", "Choose a smaller tree, or larger paper.", ""),
    ("chart.too_large", "refused", "The tree has {leaves} outcome boxes and does not fit on one "
     "{paper} page ({where}) with text of at least {size} pt. {advice}",
     "Choose the smaller size the message names, larger paper, or the numbered-rules form.",
     ""),
    ("validate.no_heldout", "refused", "No patients were set aside before growing; set a "
     "held-out share (for example 0.25) and run the derivation again.",
     "Set a held-out share, or check the tree on another file.", "core/checking/new_patients.py"),
    ("validate.no_outcome", "refused", "The file has no column {name!r} ({label}), the outcome "
     "the tree predicts; add it or rename the outcome column.",
     "Name the outcome column as in the derivation data.", "core/checking/new_patients.py"),
    ("validate.columns_absent", "refused", "The file lacks column(s) the tree asks about: "
     "{columns}; add them, named as in the derivation data.",
     "Every column the tree asks about must be in the file.", "core/checking/new_patients.py"),
    ("validate.no_outcome_rows", "refused", "No row of the file has a recorded {label} that "
     "the tree can be checked against; check the outcome column.",
     "Check the outcome column and its spellings.", "core/checking/new_patients.py"),
    ("validate.other_tree", "refused", "This check was made on another tree than the one "
     "given; check the tree again before recording the result.",
     "Run the check again on this tree.", "core/checking/new_patients.py"),
    ("validate.unknown_classes", "warning", "{n} row(s) have an outcome that is not one of the "
     "tree's classes ({classes}), e.g. {examples}; they were left out.",
     "Check the outcome's spellings in the new file.", "core/checking/new_patients.py"),
    ("nested.outer_folds", "refused", "Nested cross-validation needs at least 2 outer folds.",
     "Use 2 or more outer folds (5 is usual).", "core/checking/nested.py"),
    ("stability.resamples", "refused", "The number of bootstrap resamples must be at least 1 "
     "(200 is usual).", "Give a positive number of resamples.", "core/checking/stability.py"),
    ("model.damaged_detail", "refused", "The model file is damaged ({kind}: {detail}); save the "
     "model again from Prunella.", "Use the model file as Prunella saved it.", "core/model/tree.py"),
    ("model.numbering", "refused", "The model file is damaged (boxes are not numbered 1, 2, 3, "
     "...); save the model again from Prunella.", "Use the model file as Prunella saved it.",
     "core/model/tree.py"),
    ("model.damaged_box", "refused", "The model file is damaged at box {box}; save the model "
     "again from Prunella.", "Use the model file as Prunella saved it.", "core/model/tree.py"),
    ("model.unknown_column", "refused", "The model file is damaged: box {box} asks about an "
     "unknown column; save the model again from Prunella.",
     "Use the model file as Prunella saved it.", "core/model/tree.py"),
    ("model.columns_absent", "refused", "The data lack column(s) the tree asks about: "
     "{columns}; add them (same names as in the derivation data) or rename them.",
     "Scoring needs every column the tree asks about, named as when it was grown.",
     "core/model/tree.py"),
]
