"""Property-based fuzzing: random bytes, random CSV text, random tables and damaged model files.

Whatever comes in, reading, dictionary inference, typing and model loading either work or
raise core.errors.InputError (one message for the user); any other exception is a bug.
Example counts are tuned so the file runs in well under a minute on one core.
"""

from __future__ import annotations

import copy
import datetime as dt
import math
import tempfile
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

from core.data import read_table
from core.dictionary import PREDICTOR_KINDS, infer_dictionary, typed_column
from core.errors import InputError
from core.model import TreeModel

FUZZ = settings(deadline=None, database=None, derandomize=True,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
_FOLDER = tempfile.TemporaryDirectory(prefix="prunella-fuzz-")
FOLDER = Path(_FOLDER.name)
COUNTER = iter(range(10**9))


def _fresh(suffix: str) -> Path:
    return FOLDER / f"case{next(COUNTER)}{suffix}"


def _read_and_infer(path: Path) -> None:
    try:
        table = read_table(path)
    except InputError as exc:
        assert str(exc).strip(), "an empty message"
        return
    assert len(table.frame) > 0 and table.frame.shape[1] > 0
    assert len(table.row_numbers) == len(table.frame)
    _infer_and_type(table.frame, table.row_numbers)


def _infer_and_type(frame: pd.DataFrame, rows=None) -> None:
    dictionary, notes = infer_dictionary(frame, rows)
    assert dictionary.names == tuple(str(c) for c in frame.columns)
    assert all(isinstance(n, str) and n for n in notes)
    for spec in dictionary.columns:
        if spec.kind in PREDICTOR_KINDS:
            try:
                typed = typed_column(frame[spec.name], spec)
            except InputError:
                continue
            length = len(typed.numbers if typed.numbers is not None else typed.codes)
            assert length == len(frame)


# --- random bytes ---------------------------------------------------------------------------

SIGNATURES = [b"", b"PK\x03\x04", b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1", b"\xef\xbb\xbf",
              b"\xff\xfe", b"%PDF-1.7", b"age,spo2\n", b"a;b\n1,5;2\n"]


@settings(FUZZ, max_examples=1500)
@given(prefix=st.sampled_from(SIGNATURES), body=st.binary(max_size=600),
       suffix=st.sampled_from([".csv", ".tsv", ".txt", ".xlsx", ".xls", ""]))
def test_random_bytes(prefix, body, suffix):
    path = _fresh(suffix)
    path.write_bytes(prefix + body)
    _read_and_infer(path)
    assert path.read_bytes() == prefix + body


# --- random CSV text ------------------------------------------------------------------------

CELLS = st.one_of(
    st.integers(-10**6, 10**6).map(str),
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.sampled_from(["", "NA", "n/a", "not recorded", "-99", "<5", ">100", "≥ 3", "1,234",
                     "7,5", "95%", "yes", "No", "Y", "TRUE", "f", "2024-01-03", "03/01/2024",
                     "3 Jan 2024", "1e400", "-inf", "#DIV/0!", '"', '""', "=1+1", " ",
                     "Hôpital", "年龄", "\t", "a\nb", "x,y", "p;q", "0001", "1.", ".5"]),
    st.text(max_size=8),
)
NAMES = st.one_of(st.sampled_from(["", "age", "age", "Unnamed: 0", " spo2 ", "1", "name",
                                   "e-mail", "dob", "x\ny"]), st.text(max_size=6))


@st.composite
def csv_documents(draw):
    width = draw(st.integers(1, 6))
    height = draw(st.integers(0, 25))
    header = draw(st.lists(NAMES, min_size=width, max_size=width))
    rows = draw(st.lists(st.lists(CELLS, min_size=0, max_size=width + 1), min_size=height,
                         max_size=height))
    delimiter = draw(st.sampled_from([",", ";", "\t", "|"]))
    quote = draw(st.booleans())
    ending = draw(st.sampled_from(["\n", "\r\n", "\r"]))

    def cell(text):
        if quote or any(ch in text for ch in (delimiter, '"', "\n", "\r")):
            return '"' + text.replace('"', '""') + '"'
        return text
    lines = [delimiter.join(cell(c) for c in row) for row in [header] + rows]
    if draw(st.booleans()):
        lines.insert(0, draw(st.sampled_from(["Audit 2024", "", "Report,,,"])))
    text = ending.join(lines) + draw(st.sampled_from(["", ending, ending * 3]))
    encoding = draw(st.sampled_from(["utf-8", "utf-8-sig", "cp1252", "utf-16", "latin-1"]))
    return text.encode(encoding, errors="replace") if encoding != "cp1252" else \
        text.encode("cp1252", errors="replace")


@settings(FUZZ, max_examples=700)
@given(document=csv_documents(), suffix=st.sampled_from([".csv", ".tsv", ".txt"]))
def test_random_csv_text(document, suffix):
    path = _fresh(suffix)
    path.write_bytes(document)
    _read_and_infer(path)
    assert path.read_bytes() == document


# --- random tables straight into inference --------------------------------------------------

VALUES = st.one_of(
    st.none(), st.booleans(), st.integers(-2**62, 2**62),
    st.floats(allow_nan=True, allow_infinity=True), CELLS,
    st.datetimes(min_value=dt.datetime(1900, 1, 1), max_value=dt.datetime(2100, 1, 1)),
    st.sampled_from([float("nan"), -0.0, 1e308, -1e308, 3.5e38, np.float32(2.5), np.int64(7)]),
)


@st.composite
def frames(draw):
    n = draw(st.integers(1, 40))
    width = draw(st.integers(1, 3))
    columns = {}
    for j in range(width):
        style = draw(st.sampled_from(["mixed", "float", "int", "text", "category"]))
        if style == "mixed":
            values = draw(st.lists(VALUES, min_size=n, max_size=n))
            columns[f"c{j}"] = pd.Series(values, dtype=object)
        elif style == "float":
            values = draw(st.lists(st.floats(allow_nan=True, allow_infinity=True), min_size=n,
                                   max_size=n))
            columns[f"c{j}"] = pd.Series(values, dtype="float64")
        elif style == "int":
            columns[f"c{j}"] = pd.Series(draw(st.lists(st.integers(-10**6, 10**6), min_size=n,
                                                       max_size=n)), dtype="int64")
        elif style == "text":
            columns[f"c{j}"] = pd.Series(draw(st.lists(CELLS, min_size=n, max_size=n)),
                                         dtype="str")
        else:
            columns[f"c{j}"] = pd.Series(draw(st.lists(st.sampled_from(["a", "b", None]),
                                                       min_size=n, max_size=n)),
                                         dtype="category")
    name = draw(st.sampled_from(["c0", "id", "patient_id", "email", "triage level", "campus"]))
    frame = pd.DataFrame(columns)
    return frame.rename(columns={"c0": name})


@settings(FUZZ, max_examples=800)
@given(frame=frames())
def test_random_tables_at_inference(frame):
    rows = np.arange(len(frame)) + 2
    _infer_and_type(frame, rows)


# --- damaged model files --------------------------------------------------------------------

JSON = st.recursive(st.one_of(st.none(), st.booleans(), st.integers(-3, 10**6),
                              st.floats(allow_nan=False, allow_infinity=False),
                              st.text(max_size=5)),
                    lambda inner: st.lists(inner, max_size=3) |
                    st.dictionaries(st.text(max_size=4), inner, max_size=3), max_leaves=8)


@pytest.fixture(scope="module")
def model_dict():
    from core.design import DesignSpec
    from core.sizing import CVSettings, DerivationRequest, derive

    rng = np.random.default_rng(0)
    n = 120
    spo2 = rng.integers(85, 101, n)
    frame = pd.DataFrame({"spo2": spo2, "mode": rng.choice(["a", "b", "c"], n),
                          "y": np.where((spo2 <= 91) ^ (rng.random(n) < 0.1), "yes", "no")})
    path = FOLDER / "model-data.csv"
    frame.to_csv(path, index=False)
    table = read_table(path)
    dictionary, _ = infer_dictionary(table.frame)
    request = DerivationRequest(DesignSpec("y", ("spo2", "mode")), cv=CVSettings(folds=3))
    return derive(table, dictionary, request).model.to_dict()


def _paths(value, prefix=()):
    yield prefix
    if isinstance(value, dict):
        for key, item in value.items():
            yield from _paths(item, prefix + (key,))
    elif isinstance(value, list):
        for index, item in enumerate(value):
            yield from _paths(item, prefix + (index,))


@given(data=st.data())
@settings(FUZZ, max_examples=400)
def test_damaged_models_only_raise_input_error(model_dict, data):
    damaged = copy.deepcopy(model_dict)
    paths = [p for p in _paths(damaged) if p]
    for _ in range(data.draw(st.integers(1, 3))):
        path = data.draw(st.sampled_from(paths))
        parent = damaged
        try:
            for key in path[:-1]:
                parent = parent[key]
            if data.draw(st.booleans()) and isinstance(parent, dict):
                parent.pop(path[-1], None)
            else:
                parent[path[-1]] = data.draw(JSON)
        except (KeyError, IndexError, TypeError):
            continue
    try:
        model = TreeModel.from_dict(damaged)
    except InputError:
        return
    # Whatever loads must route rows without failing.
    frame = pd.DataFrame({"spo2": [88.0, 95.0, math.nan], "mode": ["a", "zz", None]})
    try:
        model.apply(frame)
    except InputError:
        pass
