"""The fingerprint names the tree: recording a check on separate patients does not change it,
and the check carries the same fingerprint (issue 10, item 8). A project saved by Prunella 0.1,
whose fingerprint held the check, still recognises its tree.

Invented demo cohort (sample_data/README.md); our own rule, not a reference.
"""

from __future__ import annotations

import _chart_demo as demo

from core.checking import check_table, with_check
from core.data import LoadedTable
from core.model import TreeModel


def test_a_check_leaves_the_fingerprint_as_it_was(tmp_path):
    derivation = demo.admitted()
    model = derivation.model
    frame = derivation.table.frame
    riverside = LoadedTable(frame[frame["campus"] == "Riverside"].reset_index(drop=True),
                            derivation.table.provenance)
    check = check_table(model, riverside, source="Riverside campus")
    checked = with_check(model, check)
    assert checked.extra["validation"]["source"] == "Riverside campus"
    assert checked.fingerprint == model.fingerprint == check.model_fingerprint
    assert checked.extra["validation"]["model_fingerprint"] == checked.fingerprint
    assert checked.short_fingerprint == model.short_fingerprint
    assert checked.recorded_check is not None
    # Saved and read again: the same tree, the same fingerprint, the check still its own.
    checked.save(tmp_path / "checked.json")
    again = TreeModel.load(tmp_path / "checked.json")
    assert again.fingerprint == model.fingerprint and again.recorded_check is not None
    # Checked again on other patients: still the same tree.
    north = LoadedTable(frame[frame["campus"] == "North"].reset_index(drop=True),
                        derivation.table.provenance)
    twice = with_check(checked, check_table(checked, north, source="North campus"))
    assert twice.fingerprint == model.fingerprint


def test_an_older_projects_fingerprint_still_names_its_tree():
    derivation = demo.admitted()
    model = derivation.model
    frame = derivation.table.frame
    riverside = LoadedTable(frame[frame["campus"] == "Riverside"].reset_index(drop=True),
                            derivation.table.provenance)
    checked = with_check(model, check_table(model, riverside))
    older = checked.fingerprint_with_check  # as Prunella 0.1 computed it: the check inside
    assert older != checked.fingerprint
    assert checked.is_named_by(older) and checked.is_named_by(checked.fingerprint)
    assert not checked.is_named_by(None) and not checked.is_named_by("0" * 64)
