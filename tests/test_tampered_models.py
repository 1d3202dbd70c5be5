"""Tampered or inconsistent model files (issue 15, items 4 and 5): one checker of the whole
document (core/model/file_checks.py) runs first in every command, so `chart`, `score`,
`check` and `report` refuse the same files with the same sentence, naming the field by its
path (``nodes[3].counts``), with exit status 2, no traceback, and every input byte-identical
(SHA-256 and modification time). Limits on what a file may ask for (repeats, folds, texts,
boxes, nesting) are refused the same way, before any work.

The cohort is invented here (numbers drawn from a seeded generator, no real patients).
"""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import numpy as np
import pytest

from core.errors import InputError
from core.model import TreeModel
from tests.helpers import prunella, sha256_of
from tests.test_hostile_inputs import refused, state

COMMANDS = ("chart", "score", "check", "report")


def invented_visits(n: int = 200, seed: int = 7) -> str:
    """Invented visits as CSV text: admission more likely with low SpO2 and when brought
    in by ambulance or transfer, so the tree asks both a number and a category question."""
    rng = np.random.default_rng(seed)
    spo2 = rng.integers(84, 101, n)
    resp = rng.integers(10, 40, n)
    arrival = rng.choice(["ambulance", "walked in", "GP referral", "transfer"], n)
    risk = 0.1 + 0.45 * (spo2 <= 91) + 0.35 * np.isin(arrival, ["ambulance", "transfer"])
    admitted = np.where(rng.random(n) < risk, "yes", "no")
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(["patient_id", "spo2", "resp_rate", "arrival", "admitted"])
    for i in range(n):
        writer.writerow([f"P{i:04d}", int(spo2[i]), int(resp[i]), arrival[i], admitted[i]])
    return buffer.getvalue()


def fit_small_model(folder: Path) -> tuple[Path, Path]:
    """The invented cohort and a model fitted on it by the real command line."""
    data = folder / "visits.csv"
    data.write_text(invented_visits(), encoding="utf-8")
    model = folder / "tree.json"
    ran = prunella("fit", data, "--outcome", "admitted", "--patient-id", "patient_id",
                   "--folds", "3", "--model", model, "--quiet")
    assert ran.returncode == 0, ran.stderr
    return data, model


def command_args(command: str, model: Path, data: Path) -> list:
    out = model.parent / "out"
    return {"chart": ["chart", model, "--out", out.with_suffix(".pdf")],
            "score": ["score", model, data, "--out", out.with_suffix(".csv")],
            "check": ["check", model, data],
            "report": ["report", model, data, "--out", out.with_suffix(".pdf"), "--no-nested",
                       "--bootstrap", "0"]}[command]


@pytest.fixture(scope="module")
def fitted(tmp_path_factory):
    return fit_small_model(tmp_path_factory.mktemp("tampered"))


def _box(raw: dict, kind: str | None = None, leaf: bool = False) -> int:
    """The index of the first question box of ``kind`` (or the first outcome box)."""
    for index, node in enumerate(raw["nodes"]):
        if leaf and not node.get("children"):
            return index
        if not leaf and node.get("split", {}).get("kind") == kind:
            return index
    raise AssertionError("the invented tree lacks such a box")


def _set(raw, path, value):
    *parents, last = path
    for key in parents:
        raw = raw[key]
    raw[last] = value


def _counts_disagree(raw):
    i = _box(raw, leaf=True)
    raw["nodes"][i]["counts"][0] += 1
    return f"nodes[{i}].counts"


def _category_question_above(raw):
    i = _box(raw, "in")
    raw["nodes"][i]["split"].update(kind="above", threshold=2.5, yes_levels=[], no_levels=[])
    return f"nodes[{i}].split.kind"


def _number_question_in(raw):
    i = _box(raw, "above")
    raw["nodes"][i]["split"].update(kind="in", threshold=None, yes_levels=["90"])
    return f"nodes[{i}].split.kind"


def _children_disagree(raw):
    i = _box(raw, leaf=True)
    node = raw["nodes"][i]
    node["n"] += 5
    node["counts"][0] += 5
    return "nodes["  # the parent's n (or the leaf's) is named, whichever is met first


