"""A spreadsheet scored by a tree: every row with its outcome box and prediction.

Used by ``prunella score`` and by the app's export, so both write the same columns.
"""

from __future__ import annotations

import pandas as pd

from .model import TreeModel


def scored_table(model: TreeModel, frame: pd.DataFrame) -> tuple[pd.DataFrame, tuple[str, ...]]:
    """A copy of ``frame`` with the box number, the prediction and (two classes) the share of
    positives in that box added; returns the table and the notes raised while reading values."""
    scored = model.apply(frame)
    out = frame.copy()
    out["prunella_box"] = scored.leaf
    out["prunella_prediction"] = scored.prediction
    if model.positive is not None:
        share = {n.id: n.counts[1] / max(n.n, 1) for n in model.leaves}
        out[f"prunella_share_{model.positive}"] = [round(share[i], 4) for i in scored.leaf]
    return out, scored.warnings
