"""The chosen subtree of the pruning sequence as the plain model that is printed, saved and
scored: boxes numbered breadth-first (YES first), questions in words with round thresholds,
outcomes with counts, and a check that it routes every derivation patient as the grower did."""

from __future__ import annotations

import numpy as np
import pandas as pd

from .. import __version__
from ..data.cells import parse_dates
from ..data.table import LoadedTable
from ..design.analysis import AnalysisData
from ..design.matrix import MatrixColumn
from ..dictionary.columns import DataDictionary
from ..checking.overlap import derivation_ids
from ..model.thresholds import round_threshold
from ..phrases import patients_among, rows_count, rows_word
from ..precision import decimals_observed
from ..model.tree import (
    Node, Question, TreeModel, better_than_no_tree, expected_outcome, question_text, shared_count,
)
from .cross_validated_path import CrossValidatedPath
from .prune import parents_of
from .request import DerivationRequest


def build_model(path: CrossValidatedPath, index: int, rule: str, table: LoadedTable,
                dictionary: DataDictionary, request: DerivationRequest,
                chosen_extra: dict | None = None) -> TreeModel:
    """The subtree at position ``index`` of the pruning sequence, as a plain TreeModel;
    ``chosen_extra`` adds to what ``chosen`` records (a goal and its search)."""
    grown = path.grown
    data, tree, encoding = grown.data, grown.tree, grown.encoding
    internal = grown.sequence.internal_at(path.grid[index])
    X = grown.matrix
    membership = grown.membership
    order = _breadth_first(tree, internal)  # (sklearn node id, depth) in box order
    box_of = {node: i + 1 for i, (node, _) in enumerate(order)}
    nodes = []
    # Rows are visits; where patients came more than once, the counts are of visits.
    rows_are = rows_word(data.n, patients_among(data.groups))
    decimals = decimals_observed(data.y) if data.task == "regression" else None
    for node, depth in order:
        # Every box keeps its spread, so a smaller tree made from the file has it too.
        stats = _node_stats(tree, node, data, membership)
        if internal[node]:
            rows = membership.indices[membership.indptr[node]:membership.indptr[node + 1]]
            column = encoding.columns[tree.feature[node]]
            question = _question(column, tree, node, X[rows], data, rows)
            yes, no = tree.children_right[node], tree.children_left[node]
            spec = column.spec
            nodes.append(Node(id=box_of[node], depth=depth, question=question,
                              children=(box_of[yes], box_of[no]),
                              text=question_text(question, spec), **stats))
        else:
            nodes.append(Node(id=box_of[node], depth=depth,
                              text=_outcome_text(stats, data, rows_are, decimals), **stats))
    sequence = grown.sequence
    path_dict = {
        "leaves": sequence.leaves.tolist(),
        "alpha": sequence.alpha.tolist(),
        "train_risk": sequence.train_risk.tolist(),
        "cv_risk": path.cv_risk.tolist(),
        "cv_se": path.cv_se.tolist(),
        "grid_alpha": [None if not np.isfinite(a) else float(a) for a in path.grid],
        "risk_measure": ("mean squared error" if data.task == "regression"
                         else "expected misclassification cost per patient"),
        "cv": path.description,
        "folds": path.n_folds,
        "min_leaves": int(sequence.leaves[path.min_index]),
        "one_se_leaves": int(sequence.leaves[path.one_se_index]),
        # Each box's collapse α (None for outcome boxes): the smaller trees of the sequence
        # are this tree's boxes collapsed at each α, so a saved model knows them itself.
        "collapse_alpha": [float(sequence.collapse[node]) if internal[node] else None
                           for node, _ in order],
    }
    chosen = {"leaves": int(sequence.leaves[index]), "rule": rule,
              "cv_risk": float(path.cv_risk[index]), "cv_se": float(path.cv_se[index]),
              "train_risk": float(sequence.train_risk[index]),
              "one_box_cv_risk": float(path.cv_risk[-1]),
              "better_than_no_tree": better_than_no_tree(sequence.leaves, (path.cv_risk,
                                                                           path.cv_se), index)}
    if path.counts is not None:
        counts = path.counts
        by_size = [counts.measures_at(k) for k in range(len(sequence.leaves))]
        for name in ("cv_sensitivity", "cv_specificity"):
            path_dict[name] = [m[name] for m in by_size]
            path_dict[name + "_interval"] = [m[name + "_interval"] for m in by_size]
        # Net benefit of this size from the held-out predictions (Vickers & Elkin 2006).
        chosen["cv_net_benefit"] = [vars(p) for p in counts.net_benefit_at(index)]
    chosen.update(chosen_extra or {})
    used = sorted({encoding.columns[f].spec.name for f in set(tree.feature[internal].tolist())})
    predictors = tuple(p.spec for p in data.predictors)
    extra = {
        "prunella_version": __version__,
        "settings": request.to_dict(),
        "data": {"file": table.provenance.path.split("/")[-1], "sheet": table.provenance.sheet,
                 "sha256": table.provenance.sha256, "rows_in_file": table.provenance.n_rows},
        "cohort": _cohort(table.frame, dictionary, data, request),
        "columns_asked": used,
    }
    design = request.design
    if design.patient_id and design.patient_id in table.frame.columns:
        # Digests of the derivation patients' identifiers keyed with this computer's key
        # (never written out), so that a later check here can tell whether its patients are
        # separate (core/checking/overlap.py).
        cells = table.frame[design.patient_id].iloc[data.rows]
        extra["derivation_ids"] = derivation_ids(cells, design.patient_id)
    if grown.settings.coarsen is not None:  # what the chart, the report and the app say
        extra["coarsened"] = {"levels": int(grown.settings.coarsen),
                              "columns": [c.spec.name for c in encoding.columns
                                          if c.edges is not None]}
    if grown.costs is not None:
        extra["costs"] = {"priors": grown.costs.priors.tolist(), "loss": grown.costs.loss.tolist()}
    model = TreeModel(task=data.task, outcome=data.outcome, classes=data.classes,
                      predictors=predictors, nodes=tuple(nodes), n_rows=data.n, path=path_dict,
                      chosen=chosen, extra=extra)
    _check_routes(model, tree, internal, X, data, box_of)
    return model


