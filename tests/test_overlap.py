"""An external file that shares patients with the derivation data is no separate check
(issue 10, item 7).

Generated data: 300 patients with a patient identifier; the "external" file holds 40 of them
again plus 100 new ones. Counting the patients both share by their identifiers, and not
calling such a check separate, is common practice: an external validation uses participants
who were not in the development data (as the TRIPOD statement, Collins et al. 2015, describes
validation; recalled from memory).
"""

from __future__ import annotations

import hashlib
import hmac
import json

import numpy as np
import pandas as pd
import pytest

from core.chart import ChartOptions
from core.chart.content import chart_text
from core.checking.identifier_key import identifier_key, key_id
from core.checking.new_patients import check_table, with_check
from core.data import read_table
from core.design import DesignSpec
from core.dictionary import infer_dictionary
from core.model import TreeModel
from core.sizing import CVSettings, DerivationRequest, derive
from tests.helpers import prunella


def cohort(ids, seed: int) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    x = np.round(rng.uniform(size=len(ids)), 3)
    return pd.DataFrame({"pid": ids, "x": x,
                         "outcome": np.where((x > 0.5) ^ (rng.random(len(ids)) < 0.1), "yes", "no")})


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    folder = tmp_path_factory.mktemp("overlap")
    cohort([f"P{i:04d}" for i in range(300)], 1).to_csv(folder / "derive.csv", index=False)
    ids = [f"P{i:04d}" for i in range(40)] + [f"Q{i:04d}" for i in range(100)]
    cohort(ids, 2).to_csv(folder / "external.csv", index=False)
    table = read_table(folder / "derive.csv")
    dictionary, _ = infer_dictionary(table.frame)
    dictionary = dictionary.with_column("outcome", role="outcome").with_column("pid",
                                                                                role="patient_id")
    model = derive(table, dictionary, DerivationRequest(
        DesignSpec("outcome", ("x",), positive="yes", patient_id="pid"),
        cv=CVSettings(folds=5))).model
    model.save(folder / "m.json")
    return folder, model


def test_model_keeps_digests_not_identifiers(files):
    folder, model = files
    text = (folder / "m.json").read_text()
    assert "P0001" not in text
    ids = json.loads(text)["derivation_ids"]
    assert ids["column"] == "pid" and len(ids["digests"]) == 300


def test_overlap_is_counted_and_not_called_separate(files):
    folder, model = files
    result = check_table(model, read_table(folder / "external.csv"))
    assert (result.overlap_patients, result.overlap_rows, result.separate) == (40, 40, False)
    assert result.n == 140
    data = result.to_dict()
    assert data["overlap_patients"] == 40 and data["separate"] is False
    assert any("not a check on separate patients" in w for w in result.warnings)
    checked = with_check(model, result)
    titles = [s.title for s in chart_text(checked, ChartOptions().checked()).sections]
    assert "Checked on separate patients" not in titles
    assert "Checked on patients who include derivation patients" in titles


def test_overlapping_rows_can_be_left_out(files):
    folder, model = files
    result = check_table(model, read_table(folder / "external.csv"), leave_out_overlap=True)
    assert result.n == 100 and result.overlap_patients == 40 and result.separate
    titles = [s.title for s in chart_text(with_check(model, result),
                                          ChartOptions().checked()).sections]
    assert "Checked on separate patients" in titles


def test_command_line(files, tmp_path):
    folder, _ = files
    ran = prunella("check", folder / "m.json", folder / "external.csv", "--out", tmp_path / "c.json")
    assert ran.returncode == 0, ran.stderr
    assert "not a check on separate patients" in ran.stdout
    assert json.loads((tmp_path / "c.json").read_text())["overlap_patients"] == 40
    ran = prunella("check", folder / "m.json", folder / "external.csv", "--leave-out-overlap",
                   "--out", tmp_path / "d.json")
    record = json.loads((tmp_path / "d.json").read_text())
    assert record["n"] == 100 and record["separate"] is True
    # Rows left out is a note (the check is on separate patients), not a warning.
    assert "Note: 40 patient(s)" in ran.stdout and "Warning: 40 patient(s)" not in ran.stdout


