"""A spreadsheet scored by a tree: every row with its outcome box and prediction.

Used by ``prunella score`` and by the app's export, so both write the same columns.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from .tree import TreeModel


def scored_table(model: TreeModel, frame: pd.DataFrame) -> tuple[pd.DataFrame, tuple[str, ...]]:
    """A copy of ``frame`` with the box number, the prediction and (two classes) the share of
    positives in that box added; returns the table and the notes raised while reading values."""
    scored = model.apply(frame)
    out = frame.copy()
    out["prunella_box"] = scored.leaf
    out["prunella_prediction"] = scored.prediction
    if model.positive is not None:
        share = np.zeros(len(model.nodes) + 1)  # looked up by box number, as predictions are
        for leaf in model.leaves:
            share[leaf.id] = leaf.counts[1] / max(leaf.n, 1)
        out[f"prunella_share_{model.positive}"] = np.round(share[np.asarray(scored.leaf)], 4)
    return out, scored.warnings
