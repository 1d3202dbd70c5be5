"""Messages of printing the chart."""

ENTRIES = [
    ("chart.one_box", "refused", "{statement} The chosen tree has one outcome box, so there "
     "is no decision chart to print; choose a larger tree only if its cross-validated error "
     "is clearly lower.", "A tree with one box gives everyone the same answer; it is not "
     "printed as a chart. For a rare outcome, count a missed case as worse than a needless "
     "alarm, or build the tree for a minimum sensitivity."),
    ("chart.paper", "refused", "Paper {paper!r} is not one Prunella prints on; choose a4, "
     "letter, a3 or tabloid.", "Use one of the four papers."),
    ("chart.orientation", "refused", "Orientation {given!r} is not one of {choices}.",
     "Use auto, portrait or landscape."),
    ("chart.direction", "refused", "Direction {given!r} is not one of {choices}.",
     "Use one of the listed directions."),
    ("chart.min_text", "refused", "The minimum text size must lie between 6 and 40 points, "
     "not {given}; {default} pt is the default on {paper}.", "Give a size in points, e.g. 9."),
    ("chart.small_cell", "refused", "The small-group threshold must be 0 or more patients.",
     "Give 0 (never flag) or a number of patients, e.g. 10."),
    ("chart.band_ratio", "refused", "The band ratio must be above 1 (e.g. 1.25: HIGHER at "
     "1.25 times the cohort's rate or more).", "Give a ratio above 1."),
    ("chart.band_cuts", "refused", "Give one or two increasing band cut-points, e.g. 10,30 "
     "(percent for rates, outcome units for means).", "For example --bands 10,30."),
    ("chart.form", "refused", "Chart form {given!r} is not one of {choices}.",
     "Use tree (boxes and arrows) or rules (one row per outcome box)."),
    ("chart.rules_too_large", "refused", "Even as numbered rules, the tree's {leaves} outcome "
     "boxes do not fit on one {paper} page with text of at least {size} pt; choose a smaller "
     "tree or larger paper.", "Choose a smaller tree, or larger paper."),
    ("chart.too_large", "refused", "The tree has {leaves} outcome boxes and does not fit on "
     "one {paper} page ({where}) with text of at least {size} pt. {advice}",
     "Choose the smaller size the message names, larger paper, or the numbered-rules form."),
    ("chart.too_large.smaller_fits", "part", "The largest tree of its pruning sequence that "
     "fits has {fitting} outcome boxes: choose that size (--size {fitting}, or on the pruning "
     "curve)", ""),
    ("chart.too_large.not_recorded", "part", "The model file does not record its pruning "
     "sequence (an older Prunella saved it), so no smaller size can be named: fit it again to "
     "find one", ""),
    ("chart.too_large.nothing_fits", "part", "No smaller tree of its pruning sequence fits "
     "either: check the minimum text size", ""),
    ("chart.too_large.larger_paper", "part", ", or print on larger paper ({paper}).", ""),
    ("chart.too_large.larger_paper_or_rules", "part", ", print on larger paper ({paper}), or "
     "print the same tree as numbered rules (--form rules).", ""),
    ("chart.too_large.largest_paper", "part", " ({paper} is already among the largest papers "
     "Prunella prints on).", ""),
    ("chart.too_large.largest_paper_or_rules", "part", " ({paper} is already among the "
     "largest papers Prunella prints on), or print the same tree as numbered rules (--form "
     "rules).", ""),
]
