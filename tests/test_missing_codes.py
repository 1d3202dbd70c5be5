"""Which cells are "not recorded" (issue 10.5): only empty cells, the few codes that mean
nothing else, and the codes the user or the data dictionary names. Answers such as "none",
"nil", "no", "absent" and "normal" are levels; probable codes ("unknown", "n/a", "NR", "-99")
are proposed with their counts and applied only once confirmed; a listed level is always a
level. The data are invented. That these words are often ambiguous in clinical spreadsheets is
common practice, not a published rule."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd

from core.data import read_table
from core.dictionary import (
    ColumnSpec, DataDictionary, confirm_missing_codes, dictionary_for, infer_dictionary,
    open_proposals, typed_column,
)
from tests.helpers import prunella, sha256_of


def _frame(n: int = 90) -> pd.DataFrame:
    rng = np.random.default_rng(3)
    spo2 = rng.integers(84, 100, n)
    return pd.DataFrame({
        "spo2": spo2,
        "oxygen": (["none", "nil", "nasal", "mask", "none", "absent"] * n)[:n],
        "chest_sounds": (["normal", "wheeze", "crackles", "normal", "normal"] * n)[:n],
        "smoker": (["never", "current", "unknown", "former", "never", "n/a"] * n)[:n],
        "admitted": np.where(spo2 < 91, "yes", "no"),
    })


def test_answers_are_levels_never_missing():
    frame = _frame()
    dictionary, notes = infer_dictionary(frame)
    for column, answers in (("oxygen", {"none", "nil", "absent"}), ("chest_sounds", {"normal"})):
        spec = dictionary.get(column)
        assert answers <= set(spec.levels), spec
        typed = typed_column(frame[column], spec)
        assert not typed.missing.any(), column  # every cell is read as its answer
    assert not any("'chest_sounds'" in n for n in notes), notes
    # Kept apart, but said: three words that may be one answer split the patients given it.
    (said,) = [n for n in notes if "'oxygen'" in n]
    assert said.code == "infer.one_answer_twice"
    assert "the categories 'absent', 'nil', 'none'," in said, said
    assert "the tree treats them as different ones" in said


def test_one_word_for_nothing_is_not_a_warning():
    frame = _frame().assign(oxygen=(["none", "nasal", "mask"] * 30)[:90])
    _, notes = infer_dictionary(frame)
    assert not any("'oxygen'" in n for n in notes), notes


def test_probable_codes_are_proposed_with_counts_and_applied_only_when_confirmed():
    frame = _frame()
    dictionary, notes = infer_dictionary(frame)
    spec = dictionary.get("smoker")
    assert {"unknown", "n/a"} <= set(spec.levels) and spec.missing_codes == ()
    proposal = next(n for n in notes if n.code == "infer.probable_missing")
    assert "'unknown' (15 cells) and 'n/a' (15 cells)" in proposal
    assert set(proposal.fields["codes"]) == {"unknown", "n/a"}
    confirmed, said = confirm_missing_codes(dictionary, "smoker", proposal.fields["codes"])
    spec = confirmed.get("smoker")
    assert set(spec.missing_codes) == {"unknown", "n/a"}
    assert set(spec.levels) == {"current", "former", "never"}
    assert int(typed_column(frame["smoker"], spec).missing.sum()) == 30
    assert said.code == "infer.confirmed_missing" and "'smoker'" in said
    assert open_proposals(notes, confirmed) == [n for n in notes if n is not proposal]


def test_a_code_named_in_the_dictionary_is_applied_and_no_longer_proposed(tmp_path):
    path = tmp_path / "visits.csv"
    _frame().to_csv(path, index=False)
    given = DataDictionary((ColumnSpec("smoker", kind="nominal", missing_codes=("unknown",)),))
    table = read_table(path)
    dictionary, notes = dictionary_for(table, given)
    typed = typed_column(table.frame["smoker"], dictionary.get("smoker"))
    assert int(typed.missing.sum()) == 15
    # 'n/a' was not named: still proposed (the note names both, since only one is settled).
    assert any(n.code == "infer.probable_missing" for n in notes)
    given = DataDictionary((ColumnSpec("smoker", kind="nominal",
                                       missing_codes=("unknown", "n/a")),))
    _, notes = dictionary_for(table, given)
    assert not any(n.code == "infer.probable_missing" for n in notes)


def test_a_listed_level_is_always_a_level():
    cells = pd.Series(["NA", "low", "high", "NA", "unknown", "low"])
    spec = ColumnSpec("grade", kind="nominal", levels=("high", "low", "NA", "unknown"),
                      missing_codes=("unknown",))
    typed = typed_column(cells, spec)
    assert not typed.missing.any()  # "NA" and "unknown" are listed levels
    assert list(typed.codes) == [2, 1, 0, 2, 3, 1]


def test_the_command_line_proposes_and_a_dictionary_confirms(tmp_path):
    path = tmp_path / "visits.csv"
    _frame().to_csv(path, index=False)
    before = (sha256_of(path), path.stat().st_mtime_ns)
    run = prunella("fit", path, "--outcome", "admitted", "--model", tmp_path / "m.json",
                   "--folds", "3", "--min-leaf", "5")
    assert run.returncode == 0, run.stderr
    assert "'smoker' holds 'unknown' (15 cells) and 'n/a' (15 cells)" in run.stderr
    specs = {c["name"]: c for c in json.loads((tmp_path / "m.json").read_text())["predictors"]}
    assert {"none", "nil", "absent"} <= set(specs["oxygen"]["levels"])
    assert specs["smoker"]["missing_codes"] == [] and "unknown" in specs["smoker"]["levels"]
    listed = tmp_path / "codes.dictionary.json"
    DataDictionary((ColumnSpec("smoker", kind="nominal", missing_codes=("unknown", "n/a")),
                    )).save(listed)
    run = prunella("fit", path, "--outcome", "admitted", "--model", tmp_path / "m2.json",
                   "--folds", "3", "--min-leaf", "5", "--dictionary", listed)
    assert run.returncode == 0, run.stderr
    assert "may mean 'not recorded'" not in run.stderr
    specs = {c["name"]: c for c in json.loads((tmp_path / "m2.json").read_text())["predictors"]}
    assert specs["smoker"]["missing_codes"] == ["unknown", "n/a"]
    assert (sha256_of(path), path.stat().st_mtime_ns) == before
