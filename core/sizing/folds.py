"""Fold plans: which patients train and which are held out, in each fold. All seeded.

scikit-learn's splitters do the splitting; this module only chooses the right one for the
user's setting (classes → stratified, patient identifier → grouped, site → leave one site out).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..messages.message import say

PLANS = ("kfold", "loo", "site", "split")


@dataclass(frozen=True)
class CVSettings:
    """How the pruning path is cross-validated."""

    plan: str = "kfold"  # kfold | loo (leave one out) | site (leave one site out) | split
    folds: int = 10
    repeats: int = 1
    validation_share: float = 0.25  # for the single validation split
    grouped: bool = True  # keep each patient's visits together when an identifier is set
    stratified: bool = True  # keep class shares similar in every fold
    seed: int = 0

    def describe(self, grouped: bool) -> str:
        together = ", patients kept together" if grouped else ""
        if self.plan == "loo":
            return "leave-one-out cross-validation" + (" (one patient at a time)" if grouped else "")
        if self.plan == "site":
            return "leave-one-site-out cross-validation"
        if self.plan == "split":
            return f"single validation split ({self.validation_share:.0%} held out{together})"
        repeat = f", repeated {self.repeats} times" if self.repeats > 1 else ""
        return f"{self.folds}-fold cross-validation{repeat}{together}"

    def to_dict(self) -> dict:
        return dict(plan=self.plan, folds=self.folds, repeats=self.repeats,
                    validation_share=self.validation_share, grouped=self.grouped,
                    stratified=self.stratified, seed=self.seed)

    @classmethod
    def from_dict(cls, data: dict) -> "CVSettings":
        fields = cls.__dataclass_fields__
        return cls(**{k: v for k, v in data.items() if k in fields})


@dataclass(frozen=True)
class Fold:
    repeat: int
    train: np.ndarray
    test: np.ndarray


def fold_plan(settings: CVSettings, n: int, y: np.ndarray | None = None,
              groups: np.ndarray | None = None, sites: np.ndarray | None = None) -> list[Fold]:
    """The folds for ``n`` rows; ``y`` (class codes) stratifies, ``groups`` keeps patients together."""
    from sklearn.model_selection import (  # loaded when folds are made, not to read settings
        GroupKFold, GroupShuffleSplit, KFold, LeaveOneGroupOut, LeaveOneOut, ShuffleSplit,
        StratifiedKFold, StratifiedShuffleSplit,
    )

    if settings.plan not in PLANS:
        raise InputError(say("folds.unknown_plan", plan=settings.plan, plans=", ".join(PLANS)))
    use_groups = groups if (settings.grouped and groups is not None) else None
    index = np.zeros(n)
    if settings.plan == "site":
        if sites is None:
            raise InputError(say("folds.site_needs_column"))
        if np.unique(sites).size < 2:
            raise InputError(say("folds.site_needs_two"))
        return [Fold(0, tr, te) for tr, te in LeaveOneGroupOut().split(index, groups=sites)]
    if settings.plan == "loo":
        if use_groups is not None:
            return [Fold(0, tr, te) for tr, te in LeaveOneGroupOut().split(index, groups=use_groups)]
        return [Fold(0, tr, te) for tr, te in LeaveOneOut().split(index)]
    strat = y if (settings.stratified and y is not None) else None
    if settings.plan == "split":
        share = settings.validation_share
        if not 0 < share < 1:
            raise InputError(say("folds.validation_share"))
        if use_groups is not None:
            splitter = GroupShuffleSplit(n_splits=1, test_size=share, random_state=settings.seed)
            split = splitter.split(index, groups=use_groups)
        elif strat is not None and _can_stratify(strat, 2):
            splitter = StratifiedShuffleSplit(n_splits=1, test_size=share, random_state=settings.seed)
            split = splitter.split(index, strat)
        else:
            split = ShuffleSplit(n_splits=1, test_size=share, random_state=settings.seed).split(index)
        return [Fold(0, tr, te) for tr, te in split]
    k = settings.folds
    if k < 2:
        raise InputError(say("folds.folds_at_least_2"))
    units = n if use_groups is None else np.unique(use_groups).size
    if k > units:
        raise InputError(say("folds.too_few_units", k=k, n=units,
                             units="patients" if use_groups is not None else "rows"))
    folds: list[Fold] = []
    for r in range(max(1, settings.repeats)):
        seed = settings.seed + r
        if use_groups is not None:
            if strat is not None:
                split = _stratified_group_split(strat, use_groups, k, seed)
            else:
                split = GroupKFold(n_splits=k, shuffle=True, random_state=seed).split(index, groups=use_groups)
        elif strat is not None and _can_stratify(strat, k):
            split = StratifiedKFold(n_splits=k, shuffle=True, random_state=seed).split(index, strat)
        else:
            split = KFold(n_splits=k, shuffle=True, random_state=seed).split(index)
        folds.extend(Fold(r, tr, te) for tr, te in split)
    return folds


def _stratified_group_split(y: np.ndarray, groups: np.ndarray, k: int, seed: int):
    """k folds that keep each patient whole and class shares alike.

    scikit-learn's StratifiedGroupKFold searches fold by fold for every group, which takes
    seconds for a few thousand patients; dealing groups sorted by outcome into the folds in
    shuffled rounds balances classes as well for this use and is linear in the patients.
    """
    rng = np.random.default_rng(seed)
    unique, inverse = np.unique(groups, return_inverse=True)
    n_classes = int(np.max(y)) + 1
    composition = np.zeros((len(unique), n_classes))
    np.add.at(composition, (inverse, np.asarray(y, dtype=np.int64)), 1)
    share = composition / composition.sum(axis=1, keepdims=True)
    shuffled = rng.permutation(len(unique))
    # Sort by class mix (rarest class first), randomly among equals.
    keys = [share[shuffled, c] for c in np.argsort(composition.sum(axis=0))[::-1]]
    order = shuffled[np.lexsort(keys)]
    fold_of_group = np.empty(len(unique), dtype=np.int64)
    for start in range(0, len(order), k):
        block = order[start:start + k]
        fold_of_group[block] = rng.permutation(k)[:len(block)]
    fold_of_row = fold_of_group[inverse]
    for fold in range(k):
        test = np.flatnonzero(fold_of_row == fold)
        yield np.flatnonzero(fold_of_row != fold), test


def _can_stratify(y: np.ndarray, k: int) -> bool:
    counts = np.bincount(np.asarray(y, dtype=np.int64))
    return counts[counts > 0].min() >= k


def holdout_split(n: int, share: float, seed: int, y: np.ndarray | None = None,
                  groups: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray]:
    """Split rows into a derivation part and a held-out part before anything is grown."""
    if not 0 < share < 1:
        raise InputError(say("folds.holdout_share"))
    (fold,) = fold_plan(CVSettings(plan="split", validation_share=share, seed=seed), n, y=y,
                        groups=groups)
    return np.sort(fold.train), np.sort(fold.test)
