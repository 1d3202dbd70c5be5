"""Checking the records a model file keeps beside its tree (see core/model/file_checks.py).

The pruning path and the size chosen on it, the settings it was grown with (held to the one
table of limits, core/option_limits.py, so a file can never ask ``prunella report`` for ten
million repeats), the data it came from, the cohort, the costs, the guards' findings, the
patients' digests and the checks on new patients. Each is optional where older or hand-made
files leave it out, but when present it must be of the type and size Prunella writes, so that
no command fails on it later.
"""

from __future__ import annotations

import math

from ..checking.overlap import DIGEST_FORMAT
from ..document_checks import LONG_TEXT_LENGTH, TEXT_LENGTH, Field
from ..precision import MAX_DECIMALS
from ..sizing.request_checks import check_request_document

PATH_LISTS = ("alpha", "train_risk", "cv_risk", "cv_se", "grid_alpha", "cv_sensitivity",
              "cv_specificity", "cv_sensitivity_interval", "cv_specificity_interval")
CHOSEN_RULES = ("1se", "min", "goal", "user")
MAX_PATH = 1_000_000  # sizes of a pruning sequence: one per weakest link of the full tree
MAX_PATIENTS = 100_000_000  # derivation patients' digests (the file's own size limits them too)
MAX_FINDINGS = 1_000


def check_records(top: Field, classes: list, predictors: dict) -> None:
    """Refuse (InputError) the records of a model file that are of the wrong type, size or
    do not fit its tree; ``top`` is the whole document, its tree already checked."""
    leaves = sum(1 for node in top.value["nodes"] if not node.get("children"))
    _check_path(top["path"], len(top.value["nodes"]))
    _check_chosen(top["chosen"], leaves)
    top["prunella_version"].text()
    # Each record may be left out, never null: readers take a default only for an absent one.
    if top["settings"].object(optional=top["settings"].unsaid):
        check_request_document(top["settings"])
        _check_design_fits(top["settings"]["design"], top.value, predictors)
    _check_data(top["data"])
    _check_cohort(top["cohort"], classes)
    _check_costs(top["costs"], classes)
    asked = top["columns_asked"]
    if asked.texts(optional=asked.unsaid, unique=True):
        unknown = [c for c in asked.value if c not in predictors]
        if unknown:
            asked.fail(f"{unknown[0][:40]!r} is not among the predictors")
    _check_findings(top["findings"])
    _check_digests(top["derivation_ids"])
    coarsened = top["coarsened"]
    if coarsened.object(optional=coarsened.unsaid):
        coarsened["levels"].limited("coarsen")
        coarsened["columns"].texts()
    _check_validation(top["validation"])


def _check_path(path: Field, boxes: int) -> None:
    """The pruning sequence: its sizes, and a list of one number per size for each measure."""
    path.object(optional=False)
    sizes = path["leaves"]
    if sizes.list(most=MAX_PATH, least=1):
        for size in sizes.items():
            size.whole(optional=False, least=1)
        if any(a <= b for a, b in zip(sizes.value, sizes.value[1:])):
            sizes.fail("the sizes of the pruning sequence must fall from the largest to 1")
    length = len(sizes.value) if sizes.value else None
    for key in PATH_LISTS:
        values = path[key]
        if not values.list(length=length, most=MAX_PATH):
            continue
        length = len(values.value)
        if key.endswith("_interval"):
            for pair in values.items():
                if pair.value is not None:
                    pair.numbers(length=2, nulls=True)
        else:  # their ranges: core/model/value_checks.py
            values.numbers(nulls=key in ("cv_sensitivity", "cv_specificity", "grid_alpha"))
    for key in ("min_leaves", "one_se_leaves"):
        size = path[key]
        if size.whole(least=1) and sizes.value and size.value not in sizes.value:
            size.fail("it must be one of the sizes of the pruning sequence ('leaves')")
    path["folds"].whole(least=1, most=MAX_PATIENTS)
    path["risk_measure"].text(optional=path["risk_measure"].unsaid)
    path["cv"].text(optional=path["cv"].unsaid, longest=TEXT_LENGTH)
    path["collapse_alpha"].numbers(length=boxes, least=0, nulls=True)


