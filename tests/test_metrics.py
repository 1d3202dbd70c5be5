"""Measures with intervals (core/checking/metrics.py) against published examples and
scikit-learn."""

from __future__ import annotations

import math

import numpy as np
import pytest
from sklearn.metrics import (
    brier_score_loss, confusion_matrix, mean_absolute_error, mean_squared_error, r2_score,
    roc_auc_score,
)
from statsmodels.stats.proportion import proportion_confint

from core.checking.metrics import (
    DerivationBox, classification_measures, delong_se, hanley_mcneil_se, proportion,
    regression_measures, roc,
)


# Newcombe (1998), Statistics in Medicine 17:857–872, Table I, method 3 (Wilson score)
# (from memory, as recorded in docs/references.md).
@pytest.mark.parametrize("k, n, low, high", [(81, 263, 0.2553, 0.3662), (15, 148, 0.0624, 0.1605),
                                             (0, 20, 0.0, 0.1611), (1, 29, 0.0061, 0.1718)])
def test_wilson_intervals_match_newcombe_1998(k, n, low, high):
    p = proportion(k, n)
    assert p.value == pytest.approx(k / n)
    assert p.low == pytest.approx(low, abs=5e-5)
    assert p.high == pytest.approx(high, abs=5e-5)


def test_proportions_match_statsmodels_wilson():
    # statsmodels proportion_confint(method="wilson") as an independent implementation.
    rng = np.random.default_rng(3)
    for n in rng.integers(1, 400, 25):
        k = int(rng.integers(0, n + 1))
        low, high = proportion_confint(k, int(n), alpha=0.05, method="wilson")
        p = proportion(k, int(n))
        assert (p.low, p.high) == pytest.approx((low, high), abs=1e-9)


def _ct_ratings():
    # Hanley & McNeil (1982), Radiology 143:29–36, CT example: ratings 1–5 of 58 normal and
    # 51 abnormal cases (from memory, as recorded in docs/references.md).
    normal, abnormal = [33, 6, 6, 11, 2], [3, 2, 2, 11, 33]
    score = np.r_[np.repeat(np.arange(1, 6), normal), np.repeat(np.arange(1, 6), abnormal)]
    truth = np.r_[np.zeros(sum(normal), bool), np.ones(sum(abnormal), bool)]
    return truth, score.astype(float)


def test_roc_area_and_se_match_hanley_mcneil_ct_example():
    truth, score = _ct_ratings()
    curve = roc(truth, score)
    assert curve.auc == pytest.approx(0.893, abs=5e-4)  # Hanley & McNeil 1982 (from memory)
    assert curve.se_hanley_mcneil == pytest.approx(0.032, abs=5e-4)
    assert hanley_mcneil_se(curve.auc, 51, 58) == pytest.approx(curve.se_hanley_mcneil)
    assert (curve.n_positive, curve.n_negative) == (51, 58)
    # The interval uses DeLong's SE and is named; it contains the area.
    assert curve.method == "DeLong"
    assert curve.low < curve.auc < curve.high
    assert curve.high - curve.low == pytest.approx(2 * 1.959964 * curve.se_delong, rel=1e-6)


def test_delong_se_equals_its_definition_by_pairs():
    # DeLong, DeLong & Clarke-Pearson (1988): placements from all positive–negative pairs,
    # ties counted half; compared with the midrank shortcut used in core/checking/metrics.py.
    rng = np.random.default_rng(7)
    truth = rng.random(80) < 0.4
    score = np.round(rng.normal(truth * 0.8, 1), 1)  # rounding makes ties
    pos, neg = score[truth], score[~truth]
    psi = (pos[:, None] > neg[None, :]) + 0.5 * (pos[:, None] == neg[None, :])
    v10, v01 = psi.mean(axis=1), psi.mean(axis=0)
    expected = math.sqrt(v10.var(ddof=1) / len(pos) + v01.var(ddof=1) / len(neg))
    assert delong_se(truth, score) == pytest.approx(expected, rel=1e-12)
    assert psi.mean() == pytest.approx(roc_auc_score(truth, score))


def _random_binary(seed=1, n=300, boxes=5):
    rng = np.random.default_rng(seed)
    leaves = rng.integers(1, boxes + 1, n)
    rate = np.linspace(0.1, 0.8, boxes)
    y = (rng.random(n) < rate[leaves - 1]).astype(int)
    share = rate + rng.normal(0, 0.05, boxes)
    probabilities = np.c_[1 - share[leaves - 1], share[leaves - 1]]
    predicted = (share[leaves - 1] > 0.4).astype(int)
    return y, predicted, probabilities, leaves, share