def _replace(path, value):
    def tamper(raw):
        _set(raw, path, value)
        return ".".join(str(p) if isinstance(p, str) else f"[{p}]" for p in path
                        ).replace(".[", "[")
    return tamper


def _deep(raw):
    nested: list = []
    for _ in range(60):
        nested = [nested]
    raw["extra_notes"] = nested
    return "nested more than"


def _many_boxes(raw):
    raw["nodes"] = [{"id": i + 1} for i in range(100_001)]
    return "nodes"


# Each case: how the file is tampered with, and the path (or words) the refusal names.
CASES = {
    "counts of the wrong type": lambda raw: _replace(
        ("nodes", _box(raw, leaf=True), "counts"), ["12", 3])(raw),
    "counts that disagree with n": _counts_disagree,
    "children that do not share the parent's patients": _children_disagree,
    "chosen size as a text": _replace(("chosen", "leaves"), "7"),
    "chosen error as a text": _replace(("chosen", "cv_risk"), "low"),
    "chosen size off the path": lambda raw: _replace(("chosen", "leaves"),
                                                     raw["chosen"]["leaves"] + 1)(raw),
    "cohort as a list": _replace(("cohort",), []),
    "cohort visits as a text": _replace(("cohort", "visits"), "many"),
    "validation as a text": _replace(("validation",), "checked"),
    "validation count as a text": _replace(("validation",), {"n": "lots", "summary": "ok"}),
    "costs as a word": _replace(("costs", "loss"), "unit"),
    "costs of one class": _replace(("costs", "priors"), [0.5]),
    "an 'above' question on a category": _category_question_above,
    "an 'in' question on a number": _number_question_in,
    "settings without their design": lambda raw: (raw["settings"].pop("design"),
                                                  "settings.design")[1],
    "settings for another outcome": _replace(("settings", "design", "outcome"), "spo2"),
    "settings without a predictor": lambda raw: (raw["settings"]["design"]["predictors"].pop(),
                                                 "settings.design.predictors")[1],
    "ten million repeats": _replace(("settings", "cv", "repeats"), 10_000_000),
    "a million folds": _replace(("settings", "cv", "folds"), 1_000_000),
    "min leaf zero": _replace(("settings", "tree", "min_leaf"), 0),
    "a label of 2,000 characters": _replace(("predictors", 0, "label"), "x" * 2_000),
    "a 2 MB label": _replace(("outcome_spec", "label"), "y" * 2_000_000),
    "a level of 5,000 characters": lambda raw: _replace(
        ("nodes", _box(raw, "in"), "split", "yes_levels", 0), "z" * 5_000)(raw),
    "nesting 60 deep": _deep,
    "more than 100,000 boxes": _many_boxes,
    "derivation digests as a number": _replace(("derivation_ids", "digests"), 5),
    "the findings as a text": _replace(("findings",), "none"),
}


def _tampered_file(model: Path, name: str) -> tuple[Path, str]:
    raw = json.loads(model.read_text(encoding="utf-8"))
    raw.setdefault("validation", {"n": 10, "source": "a test", "summary": "fine"})
    named = CASES[name](raw)
    target = model.parent / ("tampered-" + name.replace(" ", "-").replace("'", "")[:40]
                             + ".json")
    target.write_text(json.dumps(raw), encoding="utf-8")
    return target, named


@pytest.mark.parametrize("name", sorted(CASES))
def test_every_command_refuses_a_tampered_model_with_the_same_sentence(fitted, name):
    data, model = fitted
    tampered, named = _tampered_file(model, name)
    said = set()
    for command in COMMANDS:
        before = state([tampered, data])
        last = refused(command_args(command, tampered, data), [tampered.name, named],
                       inputs=[tampered, data])
        assert state([tampered, data]) == before
        said.add(last)
    assert len(said) == 1, said  # one checker: the same sentence from every command
    # The sentence is the catalogue's: where, what is wrong and what to do.
    assert "save the model again from Prunella" in said.pop()


def test_the_checker_names_the_box_beside_the_path(fitted):
    _, model = fitted
    raw = json.loads(model.read_text(encoding="utf-8"))
    raw["nodes"][3]["counts"] = "many"
    with pytest.raises(InputError, match=r"damaged at nodes\[3\]\.counts \(box 4\): it must be "
                                         r"a list"):
        TreeModel.from_dict(raw, "tree.json")


