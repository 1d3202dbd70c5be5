"""Messages of growing, cross-validating and sizing the tree, and of setting patients aside."""

ENTRIES = [
    ("size.no_better_than_no_tree", "warning", "{statement} Its cross-validated error "
     "({error}) is not lower than one box's ({one_box}) by at least one SE ({se}).",
     "Treat this tree as no better than no tree: collect more or other predictors before "
     "relying on it."),
    ("grow.min_leaf", "refused", "The fewest patients an outcome box may hold must be at least 1.",
     "Give a whole number of at least 1."),
    ("grow.criterion_classification", "refused", "How the grower judges a question for a "
     "class outcome must be one of {choices}, not {given!r}.", "Use gini (the usual "
     "choice: how mixed the classes are) or entropy (the same idea measured as information)."),
    ("grow.criterion_regression", "refused", "How the grower judges a question for a "
     "measured outcome must be one of {choices}, not {given!r}.", "Use squared_error (the "
     "usual choice: the spread about each side's mean) or friedman_mse (the same, favouring "
     "even splits)."),
    ("grow.risk", "refused", "What pruning weighs must be 'cost' or 'impurity', not {given!r}.",
     "Use cost or impurity."),
    ("grow.priors_count", "refused", "Give {n} non-negative class priors (one per class).",
     "One prior per class, in class order."),
    ("grow.costs_table", "refused", "The misclassification costs must be a {n}×{n} table of "
     "non-negative numbers with zeros on the diagonal.", "Fix the table of costs."),
    ("grow.priors_word", "refused", "Class priors must be 'observed', 'equal' or one number "
     "per class, not {given!r}.", "Use observed, equal or numbers."),
    ("grow.miss_cost_two_classes", "refused", "A single 'missing a positive' cost only "
     "applies to two classes; give a full table of costs for more classes.",
     "Give a full table of costs."),
    ("grow.miss_cost_positive", "refused", "The cost of missing a positive must be a "
     "positive number (1 means as bad as a needless alarm).", "Give a number above 0."),
    ("folds.unknown_plan", "refused", "Unknown cross-validation plan {plan!r}; use one of "
     "{plans}.", "Choose one of the listed plans."),
    ("folds.folds_at_least_2", "refused", "Cross-validation needs at least 2 folds.",
     "Use 2 or more folds (10 is usual)."),
    ("folds.too_few_units", "refused", "{k} folds need at least {k} {units}; there are {n}. "
     "Use fewer folds.", "Use fewer folds, or leave-one-out."),
    ("folds.holdout_share", "refused", "The held-out share must be between 0 and 1 (for "
     "example 0.25).", "Give a share such as 0.25."),
    ("folds.validation_share", "refused", "The validation share must be between 0 and 1 (for "
     "example 0.25).", "Give a share such as 0.25."),
    ("folds.site_needs_column", "refused", "Leave-one-site-out needs a site column; choose "
     "which column names the site.", "Name the site column (--site COL)."),
    ("folds.site_needs_two", "refused", "Leave-one-site-out needs at least two sites; the "
     "site column has one.", "Use k-fold cross-validation instead."),
    ("size.too_few_rows", "refused", "There are {n} rows with an outcome, too few for "
     "outcome boxes of at least {min_leaf} patients; lower the fewest patients per box or add "
     "rows.", "Lower --min-leaf, or use more patients."),
    ("size.size_at_least_one", "refused", "A tree needs at least one outcome box; sizes on the "
     "pruning path are {sizes}.", "Pick one of the listed sizes."),
    ("size.not_on_path_smaller", "warning", "No tree on the pruning path has {wanted} "
     "outcome boxes; using the next smaller, {used}.",
     "Pruning removes whole branches, so not every size exists; choose one of the sizes on "
     "the pruning curve (prunella fit --curve lists them)."),
    ("size.not_on_path_largest", "warning", "No tree on the pruning path has {wanted} "
     "outcome boxes; using the largest, the full tree with {used}.",
     "The full tree is the largest size there is; choose one of the sizes on the pruning "
     "curve (prunella fit --curve lists them)."),
    ("size.size_word", "refused", "The tree size must be '1se', 'min' or a number of outcome boxes, "
     "not {size!r}.", "Use 1se, min or a number."),
    ("goal.measure", "refused", "A goal is a least sensitivity or a least specificity, not "
     "{given!r}.", "Use --min-sensitivity or --min-specificity."),
    ("goal.share", "refused", "A goal must be a share between 0 and 1 (for example 0.95 for "
     "95%), not {given!r}.", "Give a share such as 0.95."),
    ("goal.two_classes", "refused", "A sensitivity or specificity goal needs an outcome with "
     "two classes.", "Choose a two-class outcome, or size the tree by its error."),
    ("goal.with_cost", "refused", "A goal chooses the cost of missing a positive itself; give "
     "either a goal or costs, not both.", "Leave out --miss-cost (or the goal)."),
    ("goal.one_goal", "refused", "Give one goal: a least sensitivity or a least specificity, "
     "not both.", "Keep --min-sensitivity or --min-specificity."),
    ("goal.not_reached", "refused", "No tree reaches {goal}. The best reached is {measure} "
     "{best} ({leaves} outcome boxes, {other} {other_value}, {cost}).", "Lower the goal, or add predictors or patients."),
    ("goal.no_tree", "refused", "No tree that asks a question and calls some patients each "
     "way was found while searching for {goal}.", "Lower the fewest patients per outcome box, or add "
     "predictors or patients."),
    ("goal.in_words", "note", "Under cross-validation the tree catches about {caught} of "
     "every 100 {positive} and sends about {alarmed} of every 100 {negative} for the test.",
     "Nothing to do; choose a stricter goal to catch more."),
    ("goal.in_words_rule_in", "note", "Under cross-validation the tree keeps about {spared} "
     "of every 100 {negative} from the test (it sends about {alarmed} needlessly) and sends "
     "about {caught} of every 100 {positive} for it.", "Nothing to do; choose a stricter goal "
     "for fewer needless tests."),
    ("goal.in_words_cost", "note", "With {cost}, under cross-validation the tree catches "
     "about {caught} of every 100 {positive} (it misses about {missed}) and raises a needless "
     "alarm for about {alarmed} of every 100 {negative}.", "Nothing to do; raise the miss "
     "cost, or choose a goal, to catch more."),
    ("goal.costs_alike", "part", "missing a positive counted as bad as a needless alarm", ""),
    ("goal.reached", "note", "Built for cross-validated {measure} of at least {at_least}: "
     "sensitivity {sensitivity} ({sens_low} to {sens_high}), specificity {specificity} "
     "({spec_low} to {spec_high}), 95% Wilson intervals; {cost} ({grid}).", "Nothing to do."),
    ("goal.searched", "note", "Built for {goal}: searched {grid}; the chosen tree was "
     "grown with {cost}.", "Nothing to do."),
    ("coarsen.suggested", "note", "{count} rows: growing may take long; --coarsen 256 (in "
     "the app: Coarsen measurements on step 3) grows on each measurement's 256 quantile "
     "levels, usually several times faster with about the same cross-validated error.",
     "Try it, and compare the cross-validated errors."),
    ("coarsen.used", "note", "{columns} with more than {levels} different values {were} grown "
     "on as {levels} quantile levels (coarsened); the thresholds printed are still set "
     "between observed values.", "Nothing to do; leave coarsening off for the exact search."),
    ("coarsen.none_needed", "note", "Coarsening to {levels} levels changed nothing: no "
     "measurement has more than {levels} different values.", "Nothing to do."),
    ("holdout.set_aside", "note", "{n} of {total} rows were set aside before growing, to "
     "check the tree on patients it never saw.", "Nothing to do."),
    ("holdout.class_left_out", "refused", "After setting patients aside, one outcome class "
     "has no patients left for growing; use a smaller held-out share.",
     "Use a smaller --holdout share."),
]