def _breadth_first(tree, internal: np.ndarray) -> list[tuple[int, int]]:
    order, queue = [], [(0, 0)]
    while queue:
        node, depth = queue.pop(0)
        order.append((node, depth))
        if internal[node]:  # YES (right, value above) first
            queue.extend([(tree.children_right[node], depth + 1),
                          (tree.children_left[node], depth + 1)])
    return order


def _node_stats(tree, node: int, data: AnalysisData, membership=None) -> dict:
    n = int(tree.n[node])
    if data.task == "regression":
        stats = {"n": n, "mean": float(tree.mean[node]),
                 "sd": float(np.sqrt(max(tree.prune_risk[node] * data.n / max(n - 1, 1), 0.0))),
                 "prediction": float(tree.label[node])}
        if membership is not None:
            rows = membership.indices[membership.indptr[node]:membership.indptr[node + 1]]
            if len(rows):
                low, high = np.percentile(np.asarray(data.y, float)[rows], [25, 75])
                stats["quartiles"] = (float(low), float(high))
        return stats
    return {"n": n, "counts": tuple(int(c) for c in tree.class_counts[node]),
            "prediction": data.classes[int(tree.label[node])]}


def _outcome_text(stats: dict, data: AnalysisData, rows_are: str = "patients",
                  decimals: int | None = None) -> str:
    """'Admitted: expect yes (74% of 241 visits: yes)': the answer, then the share of the
    box's rows with the positive class (or the class expected) and how many rows."""
    n = stats["n"]
    expected = expected_outcome(data.outcome, data.task, stats["prediction"], stats.get("mean"),
                                stats.get("counts", ()), tuple(data.classes or ()), decimals)
    rows = rows_count(n, rows_are)
    if data.task == "regression":
        return f"{expected} ({rows})"
    share = shared_count(stats["counts"], data.classes, stats["prediction"]) / max(n, 1)
    which = data.classes[1] if len(data.classes) == 2 else stats["prediction"]
    return f"{expected} ({share:.0%} of {rows}: {which})"