def test_an_older_model_without_digests_counts_none(files):
    _, model = files
    data = json.loads(model.to_json())
    del data["derivation_ids"]
    old = TreeModel.from_dict(data)
    assert old.extra.get("derivation_ids") is None


# --- keyed digests: a model file alone gives no identifier back -------------------------


def _all_ids():
    """Every identifier of the space this cohort's record numbers come from (P0000 to P9999,
    and Q0000 to Q9999 for the external file)."""
    return [f"{letter}{i:04d}" for letter in "PQ" for i in range(10000)]


def _old_digest(salt: str, value: str) -> str:
    """The earlier, salted digest (the salt stored in the file): anyone can recompute it."""
    return hashlib.sha256(f"{salt}:{value}".encode()).hexdigest()[:16]


def test_brute_force_on_the_model_file_recovers_no_identifier(files):
    folder, _ = files
    data = json.loads((folder / "m.json").read_text())
    record = data["derivation_ids"]
    assert set(record) == {"column", "format", "key_id", "digests"}
    stored = set(record["digests"])
    # Every value the file holds that an attacker could try as the salt or the key.
    guesses = {data["data"]["sha256"], data["data"]["sha256"][:16], "prunella",
               record["key_id"], record["format"], ""}
    keys = [b"", bytes(32)] + [g.encode() for g in guesses]
    found = set()
    for value in _all_ids():
        tried = {_old_digest(g, value) for g in guesses}
        tried.add(hashlib.sha256(value.encode()).hexdigest()[:16])
        tried |= {hmac.new(k, value.encode(), hashlib.sha256).hexdigest()[:16] for k in keys}
        if tried & stored:
            found.add(value)
    assert found == set()
    # The same attack on the earlier, salted record recovers every one of the 300.
    salt = data["data"]["sha256"][:16]
    old = {_old_digest(salt, f"P{i:04d}") for i in range(300)}
    assert {v for v in _all_ids() if any(_old_digest(g, v) in old for g in guesses)} == \
        {f"P{i:04d}" for i in range(300)}


def test_the_key_never_goes_into_the_model_file(files):
    folder, _ = files
    key = identifier_key()
    raw = (folder / "m.json").read_bytes()
    assert key is not None and key.hex() not in raw.decode() and key not in raw
    assert json.loads(raw)["derivation_ids"]["key_id"] == key_id(key)


def test_the_fingerprint_does_not_depend_on_the_key(files):
    _, model = files
    data = json.loads(model.to_json())
    data["derivation_ids"]["key_id"] = "0" * 12
    data["derivation_ids"]["digests"] = sorted("f" * 15 + c for c in "0123456789abcdef")
    other = TreeModel.from_dict(data)
    assert other.fingerprint == model.fingerprint
    without = {k: v for k, v in data.items() if k not in ("findings", "validation",
                                                           "derivation_ids")}
    assert model.fingerprint == hashlib.sha256(json.dumps(
        without, sort_keys=True, separators=(",", ":"), ensure_ascii=False).encode()).hexdigest()


def test_a_check_recorded_before_the_digests_left_the_fingerprint_still_counts(files):
    folder, model = files
    result = check_table(model, read_table(folder / "external.csv"))
    data = json.loads(with_check(model, result).to_json())
    data["validation"]["model_fingerprint"] = model.fingerprint_with_digests
    assert TreeModel.from_dict(data).recorded_check is not None
    assert model.is_named_by(model.fingerprint_with_digests)


@pytest.fixture
def another_computer(tmp_path, monkeypatch):
    """This computer with another key (a tree grown elsewhere), made before the check."""
    monkeypatch.setenv("PRUNELLA_IDENTIFIER_KEY_FILE", str(tmp_path / "other_key"))
    identifier_key(create=True)


