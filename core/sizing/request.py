"""Everything the user chose before pressing Run: what is predicted from what, how the tree is
grown and cross-validated, the share set aside, the size rule. Saved in model and project
files, so a derivation can be rerun exactly."""

from __future__ import annotations

from dataclasses import dataclass

from ..design.analysis import DesignSpec
from .folds import CVSettings
from .goal import Goal
from .grow import TreeSettings


@dataclass(frozen=True)
class DerivationRequest:
    """Everything the user chose before pressing Run."""

    design: DesignSpec
    tree: TreeSettings = TreeSettings()
    cv: CVSettings = CVSettings()
    holdout: float | None = None  # share of patients set aside before growing
    size: str | int = "1se"
    # Two classes: the smallest tree reaching this CV sensitivity or specificity (the miss
    # cost is searched); the size rule is then the goal's.
    goal: Goal | None = None

    def to_dict(self) -> dict:
        d = self.design
        out = {"design": {"outcome": d.outcome, "predictors": list(d.predictors), "task": d.task,
                           "positive": d.positive, "patient_id": d.patient_id, "site": d.site},
               "tree": self.tree.to_dict(), "cv": self.cv.to_dict(), "holdout": self.holdout,
               "size": self.size}
        if self.goal is not None:
            out["goal"] = self.goal.to_dict()
        return out

    @classmethod
    def from_dict(cls, data: dict) -> "DerivationRequest":
        d = data["design"]
        design = DesignSpec(outcome=d["outcome"], predictors=tuple(d["predictors"]),
                            task=d.get("task"), positive=d.get("positive"),
                            patient_id=d.get("patient_id"), site=d.get("site"))
        return cls(design=design, tree=TreeSettings.from_dict(data.get("tree", {})),
                   cv=CVSettings.from_dict(data.get("cv", {})), holdout=data.get("holdout"),
                   size=data.get("size", "1se"), goal=Goal.from_dict(data.get("goal")))