def _question(column: MatrixColumn, tree, node: int, X_rows: np.ndarray, data: AnalysisData,
              rows: np.ndarray) -> Question:
    threshold = np.float64(tree.threshold[node])
    values = X_rows[:, tree.feature[node]].astype(np.float64)
    present = ~np.isnan(values)
    missing = int((~present).sum())
    # Where no derivation patient at this box lacked the value, the grower's branch for a
    # missing value is only its default (the larger branch), not evidence: none is printed,
    # and such a patient is measured first.
    missing_goes = None if missing == 0 else ("no" if tree.missing_left[node] else "yes")
    left = values <= threshold  # scikit-learn's own test, float32 value against float64 threshold
    if not (present & ~left).any() or not (present & left).any():
        # All recorded values on one side: the split is "recorded or not".
        return Question(column=column.spec.name, kind="missing", missing_goes="yes",
                        missing_in_derivation=missing)
    if column.kind == "numeric":
        original = data.predictors[column.predictor].numbers[rows]
        lo = float(np.max(original[present & left]))
        hi = float(np.min(original[present & ~left]))
        return Question(column=column.spec.name, kind="above", threshold=round_threshold(lo, hi),
                        missing_goes=missing_goes, missing_in_derivation=missing)
    return Question(column=column.spec.name, kind="in", yes_levels=column.yes_levels(threshold),
                    no_levels=column.no_levels(threshold), missing_goes=missing_goes,
                    missing_in_derivation=missing)


def _check_routes(model: TreeModel, tree, internal, X, data: AnalysisData, box_of) -> None:
    """The printed model must send every derivation patient where the grower sent them."""
    by_model = model.route(model.asked_values(data.predictors), data.n)
    grower_leaf = tree.estimator.apply(X)
    parent = parents_of(tree.children_left, tree.children_right)
    unique = np.unique(grower_leaf)
    boxes = np.array([box_of[_chosen_leaf(parent, internal, leaf)] for leaf in unique.tolist()])
    by_tree = boxes[np.searchsorted(unique, grower_leaf)]
    if not np.array_equal(by_model, by_tree):
        bad = int((by_model != by_tree).sum())
        raise RuntimeError(f"internal check failed: the rounded chart sends {bad} derivation "
                           "patients to another box than the grown tree")


def _chosen_leaf(parent: np.ndarray, internal: np.ndarray, leaf: int) -> int:
    """The node of the chosen subtree where a grower leaf ends up: its first non-internal
    ancestor, counting from the root."""
    path = [leaf]
    while parent[path[-1]] >= 0:
        path.append(parent[path[-1]])
    for node in reversed(path):
        if not internal[node]:
            return node
    return leaf


def _cohort(frame: pd.DataFrame, dictionary: DataDictionary, data: AnalysisData,
            request: DerivationRequest) -> dict:
    cohort = {"visits": data.n}
    if data.groups is not None:
        cohort["patients"] = int(np.unique(data.groups).size)
    if data.sites is not None and data.site_levels:
        counts = np.bincount(data.sites[data.sites >= 0], minlength=len(data.site_levels))
        cohort["sites"] = {lv: int(c) for lv, c in zip(data.site_levels, counts) if c}
    dates = [c.name for c in dictionary.columns if c.kind == "date" and c.name in frame.columns]
    if dates:
        parsed = parse_dates(frame[dates[0]].iloc[data.rows])
        if parsed.notna().any():
            cohort["date_column"] = dictionary.get(dates[0]).display
            cohort["first_date"] = parsed.min().date().isoformat()
            cohort["last_date"] = parsed.max().date().isoformat()
    if data.task == "classification":
        counts = np.bincount(data.y, minlength=len(data.classes))
        cohort["outcome_counts"] = {c: int(k) for c, k in zip(data.classes, counts)}
    else:
        cohort["outcome_mean"] = float(np.mean(data.y))
        # The precision the outcome was recorded with: every mean printed follows it.
        cohort["outcome_decimals"] = decimals_observed(data.y)
        cohort["outcome_range"] = [float(np.min(data.y)), float(np.max(data.y))]
    return cohort
