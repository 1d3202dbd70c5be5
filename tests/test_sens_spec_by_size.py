"""The curve's sensitivity and specificity by size are core's pooled cross-validated counts:
each size's values and Wilson intervals equal the single-size measures the model records
(issue 13, item 2). Invented demo data: exercises the code, not a reference."""

from __future__ import annotations

import numpy as np

from tests._chart_demo import admitted


def test_measures_by_size_are_measures_at_every_size():
    derivation = admitted()
    counts = derivation.path.counts
    table = counts.measures_by_size()
    sizes = len(derivation.path.leaves)
    assert table["cv_sensitivity"].shape == (sizes,)
    assert table["cv_specificity_interval"].shape == (sizes, 2)
    for k in (0, sizes // 2, sizes - 1):
        one = counts.measures_at(k)
        for name in ("cv_sensitivity", "cv_specificity"):
            assert table[name][k] == one[name]
            assert list(table[name + "_interval"][k]) == one[name + "_interval"]
    # The one-box tree calls everyone one class: sensitivity 0 or 1, specificity the other.
    assert {table["cv_sensitivity"][-1], table["cv_specificity"][-1]} == {0.0, 1.0}
    assert np.all((table["cv_sensitivity_interval"] >= 0) & (table["cv_sensitivity_interval"] <= 1))