def test_the_untouched_model_works_in_every_command(fitted):
    data, model = fitted
    before = state([model, data])
    for command in COMMANDS:
        ran = prunella(*command_args(command, model, data))
        assert ran.returncode == 0, (command, ran.stderr)
    assert state([model, data]) == before


def test_a_bare_model_prints_but_report_needs_its_settings(fitted):
    """A file without settings, cohort, data or costs (hand-made or old) is not damaged: the
    chart, score and check use it; report says it cannot rerun the derivation."""
    data, model = fitted
    raw = json.loads(model.read_text(encoding="utf-8"))
    for key in ("settings", "cohort", "data", "costs", "derivation_ids", "findings"):
        raw.pop(key, None)
    bare = model.parent / "bare.json"
    bare.write_text(json.dumps(raw), encoding="utf-8")
    for command in ("chart", "score", "check"):
        ran = prunella(*command_args(command, bare, data))
        assert ran.returncode == 0, (command, ran.stderr)
    refused(command_args("report", bare, data), ["no derivation settings"],
            inputs=[bare, data])


def test_a_null_record_is_refused_where_an_absent_one_is_read_as_its_default(fitted):
    _, model = fitted
    raw = json.loads(model.read_text(encoding="utf-8"))
    for key in ("cohort", "data", "settings", "findings"):
        broken = dict(raw, **{key: None})
        with pytest.raises(InputError, match=rf"damaged at {key}: it is null"):
            TreeModel.from_dict(broken, "tree.json")


def test_a_child_process_refuses_ten_million_repeats_at_once(fitted, tmp_path):
    from tests.helpers import run_prunella

    data, model = fitted
    tampered, _ = _tampered_file(model, "ten million repeats")
    before = sha256_of(tampered)
    ran = run_prunella(*command_args("report", tampered, data), timeout=120)
    assert ran.returncode == 2 and "Traceback" not in ran.stderr
    assert ran.stderr.strip().splitlines()[-1].startswith("prunella: The model file")
    assert "settings.cv.repeats" in ran.stderr and "from 1 to 100" in ran.stderr
    assert sha256_of(tampered) == before


# --- fit never writes a model that the checker refuses -----------------------------------------


def test_a_header_too_long_for_a_model_file_is_refused_when_read(tmp_path):
    text = invented_visits().replace("resp_rate", "resp_rate " + "x" * 1_500, 1)
    data = tmp_path / "long-header.csv"
    data.write_text(text, encoding="utf-8")
    refused(["fit", data, "--outcome", "admitted", "--model", tmp_path / "m.json"],
            ["long-header.csv", "header of column", "1,510 characters", "shorten it"],
            inputs=[data])
    assert not (tmp_path / "m.json").exists()


def test_a_category_with_very_long_texts_is_left_out_and_the_model_prints(tmp_path):
    lines = invented_visits().splitlines()
    lines[0] += ",remark"
    lines[1:] = [f"{line},{'stable ' * 200 if i % 2 else 'fine'}" for i, line in
                 enumerate(lines[1:])]
    data = tmp_path / "remarks.csv"
    data.write_text("\n".join(lines) + "\n", encoding="utf-8")
    model = tmp_path / "m.json"
    ran = prunella("fit", data, "--outcome", "admitted", "--folds", "3", "--model", model)
    assert ran.returncode == 0, ran.stderr
    assert "'remark' holds texts of up to 1,399 characters" in ran.stderr
    assert "remark" not in [p["name"] for p in json.loads(model.read_text())["predictors"]]
    assert prunella("chart", model, "--out", tmp_path / "c.pdf").returncode == 0


def test_a_dictionary_label_too_long_for_a_model_file_is_refused_before_growing(tmp_path):
    data = tmp_path / "visits.csv"
    data.write_text(invented_visits(), encoding="utf-8")
    dictionary = tmp_path / "visits.dictionary.json"
    dictionary.write_text(json.dumps({"format": "prunella-dictionary/1", "columns": [
        {"name": "spo2", "label": "Oxygen saturation " * 100, "kind": "numeric"}]}),
        encoding="utf-8")
    refused(["fit", data, "--outcome", "admitted", "--model", tmp_path / "m.json"],
            ["label for 'spo2'", "1,800 characters", "shorten it in the dictionary"],
            inputs=[data, dictionary])
    assert not (tmp_path / "m.json").exists()


