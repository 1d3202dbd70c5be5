"""Numbers a model file cannot hold: values of the right type that no tree or check can have.

A file edited by hand, or written by another program, may give a negative standard deviation,
quartiles or an interval the wrong way round, a share of 1.3, a negative count or error, or
more patients than visits. Printed, they become an inverted interval or a rate of 130%, so
they are refused here, each naming its field by its path in the file (``nodes[3].sd``), after
core/model/file_checks.py has checked the types (a value of another type is left to it).
"""

from __future__ import annotations

import datetime as dt
from collections.abc import Callable

from ..errors import InputError
from ..safe_files import is_finite_number

Refusal = Callable[[str, str], InputError]  # (where, problem) → the error to raise
_SLACK = 1e-9  # floating-point rounding allowed at the ends of a range


def check_possible_values(data: dict, refuse: Refusal) -> None:
    """Refuse (``refuse(where, problem)``) a model document whose boxes, pruning path, chosen
    size, cohort, costs or recorded check hold a value no tree or check can have."""
    span = _get(data, "cohort", "outcome_range")
    _check_boxes(data.get("nodes"), span if _pair(span) else None, refuse)
    _check_path(data.get("path"), refuse)
    _check_chosen(data.get("chosen"), refuse)
    _check_one_box_on_path(data.get("chosen"), data.get("path"), refuse)
    _check_cohort(data.get("cohort"), refuse)
    _check_cohort_fits_tree(data, refuse)
    _check_costs(data.get("costs"), refuse)
    classes = data.get("classes")
    _check_validation(data.get("validation"), len(classes) if isinstance(classes, list) else 2,
                      refuse)


# --- the ranges a value may take --------------------------------------------------------------


def _number(value) -> bool:
    return is_finite_number(value)  # 10**400 is no usable number either


def _pair(value) -> bool:
    return isinstance(value, list) and len(value) == 2 and all(_number(v) for v in value)


def _get(data, *keys):
    for key in keys:
        data = data.get(key) if isinstance(data, dict) else None
    return data


def _not_negative(value, where: str, what: str, refuse: Refusal) -> None:
    if _number(value) and value < 0:
        raise refuse(where, f"{what} cannot be negative (it is {value:g})")


def _share(value, where: str, refuse: Refusal, most: float = 1.0) -> None:
    """A share, proportion, sensitivity or area under a curve: between 0 and ``most``."""
    if _number(value) and not -_SLACK <= value <= most + _SLACK:
        raise refuse(where, f"a share must lie between 0 and {most:g} (it is {value:g})")


def _ordered(pair, where: str, refuse: Refusal) -> None:
    """An interval or the quartiles: the lower end first."""
    if _pair(pair) and pair[0] > pair[1]:
        raise refuse(where, f"its lower end ({pair[0]:g}) is above its upper end ({pair[1]:g})")


def _shares_interval(pair, where: str, refuse: Refusal, most: float = 1.0) -> None:
    if isinstance(pair, list):
        for end in pair:
            _share(end, where, refuse, most)
    _ordered(pair, where, refuse)


def _triple(value, where: str, refuse: Refusal, contains: bool) -> None:
    """[value, low, high] of a share with its 95% interval; a Wilson interval always holds
    its own value (``contains``)."""
    if not isinstance(value, list) or len(value) != 3:
        return
    for item in value:
        _share(item, where, refuse)
    point, low, high = value
    _ordered([low, high], where, refuse)
    if contains and all(_number(v) for v in value) and \
            not low - _SLACK <= point <= high + _SLACK:
        raise refuse(where, f"its value ({point:g}) lies outside its own interval "
                            f"({low:g} to {high:g})")


# --- the parts of a model file ----------------------------------------------------------------


