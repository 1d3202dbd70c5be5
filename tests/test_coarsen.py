"""Coarsening measurements with many distinct values (--coarsen N, core/design/matrix.py).

No outside reference is needed: what is checked follows from the definition. A column with at
most N distinct values is left as it is, so coarsening with N at least every column's count
must give exactly the uncoarsened tree (path, CV risks, boxes). With a smaller N, every
printed threshold lies in a gap between observed values of the patients at its box, and the
printed tree routes every derivation patient to the box the grower (on quantile levels) sent
them to; quantile edges are observed values (inverted-CDF quantiles, common practice).
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import core.sizing.derivation as derivation_module
from core.design.matrix import fit_encoding, quantile_edges, quantile_levels, training_matrix
from core.errors import InputError
from core.sizing import CVSettings, DerivationRequest, cross_validate_path, derive
from core.sizing.grow import TreeSettings
from core.design import DesignSpec
from tests.helpers import DEMO_CSV, analysis_from_arrays, demo_inputs, prunella

PREDICTORS = ("age", "resp_rate", "spo2", "heart_rate", "arrival_mode", "crp", "triage_level")


def _distinct(values: np.ndarray) -> int:
    return int(np.unique(values[~np.isnan(values)]).size)


def test_quantile_edges_are_observed_values_and_few_distinct_values_are_left_alone():
    rng = np.random.default_rng(0)
    values = rng.normal(size=5000)
    values[::17] = np.nan
    edges = quantile_edges(values, 16)
    assert edges is not None and len(edges) <= 15
    assert np.isin(edges, values).all()  # each edge is a value some patient had
    levels = quantile_levels(values, edges)
    assert np.isnan(levels[::17]).all() and not np.isnan(np.delete(levels, slice(None, None, 17))).any()
    recorded = levels[~np.isnan(levels)]
    assert recorded.min() == 0 and recorded.max() == len(edges) <= 15
    counts = np.bincount(recorded.astype(int))
    assert counts.max() - counts.min() <= 2  # quantile levels: equal shares, up to ties
    # Order is kept: a larger value never has a lower level.
    order = np.argsort(values[~np.isnan(values)])
    assert (np.diff(recorded[order]) >= 0).all()
    assert quantile_edges(np.round(values, 0), 16) is None  # about 8 distinct values: as it is
    assert quantile_edges(np.full(10, np.nan), 4) is None


def _searched(values: np.ndarray, edges: np.ndarray) -> np.ndarray:
    """The definition of a quantile level: the number of edges below the value."""
    levels = np.searchsorted(edges, values, side="left").astype(np.float32)
    levels[np.isnan(values)] = np.nan
    return levels


def _hard_cases():
    """Values and edges where a shortcut for the binary search could go wrong."""
    rng = np.random.default_rng(7)
    n = 200_000  # above the size where the bucket table is used
    normal = rng.normal(60, 12, n)
    yield "normal, 255 edges", normal, np.unique(np.quantile(normal, np.arange(1, 256) / 256,
                                                             method="inverted_cdf"))
    heavy = rng.standard_cauchy(n) * 1e3  # most values in a few buckets, far outliers
    yield "heavy tails", heavy, np.unique(np.quantile(heavy, np.arange(1, 64) / 64,
                                                      method="inverted_cdf"))
    counts = rng.poisson(3, n).astype(float)  # many values equal to an edge
    yield "whole counts, values on edges", counts, np.array([1.0, 2.0, 3.0, 5.0, 8.0])
    near = 1.0 + rng.integers(0, 40, n) * np.finfo(float).eps  # values one ulp apart
    yield "one ulp apart", near, np.unique(near)[5:30:3]
    close = np.array([0.1, np.nextafter(0.1, 1), 0.2])  # two edges in one bucket
    spread = np.concatenate([rng.uniform(0, 0.3, n), close, np.nextafter(close, 0),
                             np.nextafter(close, 1)])
    yield "adjacent edges", spread, close
    wild = normal.copy()
    wild[::101] = np.nan
    wild[1::997], wild[2::991] = np.inf, -np.inf
    wild[3::983], wild[4::977] = 1e308, -1e308
    yield "NaN, infinities and extremes", wild, np.unique(np.quantile(normal, [.1, .5, .9]))
    yield "edges at the limits of floating point", wild, np.array([-1e308, 0.0, 1e308])
    yield "one edge", normal, np.array([60.0])
    yield "denormal span", np.full(n, 5e-324) * rng.integers(0, 4, n), np.array([0.0, 5e-324])
    small = rng.normal(size=1000)  # below the table's size: the binary search itself
    yield "few values", small, np.quantile(small, [0.25, 0.5, 0.75])


@pytest.mark.parametrize("name,values,edges", list(_hard_cases()), ids=lambda v: v
                         if isinstance(v, str) else "")
def test_quantile_levels_equal_the_binary_search_exactly(name, values, edges):
    """quantile_levels reads most levels from a bucket table (core/design/matrix.py); it must
    give exactly what searching every value gives, including NaN, infinities and ties."""
    with np.errstate(over="ignore", invalid="ignore"):
        got = quantile_levels(values, edges)
    assert got.dtype == np.float32
    np.testing.assert_array_equal(got, _searched(values, edges), err_msg=name)


def test_quantile_levels_on_random_columns_equal_the_binary_search():
    rng = np.random.default_rng(11)
    for trial in range(40):
        n = int(rng.integers(65_536, 140_000))
        scale = 10.0 ** rng.uniform(-6, 6)
        values = rng.normal(0, scale, n) if trial % 2 else rng.exponential(scale, n)
        values = np.round(values, int(rng.integers(0, 6))) if trial % 3 == 0 else values
        values[rng.random(n) < 0.05] = np.nan
        recorded = np.sort(values[~np.isnan(values)])
        edges = np.unique(recorded[rng.integers(0, recorded.size, int(rng.integers(2, 300)))])
        np.testing.assert_array_equal(quantile_levels(values, edges), _searched(values, edges))


@pytest.mark.parametrize("outcome", ["two classes", "three classes", "measured"])
def test_a_folds_matrix_in_one_pass_is_the_encoding_and_its_matrix(outcome):
    """training_matrix (what a fold uses) gives exactly fit_encoding's columns and matrix,
    for measurements, ordered and unordered categories (split into levels for three classes)."""
    from core.design import DesignSpec, prepare_analysis
    from core.dictionary import infer_dictionary

    rng = np.random.default_rng(5)
    n = 600
    frame = pd.DataFrame({
        "lactate": np.where(rng.random(n) < 0.05, np.nan, rng.gamma(2, 1, n)),
        "ward": rng.choice(["medical", "surgical", "none", "nil"], n),
        "triage": rng.choice(["1", "2", "3", "4"], n),
        "stay": rng.gamma(3, 2, n).round(1),
        "class": rng.choice(["a", "b", "c"] if outcome == "three classes" else ["a", "b"], n),
    })
    dictionary, _ = infer_dictionary(frame)
    dictionary = dictionary.with_column("triage", kind="ordinal", levels=("1", "2", "3", "4"))
    target = "stay" if outcome == "measured" else "class"
    predictors = ("lactate", "ward", "triage") + (("stay",) if target == "class" else ())
    data = prepare_analysis(frame, dictionary, DesignSpec(target, predictors))
    rows = np.sort(rng.choice(n, 480, replace=False))
    for coarsen in (None, 8):
        encoding, X = training_matrix(data, rows, coarsen=coarsen)
        expected = fit_encoding(data, rows, coarsen=coarsen)
        assert len(encoding.columns) == len(expected.columns)
        for got, want in zip(encoding.columns, expected.columns):
            assert (got.predictor, got.kind, got.order, got.level) == (
                want.predictor, want.kind, want.order, want.level)
            assert (got.edges is None) == (want.edges is None)
            if got.edges is not None:
                assert np.array_equal(got.edges, want.edges)
        np.testing.assert_array_equal(X, expected.matrix(data, rows))
    assert len(encoding.columns) == (7 if outcome == "three classes" else 4 if target == "class"
                                     else 3)


def test_fold_levels_are_learnt_from_the_training_rows_only():
    rng = np.random.default_rng(1)
    X = rng.normal(size=(400, 2))
    data = analysis_from_arrays(X, (X[:, 0] > 0).astype(int), "classification")[0]
    train = np.arange(200)
    encoding = fit_encoding(data, train, coarsen=8)
    expected = quantile_edges(data.predictors[0].numbers[train], 8)
    assert np.array_equal(encoding.columns[0].edges, expected)


def test_coarsening_with_n_at_least_every_columns_distinct_count_gives_the_same_tree():
    table, dictionary, _ = demo_inputs()
    request = DerivationRequest(DesignSpec("admitted", PREDICTORS, patient_id="patient_id"),
                                cv=CVSettings(folds=5, seed=2))
    plain = derive(table, dictionary, request, jobs=1)
    most = max(_distinct(p.numbers) for p in plain.data.predictors if p.numbers is not None)
    assert most > 50  # the demo has real measurements, so the check means something
    for n in (most, most + 1, 65_536):
        request_n = DerivationRequest(request.design, tree=TreeSettings(coarsen=n), cv=request.cv)
        coarse = derive(table, dictionary, request_n, jobs=1)
        assert np.array_equal(coarse.path.leaves, plain.path.leaves)
        assert np.array_equal(coarse.path.alpha, plain.path.alpha)
        assert np.array_equal(coarse.path.cv_risk, plain.path.cv_risk)  # exact
        assert np.array_equal(coarse.path.cv_se, plain.path.cv_se)
        assert coarse.model.nodes == plain.model.nodes
        assert coarse.model.extra["settings"]["tree"]["coarsen"] == n
        assert any("changed nothing" in note for note in coarse.notes)
    assert "coarsen" not in plain.model.extra["settings"]["tree"]  # off: not recorded


def _descendant_leaves(model) -> dict[int, set[int]]:
    by_id = {node.id: node for node in model.nodes}
    below: dict[int, set[int]] = {}
    for node in reversed(model.nodes):  # children come after parents
        below[node.id] = ({node.id} if node.leaf else
                          set().union(*(below[c] for c in node.children)))
    return below if by_id else {}


@pytest.mark.parametrize("levels", [4, 12, 40])
def test_with_fewer_levels_thresholds_sit_between_observed_values_and_routes_are_kept(levels):
    table, dictionary, _ = demo_inputs()
    request = DerivationRequest(DesignSpec("admitted", PREDICTORS, patient_id="patient_id"),
                                tree=TreeSettings(coarsen=levels), cv=CVSettings(folds=5))
    derivation = derive(table, dictionary, request, jobs=1)
    model, data = derivation.model, derivation.data
    assert any("quantile levels (coarsened)" in note for note in derivation.notes)
    boxes = model.route(model.asked_values(data.predictors), data.n)
    below = _descendant_leaves(model)
    numbers = {p.spec.name: p.numbers for p in data.predictors if p.numbers is not None}
    asked_numeric = 0
    for node in model.nodes:
        here = np.isin(boxes, list(below[node.id]))
        assert here.sum() == node.n  # the grower's count: the printed tree sends the same rows
        if node.leaf:
            assert tuple(np.bincount(data.y[here], minlength=2)) == node.counts
            continue
        question = node.question
        if question.kind != "above":
            continue
        asked_numeric += 1
        values = numbers[question.column][here]
        values = values[~np.isnan(values)]
        lo = values[values <= question.threshold].max()
        hi = values[values > question.threshold].min()
        assert lo <= question.threshold < hi  # inside the gap between two observed values
        assert not ((values > lo) & (values < hi)).any()  # no patient at the box in the gap
    assert asked_numeric >= 1


def test_coarsening_on_the_command_line_is_recorded_and_a_bad_level_count_refused(tmp_path):
    out = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--coarsen", "1",
                   "--model", tmp_path / "m.json")
    assert out.returncode == 2 and "--coarsen" in out.stderr and "2 to 65536" in out.stderr
    out = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--coarsen", "8", "--folds", "3",
                   "--jobs", "1", "--model", tmp_path / "m.json")
    assert out.returncode == 0, out.stderr
    assert "grown on as 8 quantile levels (coarsened)" in out.stderr
    saved = json.loads((tmp_path / "m.json").read_text())
    assert saved["settings"]["tree"]["coarsen"] == 8
    with pytest.raises(InputError):
        derive(*demo_inputs()[:2], DerivationRequest(
            DesignSpec("admitted", PREDICTORS), tree=TreeSettings(coarsen=1)))


def test_the_fit_suggests_coarsening_on_a_large_file(tmp_path, monkeypatch):
    # An invented clinic file (other names, a rare outcome); the suggestion's row count is
    # lowered so the test stays small.
    rng = np.random.default_rng(5)
    n = 900
    frame = pd.DataFrame({"mrn": [f"M{100000 + i}" for i in range(n)],
                          "lactate_mmol": np.round(rng.gamma(2, 1.1, n), 2),
                          "sbp": rng.integers(90, 140, n)})  # 50 values
    frame["icu"] = np.where((frame["lactate_mmol"] > 4) | (rng.random(n) < 0.03), "yes", "no")
    path = tmp_path / "ward_audit.csv"
    frame.to_csv(path, index=False)
    before = path.read_bytes()
    monkeypatch.setattr(derivation_module, "COARSEN_SUGGESTED_ABOVE", 500)
    out = prunella("fit", path, "--outcome", "icu", "--folds", "3", "--jobs", "1",
                   "--model", tmp_path / "m.json", "--quiet")
    assert out.returncode == 0, out.stderr
    assert "900 rows: growing may take long; --coarsen 256" in out.stderr
    out = prunella("fit", path, "--outcome", "icu", "--folds", "3", "--jobs", "1",
                   "--coarsen", "64", "--model", tmp_path / "m2.json", "--quiet")
    assert out.returncode == 0 and "growing may take long" not in out.stderr
    assert "Lactate with more than 64 different values was grown on as 64" in out.stderr
    assert path.read_bytes() == before  # the input file is never written


def test_coarsened_cv_is_the_same_for_any_worker_count():
    rng = np.random.default_rng(3)
    X = rng.normal(size=(3000, 4))
    y = ((X[:, 0] + 0.5 * X[:, 1] + rng.normal(size=3000)) > 0.3).astype(int)
    data = analysis_from_arrays(X, y, "classification")[0]
    settings = TreeSettings(min_leaf=20, coarsen=32)
    cv = CVSettings(folds=4, repeats=2, seed=1)
    one = cross_validate_path(data, settings, cv, jobs=1)
    two = cross_validate_path(data, settings, cv, jobs=2)
    assert np.array_equal(one.cv_risk, two.cv_risk) and np.array_equal(one.cv_se, two.cv_se)


def test_the_model_file_the_chart_and_the_report_say_coarsening_was_used(tmp_path):
    import io

    from pypdf import PdfReader

    from core.chart import ChartOptions
    from core.chart.content import chart_text
    from core.model import TreeModel
    from core.report import prepare_report, write_report

    table, dictionary, _ = demo_inputs()
    request = DerivationRequest(DesignSpec("admitted", PREDICTORS, patient_id="patient_id"),
                                tree=TreeSettings(coarsen=12), cv=CVSettings(folds=4))
    derivation = derive(table, dictionary, request, jobs=1)
    model = derivation.model
    assert model.extra["coarsened"]["levels"] == 12
    assert "age" in model.extra["coarsened"]["columns"]
    assert "triage_level" not in model.extra["coarsened"]["columns"]  # five levels: as it is
    model.save(tmp_path / "m.json")
    again = TreeModel.load(tmp_path / "m.json")
    said = again.coarsening()
    assert said is not None and said.startswith("Coarsened: Age") and "12 quantile levels" in said
    panel = [item.text for section in chart_text(again, ChartOptions().checked()).sections
             for item in section.items]
    assert said in panel
    contents = prepare_report(derivation, outer_folds=2, bootstrap=0, printed="2026-12-03")
    write_report(contents, tmp_path / "r.pdf")
    text = " ".join(" ".join(page.extract_text() for page in
                             PdfReader(io.BytesIO((tmp_path / "r.pdf").read_bytes())).pages).split())
    assert "Measurements coarsened" in text and "12 quantile levels" in text
    plain = derive(table, dictionary, DerivationRequest(request.design, cv=request.cv), jobs=1)
    assert plain.model.coarsening() is None and "coarsened" not in plain.model.extra
