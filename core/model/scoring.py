"""A spreadsheet scored by a tree: every row with its outcome box and prediction.

Used by ``prunella score`` and by the app's export, so both write the same columns.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from ..messages.message import say
from .column_names import columns_for_tree
from .tree import TreeModel


def scored_table(model: TreeModel, frame: pd.DataFrame) -> tuple[pd.DataFrame, tuple[str, ...]]:
    """A copy of ``frame`` with the box number, the prediction and (two classes) the share of
    positives in that box added; returns the table and the notes raised while reading values.

    A row stopped at a question whose value is not recorded, where no derivation patient
    lacked it, gets none of these; ``prunella_missing`` names the column to measure."""
    # The columns found as prunella check finds them (case and spaces aside); the scored
    # file keeps the spreadsheet's own headers.
    mapping, renamed = columns_for_tree(model, frame.columns)
    asked = frame.rename(columns={str(k): v for k, v in mapping.items()})
    scored = model.apply(asked.loc[:, list(mapping.values())])
    out = frame.copy()
    leaf = np.asarray(scored.leaf)
    routed = leaf > 0
    # A row waiting for a value (box 0) gets no box, no prediction and no share: the scored
    # file leaves them empty and names the column to measure.
    box = pd.array(leaf, dtype="Int64")
    box[~routed] = pd.NA
    out["prunella_box"] = box
    out["prunella_prediction"] = scored.prediction
    if model.positive is not None:
        share = np.full(len(model.nodes) + 1, np.nan)  # looked up by box number, as predictions are
        for node in model.leaves:
            share[node.id] = node.counts[1] / max(node.n, 1)
        out[f"prunella_share_{model.positive}"] = np.round(share[leaf], 4)
    warnings = [say("check.column_renamed", found=found, wanted=wanted)
                for found, wanted in renamed] + list(scored.warnings)
    if model.asks_unroutable():
        out["prunella_missing"] = scored.needs
        warnings += needs_warning("check.scored_needs_value", _counted(scored.needs), model)
    return out, tuple(warnings)


def _counted(needed: np.ndarray) -> tuple[tuple[str, int], ...]:
    names, counts = np.unique(needed[pd.notna(needed)].astype(str), return_counts=True)
    return tuple((str(c), int(k)) for c, k in zip(names, counts))


def needs_counts(model: TreeModel, waiting: np.ndarray) -> tuple[tuple[str, int], ...]:
    """Per column, how many rows wait at one of its questions for the value to be measured
    (``waiting`` as :meth:`TreeModel.route_waiting` gives it)."""
    return _counted(model.needed_columns(waiting))


def needs_warning(code: str, needs: tuple[tuple[str, int], ...], model: TreeModel) -> list[str]:
    """The sentence naming the rows that wait for a value (none when every row was routed)."""
    if not needs:
        return []
    parts = ", ".join(f"{model.spec(c).display} {k}" for c, k in needs)
    return [say(code, n=sum(k for _, k in needs), parts=parts)]
