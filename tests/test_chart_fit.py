"""Whether a tree fits the page, and which trees of its pruning sequence do.

The demo cohort is invented; it is used only to exercise the checks.
"""

from __future__ import annotations

import datetime as dt

import pytest

import _chart_demo as demo
from core.chart import ChartOptions, ChartTooLarge, plan_chart, sizes_that_fit
from core.chart.content import outcome_paras
from core.chart.fitting import smaller_trees, tree_fits
from tests.helpers import DEMO_A4_LEAVES

DATE = dt.date(2025, 3, 14)


def options(**changes) -> ChartOptions:
    return ChartOptions(**{"printed": DATE, **changes})


# --- too large ----------------------------------------------------------------------------------


def test_a_tree_too_large_is_refused_naming_the_largest_that_fits() -> None:
    big = demo.admitted_size(40).model
    with pytest.raises(ChartTooLarge) as refused:
        plan_chart(big, options())
    message = str(refused.value)
    fitting = refused.value.largest_fitting
    assert fitting is not None
    assert f"{len(big.leaves)} outcome boxes" in message and "9 pt" in message
    assert f"largest tree of its pruning sequence that fits has {fitting} outcome boxes" in message
    assert "A3" in message
    sizes = sizes_that_fit(demo.admitted(), ChartOptions(paper="a4"))
    assert fitting == max(s for s in sizes if s <= len(big.leaves))
    plan_chart(demo.admitted_size(fitting).model, options())  # it really fits


def test_sizes_that_fit_agree_with_planning_each_size() -> None:
    derivation = demo.admitted()
    sizes = sizes_that_fit(derivation, ChartOptions(paper="a4", orientation="auto"))
    assert DEMO_A4_LEAVES in sizes and 1 not in sizes  # one box is no chart
    leaves = [int(v) for v in derivation.path.leaves]
    assert sizes == [s for s in leaves if s in sizes]  # the path's order, largest first
    for n in sorted(set(leaves))[:8]:
        model = demo.admitted_size(n).model
        assert (n in sizes) == tree_fits(model, options())
    assert max(leaves) not in sizes
    larger = sizes_that_fit(derivation, ChartOptions(paper="a3", orientation="auto"))
    assert max(larger) >= max(sizes)
    assert derivation.model.chosen["leaves"] in larger  # the demo's 1-SE tree prints on A3


@pytest.mark.parametrize("which", ["admitted", "length_of_stay", "three_classes"])
def test_the_smaller_trees_of_a_saved_model_are_its_pruning_sequence(which: str) -> None:
    """From the model file alone (counts, costs, SDs), the weakest-link prunings of the
    chosen tree (Breiman et al. 1984, ch. 3) are exactly the smaller trees of the
    derivation's pruning sequence, box for box."""
    from core.chart.fitting import pruned_model

    derivation = {"admitted": lambda: demo.admitted_size(13),
                  "length_of_stay": lambda: demo.length_of_stay_size(12),
                  "three_classes": lambda: demo.three_classes_size(10)}[which]()
    model = derivation.model
    trees = smaller_trees(model)
    path_sizes = [int(v) for v in dict.fromkeys(derivation.path.leaves) if v <= len(model.leaves)]
    assert [n for n, _ in trees] == path_sizes
    for n, collapsed in trees:
        mine = pruned_model(model, collapsed)
        theirs = demo.choose(derivation, n).model
        assert len(mine.nodes) == len(theirs.nodes)
        for a, b in zip(mine.nodes, theirs.nodes):
            assert (a.id, a.children, a.n, a.counts, a.mean, a.question, a.prediction) == \
                (b.id, b.children, b.n, b.counts, b.mean, b.question, b.prediction)
            if a.leaf:  # the box says the same
                assert outcome_paras(mine, a, options().checked()) == \
                    outcome_paras(theirs, b, options().checked())
        if n == len(model.leaves):
            assert mine.chosen == model.chosen
        else:  # the file keeps the cross-validated net benefit of the chosen size only
            assert "cv_net_benefit" not in mine.chosen
            assert mine.chosen == {k: v for k, v in theirs.chosen.items()
                                   if k != "cv_net_benefit"}


def test_one_box_for_everyone_never_counts_as_fitting() -> None:
    """A one-box tree is never printed as a decision chart, so the app's "fits on the paper"
    shading and the refusal's "largest that fits" never offer it."""
    derivation = demo.admitted_size(7)
    assert 1 in [int(v) for v in derivation.path.leaves]
    for form in ("tree", "rules"):
        sizes = sizes_that_fit(derivation, options(form=form))
        assert sizes and 1 not in sizes
    one_box = demo.choose(derivation, 1).model
    assert len(one_box.leaves) == 1
    assert not tree_fits(one_box, options()) and not tree_fits(one_box, options(form="rules"))
