"""A size asked for that the pruning path does not have is never changed silently: the notes
(printed by ``prunella fit``) say which size was used and why (issue 15, item 12)."""

from __future__ import annotations

from tests._chart_demo import admitted
from tests.helpers import DEMO_CSV, prunella
from core.sizing import choose_model


def _missing_size(path_leaves) -> int:
    """A box count between two sizes on the path, which pruning therefore never gives."""
    sizes = sorted(set(int(n) for n in path_leaves))
    for small, large in zip(sizes, sizes[1:]):
        if large - small > 1:
            return small + 1
    raise AssertionError("every size from 1 to the full tree is on this path")


def test_a_size_between_two_on_the_path_says_the_smaller_one_was_used():
    derivation = admitted()
    wanted = _missing_size(derivation.path.leaves)
    chosen = choose_model(derivation, wanted)
    used = len(chosen.model.leaves)
    assert used < wanted and used in set(int(n) for n in derivation.path.leaves)
    said = [str(n) for n in chosen.notes if "pruning path has" in str(n)]
    assert said == [f"No tree on the pruning path has {wanted} outcome boxes; using the next "
                    f"smaller, {used} outcome boxes."]


def test_a_size_beyond_the_full_tree_says_the_full_tree_was_used_and_a_size_on_the_path_says_nothing():
    derivation = admitted()
    full = int(derivation.path.leaves[0])
    chosen = choose_model(derivation, full + 500)
    assert len(chosen.model.leaves) == full
    assert any(f"using the largest, the full tree with {full} outcome boxes" in str(n)
               for n in chosen.notes)
    # Choosing a size that exists afterwards drops the earlier note: it is about one choice.
    again = choose_model(chosen, full)
    assert not any("pruning path has" in str(n) for n in again.notes)


def test_fit_prints_which_size_it_used(tmp_path):
    ran = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--size", "999", "--folds", "3",
                   "--model", tmp_path / "m.json")
    assert ran.returncode == 0, ran.stderr
    assert "No tree on the pruning path has 999 outcome boxes; using the largest" in ran.stdout + ran.stderr