def _check_boxes(nodes, span, refuse: Refusal) -> None:
    """Each box's spread and mean: no negative SD, quartiles in order, and (regression) a
    prediction that is the box's mean, and a mean and quartiles inside the range of outcomes
    the tree was grown on."""
    if not isinstance(nodes, list):
        return
    for index, node in enumerate(nodes):
        if not isinstance(node, dict):
            continue
        where = f"nodes[{index}].{{}} (box {index + 1})"
        _not_negative(node.get("sd"), where.format("sd"), "a standard deviation", refuse)
        _not_negative(node.get("variance"), where.format("variance"), "a variance", refuse)
        _ordered(node.get("quartiles"), where.format("quartiles"), refuse)
        mean, prediction = node.get("mean"), node.get("prediction")
        if _number(mean) and _number(prediction) and \
                abs(mean - prediction) > _SLACK * max(1.0, abs(mean)):
            # A measured outcome's box predicts its mean: the chart prints the mean and
            # patients are scored with the prediction, so the two never differ.
            raise refuse(where.format("prediction"), f"a box predicts its mean ({mean:g}), "
                                                     f"not {prediction:g}")
        if span is None:
            continue
        low, high = span
        slack = _SLACK * max(1.0, abs(low), abs(high))
        values = [("mean", node.get("mean")), ("prediction", node.get("prediction"))]
        if _pair(node.get("quartiles")):
            values += [("quartiles", q) for q in node["quartiles"]]
        for key, value in values:
            if _number(value) and not low - slack <= value <= high + slack:
                raise refuse(where.format(key),
                             f"{value:g} lies outside the outcomes the tree was grown on "
                             f"({low:g} to {high:g}, cohort.outcome_range)")


def _check_path(path, refuse: Refusal) -> None:
    """The pruning path: errors, their standard errors and the α of each size are never
    negative; cross-validated sensitivity and specificity are shares, their intervals in
    order."""
    if not isinstance(path, dict):
        return
    for key in ("alpha", "train_risk", "cv_risk", "cv_se", "grid_alpha", "collapse_alpha"):
        values = path.get(key)
        for index, value in enumerate(values if isinstance(values, list) else ()):
            _not_negative(value, f"path.{key}[{index}]", _WHAT.get(key, "an error"), refuse)
    for key in ("cv_sensitivity", "cv_specificity"):
        values = path.get(key)
        for index, value in enumerate(values if isinstance(values, list) else ()):
            _share(value, f"path.{key}[{index}]", refuse)
        intervals = path.get(key + "_interval")
        for index, pair in enumerate(intervals if isinstance(intervals, list) else ()):
            _shares_interval(pair, f"path.{key}_interval[{index}]", refuse)


_WHAT = {"alpha": "a cost-complexity α", "grid_alpha": "a cost-complexity α",
         "collapse_alpha": "a cost-complexity α", "cv_se": "a standard error",
         "risk_se": "a standard error"}


def _check_chosen(chosen, refuse: Refusal) -> None:
    """The chosen size: its errors, their standard errors and the goal's shares."""
    if not isinstance(chosen, dict):
        return
    for key in ("cv_risk", "cv_se", "train_risk", "one_box_cv_risk", "miss_cost"):
        _not_negative(chosen.get(key), f"chosen.{key}",
                      "a cost" if key == "miss_cost" else _WHAT.get(key, "an error"), refuse)
    for key in ("cv_sensitivity", "cv_specificity"):
        _share(chosen.get(key), f"chosen.{key}", refuse)
        _shares_interval(chosen.get(key + "_interval"), f"chosen.{key}_interval", refuse)
    _share(_get(chosen, "goal", "at_least"), "chosen.goal.at_least", refuse)
    points = chosen.get("cv_net_benefit")
    for index, point in enumerate(points if isinstance(points, list) else ()):
        if isinstance(point, dict):
            _share(point.get("threshold"), f"chosen.cv_net_benefit[{index}].threshold", refuse)