# --- a file's large tree is sized and refused in seconds ----------------------------------------


def _complete_tree(model: Path, depth: int, target: Path) -> Path:
    """The fitted file with its tree replaced by a complete tree of 2**depth outcome boxes,
    each question box collapsing at its own α (1/box number), as a hand-made or foreign file
    may hold: every one of its 2**depth - 1 prunings is a distinct size."""
    raw = json.loads(model.read_text(encoding="utf-8"))
    total, leaves = 2 ** (depth + 1) - 1, 2 ** depth
    nodes = []
    for i in range(1, total + 1):
        level = i.bit_length() - 1
        below = 2 ** (depth - level)
        node = {"id": i, "leaf": level == depth, "depth": level, "n": 2 * below,
                "children": [] if level == depth else [2 * i, 2 * i + 1],
                "counts": [below, below], "prediction": "no"}
        if level < depth:
            node["split"] = {"column": "spo2", "kind": "above", "threshold": 90.0,
                             "missing_goes": None, "missing_in_derivation": 0}
        nodes.append(node)
    raw.update(nodes=nodes, n_rows=2 * leaves, columns_asked=["spo2"])
    raw["path"] = {"leaves": [leaves, 1], "cv_risk": [0.5, 0.5], "cv_se": [0.01, 0.01],
                   "train_risk": [0.4, 0.5], "collapse_alpha": [
                       None if n["leaf"] else 1.0 / n["id"] for n in nodes]}
    raw["chosen"] = {"leaves": leaves, "rule": "user", "cv_risk": 0.5, "cv_se": 0.01,
                     "train_risk": 0.4, "one_box_cv_risk": 0.5, "better_than_no_tree": False}
    raw["cohort"] = {"visits": 2 * leaves, "outcome_counts": {"no": leaves, "yes": leaves}}
    for key in ("validation", "derivation_ids", "findings"):
        raw.pop(key, None)
    target.write_text(json.dumps(raw), encoding="utf-8")
    return target


def test_every_pruning_of_a_file_s_tree_is_sized_as_the_boxes_say(fitted, tmp_path):
    from core.chart.fitting import _leaf_count, recorded_collapse, smaller_trees

    _, model = fitted
    tree = TreeModel.load(_complete_tree(model, 8, tmp_path / "complete.json"))
    collapse = recorded_collapse(tree)
    # Each pruning counted box by box, as the chart counts one tree, largest first.
    expected, seen = [], set()
    for alpha in sorted({0.0} | set(collapse.values())):
        collapsed = frozenset(b for b, at in collapse.items() if at <= alpha)
        leaves = _leaf_count(tree, collapsed)
        if leaves not in seen:
            seen.add(leaves)
            expected.append((leaves, collapsed))
    assert smaller_trees(tree) == expected and len(expected) == 256
    assert smaller_trees(tree, most=20) == [expected[0]] + [t for t in expected if t[0] <= 20]
    real = TreeModel.load(model)  # the fitted tree's own prunings, counted both ways
    assert [n for n, _ in smaller_trees(real)] == [
        _leaf_count(real, c) for _, c in smaller_trees(real)]


def test_a_file_s_tree_of_thousands_of_boxes_is_refused_by_the_chart_at_once(fitted, tmp_path):
    """2**12 outcome boxes with 4,095 distinct prunings: refused in seconds (it took minutes
    when every pruning was counted box by box and every page arrangement was tried)."""
    _, model = fitted
    big = _complete_tree(model, 12, tmp_path / "big.json")
    refused(["chart", big, "--out", tmp_path / "c.pdf"],
            ["4096 outcome boxes", "does not fit", "largest tree of its pruning sequence that "
             "fits has 9 outcome boxes"], inputs=[big])
    refused(["chart", big, "--out", tmp_path / "c.pdf", "--form", "rules"],
            ["numbered rules", "4096 outcome boxes"], inputs=[big])
