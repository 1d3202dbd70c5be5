"""A clinical goal for the tree (a least cross-validated sensitivity or specificity) and the
miss costs searched to reach it. Kept light (no scikit-learn), as it is part of every request."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..messages.message import say

MEASURES = ("sensitivity", "specificity")
STEP = math.sqrt(2.0)  # grid step: each miss cost √2 times the one before
# The grid reaches BASE_REACH times the cost that balances the two classes' priors.
BASE_REACH = 16.0


@dataclass(frozen=True)
class Goal:
    """What the tree must reach under cross-validation: a measure and its least value."""

    measure: str  # "sensitivity" (rule out) or "specificity" (rule in)
    at_least: float  # a share between 0 and 1

    def __post_init__(self):
        if self.measure not in MEASURES:
            raise InputError(say("goal.measure", given=self.measure))
        if not (isinstance(self.at_least, (int, float)) and 0 < float(self.at_least) < 1):
            raise InputError(say("goal.share", given=self.at_least))

    @property
    def other(self) -> str:
        return MEASURES[1 - MEASURES.index(self.measure)]

    def to_dict(self) -> dict:
        return {"measure": self.measure, "at_least": float(self.at_least)}

    @classmethod
    def from_dict(cls, data: dict | None) -> "Goal | None":
        if not data:
            return None
        return cls(measure=str(data.get("measure")), at_least=float(data.get("at_least", 0)))

    def describe(self) -> str:
        return f"cross-validated {self.measure} of at least {self.at_least:.0%}"


def miss_cost_grid(goal: Goal, priors: np.ndarray) -> np.ndarray:
    """The miss costs searched: powers of √2 from 1 up (sensitivity goals) or down
    (specificity goals) to at least 16 times the cost that balances the classes' priors."""
    negative, positive = float(priors[0]), float(priors[1])
    balance = negative / max(positive, 1e-12) if goal.measure == "sensitivity" \
        else positive / max(negative, 1e-12)
    reach = BASE_REACH * max(1.0, balance)
    steps = int(math.ceil(math.log(reach) / math.log(STEP) - 1e-9))
    exponents = np.arange(steps + 1) if goal.measure == "sensitivity" else -np.arange(steps + 1)
    return STEP ** exponents.astype(float)


def cost_words(miss_cost: float) -> str:
    """A miss cost in words, the larger mistake first ("missing a positive counted 4 times as
    bad as a needless alarm")."""
    if miss_cost >= 1:
        return f"missing a positive counted {miss_cost:.3g} times as bad as a needless alarm"
    return f"a needless alarm counted {1 / miss_cost:.3g} times as bad as missing a positive"