ELSEWHERE = "can only be checked on the computer the tree was grown on"


def _assert_not_known(result):
    assert result.separate is None and result.overlap_patients == 0
    assert sum(ELSEWHERE in w for w in result.warnings) == 1
    assert not any("separate patients" in w for w in result.warnings)
    record = result.to_model_record()
    assert record["overlap_known"] is False and "separate" not in record
    assert "overlap_patients" not in record
    assert result.to_dict()["separate"] is None


def test_on_another_computer_the_overlap_is_not_known(files, another_computer, tmp_path):
    folder, model = files
    result = check_table(model, read_table(folder / "external.csv"))
    _assert_not_known(result)
    assert result.n == 140  # the check itself is done as before
    checked = with_check(model, result)
    sections = chart_text(checked, ChartOptions().checked()).sections
    titles = [s.title for s in sections]
    assert "Checked on separate patients" not in titles
    assert "Checked on other patients" in titles
    words = " ".join(i.text for s in sections for i in s.items)
    assert "include derivation patients is not known" in words
    # Leaving out the overlap cannot leave anyone out here, and does not claim separateness.
    left = check_table(model, read_table(folder / "external.csv"), leave_out_overlap=True)
    _assert_not_known(left)
    assert left.n == 140


def test_command_line_on_another_computer(files, another_computer, tmp_path):
    folder, _ = files
    ran = prunella("check", folder / "m.json", folder / "external.csv", "--out",
                   tmp_path / "c.json", "--checked-model", tmp_path / "checked.json")
    assert ran.returncode == 0, ran.stderr
    assert ran.stdout.count(ELSEWHERE) == 1
    assert "separate patients" not in ran.stdout
    record = json.loads((tmp_path / "c.json").read_text())
    assert record["separate"] is None and record["overlap_patients"] is None
    saved = json.loads((tmp_path / "checked.json").read_text())["validation"]
    assert saved["overlap_known"] is False and "separate" not in saved
    assert TreeModel.load(tmp_path / "checked.json").recorded_check is not None


def test_with_the_key_removed_the_overlap_is_not_known(files, tmp_path, monkeypatch):
    folder, model = files
    monkeypatch.setenv("PRUNELLA_IDENTIFIER_KEY_FILE", str(tmp_path / "none" / "key"))
    _assert_not_known(check_table(model, read_table(folder / "external.csv")))
    assert not (tmp_path / "none").exists()  # checking never makes a key


def test_an_earlier_salted_model_is_never_matched(files, tmp_path):
    folder, model = files
    data = json.loads(model.to_json())
    salt = data["data"]["sha256"][:16]
    data["derivation_ids"] = {"column": "pid", "salt": salt, "digests": sorted(
        _old_digest(salt, f"P{i:04d}") for i in range(300))}
    old = TreeModel.from_dict(data)
    result = check_table(old, read_table(folder / "external.csv"))
    assert result.separate is None and result.overlap_patients == 0
    assert sum("earlier Prunella" in w for w in result.warnings) == 1
    assert not any(ELSEWHERE in w for w in result.warnings)
    (tmp_path / "old.json").write_text(old.to_json())
    ran = prunella("check", tmp_path / "old.json", folder / "external.csv")
    assert ran.returncode == 0, ran.stderr
    assert ran.stdout.count("earlier Prunella") == 1


@pytest.mark.parametrize("change, field", [
    ({"format": "sha1/1"}, "derivation_ids.format"),
    ({"key_id": 7}, "derivation_ids.key_id"),
    ({"format": "hmac-sha256/1", "key_id": None}, "derivation_ids.key_id"),
])
def test_a_tampered_digest_record_is_refused_naming_its_field(files, change, field):
    from core.errors import InputError

    _, model = files
    data = json.loads(model.to_json())
    data["derivation_ids"].update(change)
    with pytest.raises(InputError, match=field.replace(".", r"\.")):
        TreeModel.from_dict(data)
