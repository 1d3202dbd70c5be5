"""The waveform recognition problem (Breiman, Friedman, Olshen & Stone 1984, §2.6.2), as data.

Definition (from memory, see shared REFERENCES.md): 21 features; h1(m) = max(6 − |m − 11|, 0),
h2(m) = h1(m − 4), h3(m) = h1(m + 4), m = 1..21. Class 1: x_m = u h1(m) + (1 − u) h2(m) + ε_m;
class 2 mixes h1 and h3; class 3 mixes h2 and h3; u ~ U(0, 1), ε_m ~ N(0, 1); equal priors.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

FEATURES = tuple(f"x{m}" for m in range(1, 22))
CLASSES = ("1", "2", "3")


def _h(shift: int) -> np.ndarray:
    m = np.arange(1, 22)
    return np.maximum(6 - np.abs(m - shift - 11), 0).astype(float)


H1, H2, H3 = _h(0), _h(4), _h(-4)  # h2(m) = h1(m − 4), h3(m) = h1(m + 4)
_PAIRS = {0: (H1, H2), 1: (H1, H3), 2: (H2, H3)}


def waveform(n: int, seed: int) -> tuple[np.ndarray, np.ndarray]:
    """``n`` cases: features (n × 21) and class index 0, 1, 2 (classes drawn with equal chance)."""
    rng = np.random.default_rng(seed)
    y = rng.integers(0, 3, n)
    u = rng.uniform(0, 1, n)[:, None]
    first = np.stack([_PAIRS[c][0] for c in y])
    second = np.stack([_PAIRS[c][1] for c in y])
    X = u * first + (1 - u) * second + rng.normal(0, 1, (n, 21))
    return X, y


def waveform_frame(n: int, seed: int) -> pd.DataFrame:
    """The same cases as a table: columns x1..x21 and ``wave`` ('1', '2' or '3')."""
    X, y = waveform(n, seed)
    frame = pd.DataFrame(X, columns=list(FEATURES))
    frame["wave"] = np.array(CLASSES, dtype=object)[y]
    return frame
