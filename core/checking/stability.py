"""How stable is the chosen tree? The whole procedure refitted on bootstrap resamples.

Each resample draws patients with replacement (all of a patient's visits together when an
identifier is set, else single visits), then grows, cross-validates and sizes a tree exactly
as the derivation did. Copies of one patient always stay in the same fold, or the inner
cross-validation would see the same patient on both sides and choose too large a tree.

Reported: how often each predictor is the first question and how often it is asked anywhere,
and how often each question of the chosen tree recurs — anywhere in the resample's tree, and
in the same place (every question above it recurring too, on the same branch).

When does a resample's question count as the chosen tree's question? Same column, and:
- numeric ("above t?"): the thresholds lie within ``THRESHOLD_TOLERANCE`` of each other on the
  percentile scale of the derivation patients' values (|F(t) − F(t′)| ≤ 0.05, F the empirical
  distribution), so the tolerance means the same for SpO2 and for CRP;
- levels ("in {…}?"): the same split of the levels both trees know, either side named YES;
- "not recorded?": the same kind of question.
Where missing values are sent is not compared.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
from joblib import Parallel, delayed

from ..design.analysis import AnalysisData
from ..errors import InputError
from ..messages.message import say
from ..model.tree import Question, TreeModel
from ..option_limits import check_request_limits, check_setting
from ..progress import CancelFlag, Progress, stop_if_cancelled
from ..sizing.cross_validated_path import cross_validate_path
from ..sizing.request import DerivationRequest
from ..work_place import sent_once

DEFAULT_RESAMPLES = 200
THRESHOLD_TOLERANCE = 0.05  # percentile-scale distance within which two thresholds agree


@dataclass(frozen=True)
class PredictorUse:
    """How often a predictor was asked across the resamples."""

    column: str
    label: str
    first: int  # resamples in which it is the first question
    anywhere: int  # resamples in which the chosen tree asks it at all


@dataclass(frozen=True)
class QuestionRecurrence:
    """How often one question of the chosen tree came back."""

    box: int
    column: str
    text: str
    anywhere: int
    in_place: int
    resamples: int  # how many refits it was counted over (at least one)

    @property
    def share_anywhere(self) -> float:
        """Share of the refits that asked this question anywhere in the tree."""
        return self.anywhere / self.resamples

    @property
    def share_in_place(self) -> float:
        """Share of the refits that asked it in the same place (same path from the top)."""
        return self.in_place / self.resamples


@dataclass(frozen=True)
class Stability:
    """Bootstrap stability of the chosen tree."""

    resamples: int
    patient_level: bool  # patients (True) or single visits (False) were resampled
    seed: int
    tolerance: float
    predictors: tuple[PredictorUse, ...]  # most often asked first
    questions: tuple[QuestionRecurrence, ...]  # in box order
    leaves: tuple[int, ...]  # size chosen in each resample
    no_question: int  # resamples whose chosen tree is a single box

    def summary(self) -> str:
        """One printable line."""
        if not self.predictors or self.predictors[0].first == 0:
            return f"{self.resamples} resamples: no resample asked any question."
        top = self.predictors[0]
        sizes = np.array(self.leaves)
        return (f"{top.label} was the first question in {top.first / self.resamples:.0%} of "
                f"{self.resamples} bootstrap resamples; median size {np.median(sizes):.0f} boxes "
                f"(range {sizes.min()}–{sizes.max()})")


# --- one resample -----------------------------------------------------------------------------


def _skeleton(data: AnalysisData, request: DerivationRequest, rows: np.ndarray) -> tuple:
    """The tree the whole procedure chooses on ``rows``, as plain nodes.

    Returns (leaves, nodes) with nodes[sklearn id] = None for a leaf of the chosen subtree, or
    (column, kind, threshold, right_levels, left_levels, right_child, left_child).
    """
    sample = data.subset(rows)
    path = cross_validate_path(sample, request.tree, replace(request.cv, grouped=True), jobs=1)
    index, _ = path.index_for(request.size)
    grown = path.grown
    tree, encoding = grown.tree, grown.encoding
    internal = grown.sequence.internal_at(path.grid[index])
    X, membership = grown.matrix, grown.membership
    nodes: dict[int, tuple | None] = {}
    stack = [0]
    while stack:
        node = stack.pop()
        if not internal[node]:
            nodes[node] = None
            continue
        column = encoding.columns[tree.feature[node]]
        threshold = float(tree.threshold[node])
        reached = membership.indices[membership.indptr[node]:membership.indptr[node + 1]]
        values = X[reached, tree.feature[node]].astype(np.float64)
        present = values[~np.isnan(values)]
        right, left = tree.children_right[node], tree.children_left[node]
        if present.size == 0 or (present > threshold).all() or (present <= threshold).all():
            nodes[node] = (column.spec.name, "missing", None, (), (), right, left)
        elif column.kind == "numeric":
            nodes[node] = (column.spec.name, "above", threshold, (), (), right, left)
        else:
            nodes[node] = (column.spec.name, "in", None, column.yes_levels(threshold),
                           column.no_levels(threshold), right, left)
        stack += [right, left]
    return int(path.leaves[index]), nodes


def resample_rows(data: AnalysisData, resamples: int, seed: int) -> list[np.ndarray]:
    """Row positions of each bootstrap resample (whole patients when there is an identifier)."""
    rng = np.random.default_rng(seed)
    if data.groups is None:
        return [np.sort(rng.integers(0, data.n, data.n)) for _ in range(resamples)]
    order = np.argsort(data.groups, kind="stable")
    unique, starts = np.unique(data.groups[order], return_index=True)
    bounds = np.append(starts, data.n)
    out = []
    for _ in range(resamples):
        chosen = rng.integers(0, len(unique), len(unique))
        out.append(np.concatenate([order[bounds[g]:bounds[g + 1]] for g in chosen]))
    return out


# --- matching questions -----------------------------------------------------------------------


class _Matcher:
    """Does a resample's split ask the chosen tree's question? (see the module docstring)"""

    def __init__(self, data: AnalysisData, tolerance: float):
        self.tolerance = tolerance
        self.sorted = {p.spec.name: np.sort(p.numbers[~np.isnan(p.numbers)])
                       for p in data.predictors if p.numbers is not None}

    def _percentile(self, column: str, t: float) -> float:
        values = self.sorted[column]
        return np.searchsorted(values, t, side="right") / max(len(values), 1)

    def orientation(self, question: Question, split: tuple) -> str | None:
        """'same' (YES = right), 'swapped' (YES = left) or None when they differ."""
        column, kind, threshold, right, left = split[:5]
        if column != question.column or kind != question.kind:
            return None
        if kind == "missing":
            return "same"
        if kind == "above":
            distance = abs(self._percentile(column, question.threshold)
                           - self._percentile(column, threshold))
            return "same" if distance <= self.tolerance + 1e-12 else None
        known = set(question.yes_levels) | set(question.no_levels)
        common = known & (set(right) | set(left))
        yes = set(question.yes_levels) & common
        if not yes or yes == common:
            return None
        if yes == set(right) & common:
            return "same"
        if yes == set(left) & common:
            return "swapped"
        return None


def _count(model: TreeModel, skeleton: dict, matcher: _Matcher, anywhere: dict, in_place: dict):
    splits = [s for s in skeleton.values() if s is not None]
    for node in model.nodes:
        if node.question is not None and any(matcher.orientation(node.question, s) for s in splits):
            anywhere[node.id] += 1

    def walk(box_id: int, at: int) -> None:
        box, split = model.node(box_id), skeleton.get(at)
        if box.leaf or split is None:
            return
        side = matcher.orientation(box.question, split)
        if side is None:
            return
        in_place[box_id] += 1
        right, left = split[5], split[6]
        yes, no = (right, left) if side == "same" else (left, right)
        walk(box.children[0], yes)
        walk(box.children[1], no)

    walk(1, 0)


# --- the whole run ----------------------------------------------------------------------------


def bootstrap_stability(data: AnalysisData, request: DerivationRequest, model: TreeModel,
                        resamples: int = DEFAULT_RESAMPLES, seed: int | None = None,
                        jobs: int = 1, progress: Progress | None = None,
                        cancel: CancelFlag | None = None,
                        tolerance: float = THRESHOLD_TOLERANCE) -> Stability:
    """Refit the whole derivation ``request`` on bootstrap resamples of ``data`` and report how
    often predictors and the questions of ``model`` (the chosen tree) recur.

    ``progress(done, total)`` after each resample; ``cancel()`` returning True raises
    :class:`Cancelled`. ``jobs`` resamples run in parallel (joblib).
    """
    if resamples < 1:
        raise InputError(say("stability.resamples"))
    check_setting("bootstrap", resamples, where="bootstrap resamples")
    check_request_limits(request)
    seed = request.cv.seed if seed is None else seed
    patient_level = data.groups is not None
    if not patient_level:  # each visit is its own patient, so its copies share a fold
        data = replace(data, groups=np.arange(data.n, dtype=np.int64))
    stop_if_cancelled(cancel)
    samples = resample_rows(data, resamples, seed)
    matcher = _Matcher(data, tolerance)
    names = [p.spec.name for p in data.predictors]
    first = dict.fromkeys(names, 0)
    asked = dict.fromkeys(names, 0)
    anywhere = {n.id: 0 for n in model.nodes if not n.leaf}
    in_place = dict(anywhere)
    sizes, no_question = [], 0
    sent = data if jobs == 1 else data.for_workers()  # the numbers only: what workers receive
    with sent_once(sent):  # on a cluster, the rows travel to each worker once
        if jobs == 1:
            results = (_skeleton(data, request, rows) for rows in samples)
        else:
            # In resample order, so the run is the same for any worker count.
            results = Parallel(n_jobs=jobs, return_as="generator")(
                delayed(_skeleton)(sent, request, rows) for rows in samples)
        for done, (leaves, skeleton) in enumerate(results, 1):
            stop_if_cancelled(cancel)
            sizes.append(leaves)
            root = skeleton.get(0)
            if root is None:
                no_question += 1
            else:
                first[root[0]] += 1
            for column in {s[0] for s in skeleton.values() if s is not None}:
                asked[column] += 1
            _count(model, skeleton, matcher, anywhere, in_place)
            if progress:
                progress(done, resamples)
    labels = {p.spec.name: p.spec.display for p in data.predictors}
    uses = sorted((PredictorUse(c, labels[c], first[c], asked[c]) for c in names),
                  key=lambda u: (-u.first, -u.anywhere, names.index(u.column)))
    questions = tuple(QuestionRecurrence(n.id, n.question.column, n.text, anywhere[n.id],
                                         in_place[n.id], resamples) for n in model.nodes if not n.leaf)
    return Stability(resamples=resamples, patient_level=patient_level, seed=seed,
                     tolerance=tolerance, predictors=tuple(uses), questions=questions,
                     leaves=tuple(sorted(sizes)), no_question=no_question)