def _check_chosen(chosen: Field, leaves: int) -> None:
    """The chosen size: its outcome boxes, errors and rule."""
    chosen.object(optional=False)
    size = chosen["leaves"]
    size.whole(optional=False, least=1)
    if size.value != leaves:
        size.fail(f"it must be the tree's number of outcome boxes ({leaves:,})")
    for key in ("cv_risk", "cv_se", "train_risk"):
        chosen[key].number(optional=False)
    chosen["one_box_cv_risk"].number(optional=chosen["one_box_cv_risk"].unsaid)
    chosen["rule"].text(choices=CHOSEN_RULES)
    chosen["better_than_no_tree"].truth()
    benefit = chosen["cv_net_benefit"]
    if benefit.list(most=1000):
        for point in benefit.items():
            point.object(optional=False)
            point["threshold"].number(optional=False, least=0, most=1)
            for key in ("tree", "treat_all", "treat_none"):
                point[key].number(optional=False)
    if chosen["goal"].object():
        chosen["goal"]["measure"].text(optional=False)
        chosen["goal"]["at_least"].limited("goal")
    chosen["miss_cost"].number()
    chosen["miss_cost_grid"].numbers(maximum=1000)
    chosen["grid_description"].text(longest=TEXT_LENGTH)
    for key in ("cv_sensitivity", "cv_specificity"):
        chosen[key].number()
        if chosen[f"{key}_interval"].value is not None:
            chosen[f"{key}_interval"].numbers(length=2, nulls=True)


def _check_design_fits(design: Field, document: dict, predictors: dict) -> None:
    """The settings name the tree's own outcome and predictors (``prunella report`` grows
    the tree again from them)."""
    outcome = document["outcome_spec"]["name"]
    if design.value["outcome"] != outcome:
        design["outcome"].fail(f"it must be the tree's outcome, {outcome[:40]!r}")
    if set(design.value["predictors"]) != set(predictors):
        design["predictors"].fail("it must list the tree's predictors ('predictors')")


def check_chosen_on_path(top: Field) -> None:
    """The chosen size is one of the stored pruning path's, with the path's errors at it
    (after every value was found possible, so an impossible one is named as such)."""
    chosen, path = top["chosen"], top.value["path"]
    size, sizes = chosen["leaves"], path.get("leaves")
    if not sizes:
        return
    if size.value not in sizes:
        size.fail("the chosen size is not on the stored pruning path ('path.leaves')")
    at = sizes.index(size.value)
    for key in ("cv_risk", "cv_se"):
        stored = (path.get(key) or [None] * len(sizes))[at]
        if stored is not None and not math.isclose(chosen.value[key], stored,
                                                    rel_tol=1e-9, abs_tol=1e-12):
            chosen[key].fail(f"it must be the pruning path's {key} at this size "
                             f"({stored:.6g})")


def _check_data(data: Field) -> None:
    if not data.object(optional=data.unsaid):
        return
    data["file"].text(optional=data["file"].unsaid, longest=4096, empty=True)
    data["sheet"].text()
    sha = data["sha256"]
    if sha.text(optional=sha.unsaid, empty=True) and sha.value and (
            len(sha.value) != 64 or not set(sha.value) <= set("0123456789abcdef")):
        sha.fail("it must be the 64 hexadecimal digits of a SHA-256")
    data["rows_in_file"].whole()


