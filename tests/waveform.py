"""Breiman's waveform recognition problem, generated from its published definition.

Breiman, Friedman, Olshen & Stone (1984), *Classification and Regression Trees*, §2.6.2
(from memory): 21 features; h1(m) = max(6 - |m - 11|, 0), h2(m) = h1(m - 4), h3(m) = h1(m + 4)
for m = 1..21; class 1 is u·h1 + (1 - u)·h2 + ε, class 2 is u·h1 + (1 - u)·h3 + ε, class 3 is
u·h2 + (1 - u)·h3 + ε, with u ~ U(0, 1), ε_m ~ N(0, 1) and equal priors. Bayes error ≈ 0.14.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from core.data import LoadedTable, Provenance
from core.dictionary import ColumnSpec, DataDictionary

FEATURES = tuple(f"x{m}" for m in range(1, 22))
CLASSES = ("class 1", "class 2", "class 3")

_M = np.arange(1, 22)
_H1 = np.maximum(6 - np.abs(_M - 11), 0).astype(float)
_H2 = np.maximum(6 - np.abs(_M - 4 - 11), 0).astype(float)
_H3 = np.maximum(6 - np.abs(_M + 4 - 11), 0).astype(float)
_PAIRS = ((_H1, _H2), (_H1, _H3), (_H2, _H3))


def waveform(n: int, seed: int) -> tuple[np.ndarray, np.ndarray]:
    """``n`` cases: X of shape (n, 21) and classes 0, 1, 2 (equal priors)."""
    rng = np.random.default_rng(seed)
    y = rng.integers(0, 3, size=n)
    u = rng.uniform(size=(n, 1))
    first = np.stack([_PAIRS[c][0] for c in y])
    second = np.stack([_PAIRS[c][1] for c in y])
    X = u * first + (1 - u) * second + rng.normal(size=(n, 21))
    return X, y


def waveform_table(n: int, seed: int) -> LoadedTable:
    """``waveform(n, seed)`` as a table read from nowhere: x1..x21 and ``wave``, one of
    CLASSES."""
    X, y = waveform(n, seed)
    frame = pd.DataFrame(X, columns=list(FEATURES))
    frame["wave"] = np.array(CLASSES, dtype=object)[y]
    provenance = Provenance("waveform.csv", None, "0" * 64, len(frame), frame.shape[1])
    return LoadedTable(frame, provenance)


def waveform_dictionary() -> DataDictionary:
    """The 21 numeric features as predictors and ``wave`` as a nominal outcome."""
    return DataDictionary(tuple(ColumnSpec(f, kind="numeric") for f in FEATURES) + (
        ColumnSpec("wave", role="outcome", kind="nominal", levels=CLASSES),))