def _check_one_box_on_path(chosen, path, refuse: Refusal) -> None:
    """The one-box error the chosen size is judged against is the pruning path's last."""
    if not isinstance(chosen, dict) or not isinstance(path, dict):
        return
    one_box, risks = chosen.get("one_box_cv_risk"), path.get("cv_risk")
    if not _number(one_box) or not isinstance(risks, list) or not risks or \
            not _number(risks[-1]):
        return
    if abs(one_box - risks[-1]) > _SLACK * max(1.0, abs(risks[-1])):
        raise refuse("chosen.one_box_cv_risk", f"it must be the pruning path's error for one "
                                               f"box ({risks[-1]:.6g}), not {one_box:.6g}")


def _check_cohort(cohort, refuse: Refusal) -> None:
    """Who the tree was grown on: counts are never negative, patients never outnumber their
    visits, and the outcome's range has its lower end first."""
    if not isinstance(cohort, dict):
        return
    for key in ("visits", "patients"):
        _not_negative(cohort.get(key), f"cohort.{key}", "a count", refuse)
    _not_negative(cohort.get("outcome_decimals"), "cohort.outcome_decimals",
                  "a number of decimals", refuse)
    for key in ("sites", "outcome_counts"):
        counts = cohort.get(key)
        for name, count in (counts.items() if isinstance(counts, dict) else ()):
            _not_negative(count, f"cohort.{key}.{name}", "a count", refuse)
    visits, patients = cohort.get("visits"), cohort.get("patients")
    if _number(visits) and _number(patients) and patients > visits:
        raise refuse("cohort.patients", f"{patients:g} patients cannot have made only "
                                        f"{visits:g} visits")
    _ordered(cohort.get("outcome_range"), "cohort.outcome_range", refuse)


def _check_cohort_fits_tree(data: dict, refuse: Refusal) -> None:
    """The cohort the chart prints is the one the tree was grown on: as many visits as the
    first box holds, its outcome counts the first box's, its sites no more than its visits,
    its first date not after its last, and the mean outcome inside its range."""
    cohort, nodes = data.get("cohort"), data.get("nodes")
    if not isinstance(cohort, dict) or not isinstance(nodes, list) or not nodes or \
            not isinstance(nodes[0], dict):
        return
    root, visits = nodes[0], cohort.get("visits")
    if _number(visits) and _number(root.get("n")) and visits != root["n"]:
        raise refuse("cohort.visits", f"it must equal the patients of box 1 ({root['n']:g}), "
                                      f"not {visits:g}")
    counts, classes = cohort.get("outcome_counts"), data.get("classes")
    if isinstance(counts, dict) and isinstance(root.get("counts"), list) and \
            isinstance(classes, list) and len(classes) == len(root["counts"]):
        for name, expected in zip(classes, root["counts"]):
            found = counts.get(name, 0)
            if _number(found) and _number(expected) and found != expected:
                raise refuse(f"cohort.outcome_counts.{name}",
                             f"it must equal box 1's count of {name!r} ({expected:g}), "
                             f"not {found:g}")
    sites = cohort.get("sites")
    if isinstance(sites, dict) and _number(visits) and \
            all(_number(k) for k in sites.values()) and sum(sites.values()) > visits:
        raise refuse("cohort.sites", f"its visits add up to {sum(sites.values()):g}, more "
                                     f"than the {visits:g} visits of the cohort")
    first, last = cohort.get("first_date"), cohort.get("last_date")
    if _iso_date(first) and _iso_date(last) and first > last:
        raise refuse("cohort.first_date", f"the first date ({first}) is after the last "
                                          f"({last})")
    mean, span = cohort.get("outcome_mean"), cohort.get("outcome_range")
    if _number(mean) and _pair(span) and \
            not span[0] - _SLACK * max(1.0, abs(span[0])) <= mean \
            <= span[1] + _SLACK * max(1.0, abs(span[1])):
        raise refuse("cohort.outcome_mean", f"{mean:g} lies outside the outcome's range "
                                            f"({span[0]:g} to {span[1]:g})")


