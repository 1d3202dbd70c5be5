"""Net benefit of the tree at each threshold probability (decision curve analysis; Vickers &
Elkin, Med Decis Making 2006;26:565–574).

A patient is "treated" (sent for the test, admitted, ...) when the derivation share of the
positive class in the outcome box they reach is at least the threshold probability pt. Then
NB = TP/n − FP/n · pt/(1 − pt), treating everyone gives prevalence − (1 − prevalence) ·
pt/(1 − pt), and treating no one gives 0. The tree helps at pt where its curve lies above both.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

# Threshold probabilities: 1% to 50% in steps of 1% (common practice; the published curves
# run over the range of thresholds clinicians might hold).
THRESHOLDS = np.round(np.arange(1, 51) / 100.0, 2)


@dataclass(frozen=True)
class NetBenefitPoint:
    """Net benefit at one threshold probability: the tree's, treating all, treating none."""

    threshold: float
    tree: float
    treat_all: float
    treat_none: float = 0.0


def net_benefit_from_counts(treated_positive: np.ndarray, treated_negative: np.ndarray,
                            positives: float, negatives: float,
                            thresholds: np.ndarray = THRESHOLDS) -> tuple[NetBenefitPoint, ...]:
    """Net benefit from how many positive and negative patients are treated at each
    threshold, out of ``positives`` + ``negatives`` patients."""
    n = positives + negatives
    if n <= 0:
        return ()
    odds = thresholds / (1 - thresholds)
    tree = np.asarray(treated_positive) / n - np.asarray(treated_negative) / n * odds
    prevalence = positives / n
    treat_all = prevalence - (1 - prevalence) * odds
    return tuple(NetBenefitPoint(float(t), float(b), float(a))
                 for t, b, a in zip(thresholds, tree, treat_all))


def net_benefit(y: np.ndarray, positive_share: np.ndarray,
                thresholds: np.ndarray = THRESHOLDS) -> tuple[NetBenefitPoint, ...]:
    """Net benefit for true classes ``y`` (1 = positive) when each patient's box has the
    derivation positive share ``positive_share``."""
    y = np.asarray(y) == 1
    share = np.asarray(positive_share, dtype=float)
    treated = share[:, None] >= thresholds[None, :]
    return net_benefit_from_counts((treated & y[:, None]).sum(axis=0),
                                   (treated & ~y[:, None]).sum(axis=0), float(y.sum()),
                                   float((~y).sum()), thresholds)


def useful_thresholds(points: tuple[NetBenefitPoint, ...]) -> tuple[float, float] | None:
    """The lowest and highest threshold at which the tree beats both treating all and none."""
    better = [p.threshold for p in points if p.tree > max(p.treat_all, p.treat_none) + 1e-12]
    return (min(better), max(better)) if better else None
