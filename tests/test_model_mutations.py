"""Random mutations of a real model file (issue 15, items 4 and 5): whatever is changed, every
command either works or refuses in one sentence, with no traceback and the files untouched.

The model is fitted by the real command line on an invented cohort
(tests/test_tampered_models.py), then checked on it, so the file holds every record Prunella
writes (settings, data, cohort, costs, digests, findings, a check). Each example changes one to
three fields: a value swapped for one of another JSON type, numbers made huge, negative, zero,
NaN or infinite, a field removed, a text made very long, a value nested deep. ``chart``,
``score``, ``check`` and ``report`` run on it in this process. The file's limits are what keep
each run short (ten million repeats, a 100,000-character label or 10**18 boxes are refused
before any work), so no time is asserted: a run that did not stop would hang the suite.

A file the loader refuses must be refused by every command with the loader's own sentence, so
no command accepts a file another refuses.
"""

from __future__ import annotations

import copy
import json
import os
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

from core.errors import InputError
from core.model import TreeModel
from tests.helpers import prunella, sha256_of
from tests.test_tampered_models import command_args, fit_small_model

pytestmark = pytest.mark.slow  # about a minute on a shared machine; still in the default run

MUTATIONS = settings(deadline=None, database=None, derandomize=True,
                     suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large,
                                            HealthCheck.function_scoped_fixture])


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    folder = tmp_path_factory.mktemp("mutations")
    data, model = fit_small_model(folder)
    checked = folder / "checked.json"
    ran = prunella("check", model, data, "--source", "the same invented visits",
                   "--checked-model", checked)
    assert ran.returncode == 0, ran.stderr
    document = json.loads(checked.read_text(encoding="utf-8"))
    assert {"settings", "cohort", "costs", "derivation_ids", "validation"} <= set(document)
    return folder, data, document


def _paths(value, prefix=()):
    """Every field's path, long lists sampled (their items are alike)."""
    yield prefix
    if isinstance(value, dict):
        for key, item in value.items():
            yield from _paths(item, prefix + (key,))
    elif isinstance(value, list):
        for index, item in list(enumerate(value))[:4] + list(enumerate(value))[-1:]:
            yield from _paths(item, prefix + (index,))


def _nested(depth: int):
    value: list = [1]
    for _ in range(depth):
        value = [value]
    return value


# What a field becomes: another JSON type, a huge, negative, zero or not-a-number value, a very
# long text, a deep nest, or (None below) nothing at all: the field is removed.
REPLACEMENTS = st.one_of(
    st.sampled_from(["", "x", "12", "yes", "above", "in", "1se", [], {}, [1, 2], ["a"],
                     {"a": 1}, True, False, None, 0, 1, 2, -1, 0.5, -0.5]),
    st.sampled_from([10**7, 10**9, 10**18, 10**400, 1e308, -10**9, -1e308]),
    st.sampled_from([float("nan"), float("inf"), float("-inf")]),
    st.integers(-10**12, 10**12),
    st.floats(allow_nan=True, allow_infinity=True),
    st.text(max_size=12),
    st.integers(1_001, 200_000).map(lambda n: "é" * n),
    st.integers(15, 400).map(_nested),
)


def _texts_of(value) -> list[str]:
    if isinstance(value, str):
        return [value]
    items = value.values() if isinstance(value, dict) else value if isinstance(value, list) \
        else ()
    return [t for item in items for t in _texts_of(item)]


def _nudged(draw, value, texts: list[str]):
    """A value of the same type that no longer fits the rest of the file: a number one more,
    ten times or of the other sign, another text of the file, a list one item short or with
    an item twice."""
    if isinstance(value, bool):
        return not value
    if isinstance(value, (int, float)):
        third = value // 3 if isinstance(value, int) else value / 3  # ints of any size
        return draw(st.sampled_from([value + 1, value - 1, value * 10, -value, third]))
    if isinstance(value, str):
        return draw(st.sampled_from(texts))
    if isinstance(value, list) and value:
        return draw(st.sampled_from([value[:-1], value + value[-1:], value[::-1]]))
    if isinstance(value, dict) and value:
        key = draw(st.sampled_from(sorted(value)))
        return {k: v for k, v in value.items() if k != key}
    return value


@st.composite
def mutated(draw, document):
    changed = copy.deepcopy(document)
    paths = [p for p in _paths(changed) if p]
    texts = sorted(set(_texts_of(document)))[:200]
    for _ in range(draw(st.integers(1, 3))):
        path = draw(st.sampled_from(paths))
        parent = changed
        try:
            for key in path[:-1]:
                parent = parent[key]
            how = draw(st.sampled_from(["remove", "replace", "replace", "nudge", "nudge"]))
            if how == "remove" and isinstance(parent, dict):
                parent.pop(path[-1], None)
            elif how == "nudge":
                parent[path[-1]] = _nudged(draw, parent[path[-1]], texts)
            else:
                parent[path[-1]] = draw(REPLACEMENTS)
        except (KeyError, IndexError, TypeError):
            continue
    return changed


def _write(folder: Path, document: dict, number: list) -> Path:
    number[0] += 1
    target = folder / f"mutant-{number[0]}.json"
    # allow_nan: NaN and Infinity reach the file as a hand edit would write them.
    target.write_text(json.dumps(document, allow_nan=True), encoding="utf-8")
    return target


def _state(paths) -> dict:
    return {str(p): (sha256_of(p), os.stat(p).st_mtime_ns) for p in paths}


def _one_sentence(ran) -> str:
    last = ran.stderr.strip().splitlines()[-1]
    assert last.startswith("prunella: ") and "Traceback" not in ran.stderr, ran.stderr
    assert last.endswith((".", ")")), last
    return last


COUNTER = [0]


@given(data=st.data())
@settings(MUTATIONS, max_examples=300)
def test_every_command_works_or_refuses_a_mutated_model_in_one_sentence(files, data):
    folder, table, document = files
    target = _write(folder, data.draw(mutated(document)), COUNTER)
    try:
        TreeModel.load(target)
        refusal = None
    except InputError as exc:
        refusal = str(exc)
    before = _state([target, table])
    # report grows the tree again (seconds): it runs on every refused file and on one in
    # four that load, which keeps the file near a minute on a shared machine.
    commands = ("chart", "score", "check", "report") if refusal is not None or \
        data.draw(st.integers(0, 3)) == 0 else ("chart", "score", "check")
    for command in commands:
        # tests.helpers.prunella fails the test if any traceback escapes
        ran = prunella(*command_args(command, target, table))
        assert ran.returncode in (0, 2), (command, ran.returncode, ran.stderr)
        if ran.returncode == 2:
            last = _one_sentence(ran)
            if refusal is not None:  # the loader's sentence, the same in every command
                assert last == f"prunella: {refusal}", (command, last, refusal)
        else:
            assert refusal is None, (command, refusal)
    assert _state([target, table]) == before


def test_the_mutations_reach_every_record(files):
    """The strategy can touch every record of the file, down to the boxes' questions."""
    _, _, document = files
    reached = {p[0] for p in _paths(document) if p}
    assert {"nodes", "path", "chosen", "settings", "cohort", "costs", "validation",
            "derivation_ids", "predictors"} <= reached
    assert ("nodes", 0, "split", "kind") in set(_paths(document))