def _iso_date(text) -> bool:
    """A date as Prunella writes it (YYYY-MM-DD), so that two compare as text."""
    if not isinstance(text, str) or len(text) != 10:
        return False
    try:
        dt.date.fromisoformat(text)
    except ValueError:
        return False
    return True


def _check_costs(costs, refuse: Refusal) -> None:
    """The priors are shares adding up to 1; a misclassification cost is never negative."""
    if not isinstance(costs, dict):
        return
    priors = costs.get("priors")
    if isinstance(priors, list):
        for index, prior in enumerate(priors):
            _share(prior, f"costs.priors[{index}]", refuse)
        if priors and all(_number(p) for p in priors) and abs(sum(priors) - 1) > 1e-6:
            raise refuse("costs.priors", f"the priors must add up to 1 (they add up to "
                                         f"{sum(priors):g})")
    loss = costs.get("loss")
    for i, row in enumerate(loss if isinstance(loss, list) else ()):
        for j, cost in enumerate(row if isinstance(row, list) else ()):
            _not_negative(cost, f"costs.loss[{i}][{j}]", "a cost", refuse)


_WILSON = ("sensitivity", "specificity", "ppv", "npv")  # [value, low, high] each
_ERRORS = ("risk", "risk_se", "mean_squared_error", "rmse", "mae")


def _check_validation(check, classes: int, refuse: Refusal) -> None:
    """A recorded check on separate patients: counts never negative (nor more patients than
    visits), shares and areas under the curve between 0 and 1, errors never negative, every
    interval in order."""
    if not isinstance(check, dict):
        return
    for key in ("n", "patients", "overlap_patients"):
        _not_negative(check.get(key), f"validation.{key}", "a count", refuse)
    n, patients = check.get("n"), check.get("patients")
    if _number(n) and _number(patients) and patients > n:
        raise refuse("validation.patients", f"{patients:g} patients cannot have made only "
                                            f"{n:g} visits")
    for key in _WILSON:
        _triple(check.get(key), f"validation.{key}", refuse, contains=True)
    _triple(check.get("auc"), "validation.auc", refuse, contains=False)
    for key in ("accuracy", "auc_macro"):
        _share(check.get(key), f"validation.{key}", refuse)
    _shares_interval(check.get("accuracy_interval"), "validation.accuracy_interval", refuse)
    # The Brier score: of the positive probability for two classes (0 to 1), summed over the
    # classes for more (0 to 2), as scikit-learn counts it.
    brier_most = 1.0 if classes <= 2 else 2.0
    _share(check.get("brier"), "validation.brier", refuse, brier_most)
    _shares_interval(check.get("brier_interval"), "validation.brier_interval", refuse,
                     brier_most)
    for key in _ERRORS:
        _not_negative(check.get(key), f"validation.{key}", _WHAT.get(key, "an error"), refuse)
    for key in ("rmse_interval", "mae_interval"):
        pair = check.get(key)
        for end in (pair if isinstance(pair, list) else ()):
            _not_negative(end, f"validation.{key}", "an error", refuse)
        _ordered(pair, f"validation.{key}", refuse)
    r2 = check.get("r2_interval")
    _ordered(r2, "validation.r2_interval", refuse)
    for key, value in (("r2", check.get("r2")),) + tuple(
            ("r2_interval", end) for end in (r2 if isinstance(r2, list) else ())):
        if _number(value) and value > 1 + _SLACK:
            raise refuse(f"validation.{key}", f"R² cannot be above 1 (it is {value:g})")
    bootstrap = check.get("bootstrap")
    if isinstance(bootstrap, dict):
        _share(bootstrap.get("level"), "validation.bootstrap.level", refuse)
        _not_negative(bootstrap.get("resamples"), "validation.bootstrap.resamples",
                      "a count", refuse)