def test_binary_point_values_match_scikit_learn():
    y, predicted, probabilities, leaves, _ = _random_binary()
    m = classification_measures(y, predicted, probabilities, ("no", "yes"))
    matrix = confusion_matrix(y, predicted)
    assert np.array_equal(np.array(m.confusion), matrix)
    tn, fp, fn, tp = matrix.ravel()
    head = m.headline
    assert head.label == "yes" and m.positive == "yes"
    assert head.sensitivity.value == pytest.approx(tp / (tp + fn))
    assert head.specificity.value == pytest.approx(tn / (tn + fp))
    assert head.ppv.value == pytest.approx(tp / (tp + fp))
    assert head.npv.value == pytest.approx(tn / (tn + fn))
    assert m.accuracy.value == pytest.approx((tp + tn) / len(y))
    assert head.roc.auc == pytest.approx(roc_auc_score(y, probabilities[:, 1]))
    assert m.brier == pytest.approx(brier_score_loss(y, probabilities[:, 1]))
    assert m.cost == pytest.approx(1 - m.accuracy.value)  # 0-1 loss, weight 1


def test_cost_uses_loss_times_prior_weight():
    y, predicted, probabilities, _, _ = _random_binary(seed=4)
    loss = np.array([[0, 1], [5, 0]])
    weight = np.array([0.5, 2.0])
    m = classification_measures(y, predicted, probabilities, ("no", "yes"), loss=loss,
                                case_weight=weight)
    per_case = loss[y, predicted] * weight[y]
    assert m.cost == pytest.approx(per_case.mean())
    assert m.cost_se == pytest.approx(per_case.std() / math.sqrt(len(y)))


def test_calibration_flags_a_box_whose_derivation_rate_is_outside():
    y, predicted, probabilities, leaves, share = _random_binary(seed=2, n=2000)
    # Derivation rates equal to the observed ones (to 1%) agree; a made-up 1% does not.
    observed = [y[leaves == b].mean() for b in range(1, 6)]
    boxes = tuple(DerivationBox(b, 100, (100 - round(100 * r), round(100 * r)))
                  for b, r in zip(range(1, 6), observed))
    wrong = boxes[:2] + (DerivationBox(3, 100, (99, 1)),) + boxes[3:]  # claims 1% in box 3
    m = classification_measures(y, predicted, probabilities, ("no", "yes"), leaves=leaves,
                                boxes=wrong)
    by_box = {r.box: r for r in m.calibration}
    assert by_box[3].agrees is False and by_box[3].derivation_value == pytest.approx(0.01)
    assert all(by_box[b].agrees for b in (1, 2, 4, 5))
    assert sum(r.n for r in m.calibration) == len(y)
    k = int(((leaves == 3) & (y == 1)).sum())
    assert by_box[3].observed == pytest.approx(k / (leaves == 3).sum())


def test_several_classes_per_class_and_overall():
    rng = np.random.default_rng(5)
    n, k = 400, 3
    y = rng.integers(0, k, n)
    probabilities = rng.dirichlet(np.ones(k), n)
    probabilities[np.arange(n), y] += 0.5
    probabilities /= probabilities.sum(axis=1, keepdims=True)
    predicted = probabilities.argmax(axis=1)
    m = classification_measures(y, predicted, probabilities, ("a", "b", "c"))
    assert m.positive is None and m.headline is None and len(m.per_class) == 3
    for c, result in enumerate(m.per_class):
        assert result.roc.auc == pytest.approx(roc_auc_score(y == c, probabilities[:, c]))
        assert result.sensitivity.value == pytest.approx(((predicted == c) & (y == c)).sum() / (y == c).sum())
    assert m.auc_macro == pytest.approx(roc_auc_score(y, probabilities, multi_class="ovr",
                                                      average="macro"))
    assert m.brier == pytest.approx(brier_score_loss(y, probabilities, labels=[0, 1, 2]))
    assert "Accuracy" in m.summary()


def test_empty_groups_do_not_break_anything():
    m = classification_measures(np.zeros(5, int), np.zeros(5, int), np.c_[np.ones(5), np.zeros(5)],
                                ("no", "yes"))
    assert m.headline.roc is None  # no positives: no ROC curve
    assert m.headline.sensitivity.value is None
    assert "not estimable" in m.headline.sensitivity.text()
    assert m.accuracy.value == 1.0


def test_regression_point_values_and_box_means():
    rng = np.random.default_rng(8)
    leaves = rng.integers(1, 4, 500)
    y = np.array([10.0, 20.0, 30.0])[leaves - 1] + rng.normal(0, 3, 500)
    predicted = np.array([10.0, 20.0, 30.0])[leaves - 1]
    boxes = (DerivationBox(1, 50, mean=10.0, sd=3), DerivationBox(2, 50, mean=26.0, sd=3),
             DerivationBox(3, 50, mean=30.0, sd=3))
    m = regression_measures(y, predicted, leaves, boxes, label="Stay", unit="h")
    assert m.rmse == pytest.approx(math.sqrt(mean_squared_error(y, predicted)))
    assert m.mae == pytest.approx(mean_absolute_error(y, predicted))
    assert m.r2 == pytest.approx(r2_score(y, predicted))
    rows = {r.box: r for r in m.calibration}
    assert rows[2].agrees is False and rows[1].agrees and rows[3].agrees
    assert rows[1].observed == pytest.approx(y[leaves == 1].mean())
    assert "RMSE" in m.summary() and " h" in m.summary()