def _check_cohort(cohort: Field, classes: list) -> None:
    """Who the tree was derived from: counts of visits, patients, sites and outcomes."""
    if not cohort.object(optional=cohort.unsaid):
        return
    cohort["visits"].whole(optional=cohort["visits"].unsaid, least=None)
    cohort["patients"].whole(least=None)
    for key in ("sites", "outcome_counts"):
        counts = cohort[key]
        if counts.object(optional=counts.unsaid):
            if len(counts.value) > 100_000:
                counts.fail("it names far more than any file Prunella writes")
            for name, count in counts.entries():
                count.whole(optional=False, least=None)  # its sign: value_checks.py
    counts = cohort.value.get("outcome_counts")
    if counts and any(name not in classes for name in counts):
        cohort["outcome_counts"].fail("it must count the tree's classes")
    cohort["date_column"].text(optional=cohort["date_column"].unsaid)
    dates = [cohort[key] for key in ("first_date", "last_date")]
    for date in dates:
        date.text(longest=40)
    if (dates[0].value is None) != (dates[1].value is None):
        dates[1 if dates[1].value is None else 0].fail(
            "the first and the last date go together")
    cohort["outcome_mean"].number()
    span = cohort["outcome_range"]
    if span.numbers(length=2) and span.value[0] > span.value[1]:
        span.fail("it must be two numbers, the lower first")
    cohort["outcome_decimals"].whole(most=MAX_DECIMALS)


def _check_costs(costs: Field, classes: list) -> None:
    """The priors and the table of misclassification costs: one per class each way."""
    if not costs.object(optional=costs.unsaid):
        return
    k = len(classes)
    priors, loss = costs["priors"], costs["loss"]
    priors.numbers(optional=False, length=k)  # their ranges: value_checks.py
    loss.list(optional=False, length=k)
    for row in loss.items():
        row.numbers(optional=False, length=k)


def _check_findings(findings: Field) -> None:
    """The guards' findings: a list of {kind, column (or null), message}, of sane size."""
    if not findings.list(optional=findings.unsaid, most=MAX_FINDINGS):
        return
    for finding in findings.items():
        finding.object(optional=False)
        finding["kind"].text(optional=False, longest=100)
        finding["message"].text(optional=False, longest=LONG_TEXT_LENGTH)
        finding["column"].text(longest=LONG_TEXT_LENGTH)
        finding["severity"].text(longest=100)


def _check_digests(ids: Field) -> None:
    """Keyed digests of the derivation patients' identifiers with the key's name, or an
    earlier file's salted ones (never used for matching; core/checking/overlap.py)."""
    if not ids.object(optional=ids.unsaid):
        return
    ids["column"].text(optional=False)
    if "format" in ids.value:
        ids["format"].text(optional=False, choices=(DIGEST_FORMAT,))
        ids["key_id"].text(optional=False, longest=100)
    else:
        ids["salt"].text(optional=False, longest=100)
    digests = ids["digests"]
    digests.list(optional=False, most=MAX_PATIENTS)
    if not all(isinstance(d, str) and len(d) <= 128 for d in digests.value):
        digests.fail("it must be a list of short texts")


def _check_validation(check: Field) -> None:
    """A check on new patients (core/checking/new_patients.py): where from, how many and a
    summary; each measure a number, a list of numbers, a short text or a small record."""
    if not check.object(optional=check.unsaid):
        return
    check["n"].whole(optional=False, least=None)  # its sign: value_checks.py
    check["source"].text(optional=check["source"].unsaid, longest=LONG_TEXT_LENGTH,
                         empty=True)
    check["summary"].text(longest=LONG_TEXT_LENGTH, empty=True)
    check["patients"].whole(least=None)
    check["overlap_patients"].whole(optional=check["overlap_patients"].unsaid, least=None)
    check["separate"].truth()
    check["overlap_known"].truth()
    check["model_fingerprint"].text(longest=128)
    check["warnings"].texts(most=MAX_FINDINGS, longest=LONG_TEXT_LENGTH)
    check["calibration_outside"].list(most=MAX_FINDINGS)
    for key, value in check.entries():
        if isinstance(value.value, list):
            value.list(most=MAX_FINDINGS)
        elif isinstance(value.value, dict):
            if len(value.value) > 100:
                value.fail("it holds far more than any check Prunella writes")
        elif value.value is not None and not isinstance(value.value, (str, bool)):
            value.number()
