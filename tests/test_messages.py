"""The catalogue of messages, the code that raises them and the README table stay in step."""

from __future__ import annotations

import ast
import re
import string
from pathlib import Path

import pytest

from core.messages.message import catalogue, distinct_messages, explain, markdown_table, say

ROOT = Path(__file__).resolve().parents[1]
CORE = ROOT / "core"
# Modules whose own wording is listed in the catalogue (entries with a source).
WORDED_ELSEWHERE = ("design/analysis.py", "sizing/derivation.py", "sizing/folds.py",
                    "sizing/grow.py", "sizing/cross_validated_path.py", "cli/common.py",
                    "cli/fit.py", "cli/checking.py", "cli/chart.py", "model/tree.py",
                    "dictionary/columns.py", "dictionary/typed_columns.py",
                    "checking/new_patients.py", "checking/nested.py",
                    "checking/stability.py", "chart/options.py")


def _shape(node) -> str:
    if isinstance(node, ast.Constant) and isinstance(node.value, str):
        return node.value
    if isinstance(node, ast.JoinedStr):
        return "".join(v.value if isinstance(v, ast.Constant) else "{}" for v in node.values)
    if isinstance(node, ast.BinOp) and isinstance(node.op, ast.Add):
        return _shape(node.left) + _shape(node.right)
    return "{}"


def _normal(shape: str) -> str:
    return re.sub(r"(\{\})+", "{}", shape)


def _calls(path: Path):
    """(kind, first argument) of every say(), InputError() and notes/warnings.append()."""
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if not isinstance(node, ast.Call) or not node.args:
            continue
        func = node.func
        name = getattr(func, "id", None)
        if name == "say":
            yield "say", node.args[0]
        elif name == "InputError":
            yield "raise", node.args[0]
        elif isinstance(func, ast.Attribute) and func.attr == "append" and \
                getattr(func.value, "id", "") in ("notes", "warnings"):
            yield "note", node.args[0]


def _source_shapes(module: str) -> set[str]:
    shapes = set()
    for kind, arg in _calls(CORE / module):
        if kind != "say" and not (isinstance(arg, ast.Call) and getattr(arg.func, "id", "") == "say"):
            shape = _normal(_shape(arg))
            if shape.replace("{}", "").strip():
                shapes.add(shape)
    return shapes


def test_every_code_used_in_core_is_in_the_catalogue_and_every_entry_is_used():
    kinds = catalogue()
    said, mentioned = set(), set()
    for path in CORE.rglob("*.py"):  # packages too (core/chart, core/cli)
        if path.parent.name == "messages":
            continue
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for kind, arg in _calls(path):
            if kind == "say" and isinstance(arg, ast.Constant):
                said.add(arg.value)
        mentioned |= {n.value for n in ast.walk(tree) if isinstance(n, ast.Constant)
                      and isinstance(n.value, str) and n.value in kinds}
    assert said <= set(kinds), sorted(said - set(kinds))
    own = {code for code, kind in kinds.items() if not kind.source}
    assert own <= mentioned, f"catalogue entries no code uses: {sorted(own - mentioned)}"


@pytest.mark.parametrize("module", WORDED_ELSEWHERE)
def test_messages_worded_in_other_modules_are_listed_as_written(module):
    listed = {_normal(k.shape()) for k in catalogue().values() if k.source == f"core/{module}"}
    in_source = _source_shapes(module)
    missing = in_source - listed
    assert not missing, f"add these messages of core/{module} to core/messages/catalogue.py: " \
        f"{sorted(missing)}"
    stale = listed - in_source
    assert not stale, f"core/{module} no longer says: {sorted(stale)}"


def test_templates_are_well_formed_and_explain_finds_them():
    for code, kind in catalogue().items():
        names = [f for _, f, _, _ in string.Formatter().parse(kind.template) if f]
        sample = {n: ("" if n == "rows" else f"<{n}>") for n in names}
        text = kind.template.format(**sample)
        assert text.strip().endswith((".", ")", "?")) or kind.template.endswith("}"), code
        assert kind.advice.strip(), code
        found = explain(text)
        assert found is not None and found.code == code, code


def test_readme_holds_the_generated_table():
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    match = re.search(r"<!-- messages:start -->\n(.*?)<!-- messages:end -->", readme, re.S)
    assert match, "README.md lacks the messages table markers"
    assert match.group(1) == markdown_table(), \
        "README table is out of date: run `python -m core.messages` and paste its output"


def test_distinct_messages_keeps_the_version_with_rows():
    with_rows = say("values.limits", n=2, column="crp", example="<5", rows=" (rows 2 and 3)")
    without = say("values.limits", n=2, column="crp", example="<5", rows="")
    assert distinct_messages([without, with_rows, without]) == [with_rows]
    assert explain("prunella: " + with_rows).code == "values.limits"
    assert explain("something Prunella never says") is None


def test_app_wording_drops_only_what_the_command_line_needs():
    from core.messages import app_advice, app_wording

    leak = say("guard.leakage", column="bed_booked", outcome="admitted", evidence="ROC area 0.97")
    shown = app_wording(leak)
    assert "--exclude" not in shown and "command line" not in shown
    assert shown.endswith("leave it out of the predictors.")
    assert "Check when it is recorded" in shown
    assert app_wording("Pick another sheet (--sheet NAME).") == "Pick another sheet."
    repeats = say("guard.repeats_no_id", column="SpO2 (%)", patients=5, n_rows=12)
    assert app_wording(repeats) == ("'SpO2 (%)' repeats for 5 patient(s) (12 rows): these look "
                                    "like repeat visits. Set it as the patient identifier so "
                                    "cross-validation keeps each patient's rows together.")
    assert app_wording("Check the spelling of the path; on the command line put paths with "
                       "spaces in quotes.") == "Check the spelling of the path."
    assert app_wording("On the command line: --sheet NAME.") == ""
    assert app_wording("Keep (this) as it is.") == "Keep (this) as it is."
    # Advice: from the catalogue, without command-line-only or empty advice.
    assert "recorded after the decision" in app_advice(leak)
    grouped = say("guard.repeats_grouped", patients=3, n_rows=7, most=3, column="patient_id")
    assert app_advice(grouped) is None  # "Nothing to do."
    assert app_advice("something Prunella never says") is None
    for kind in catalogue().values():  # no advice the app shows names an option
        text = kind.template.format(**{n: "x" for _, n, _, _ in
                                       string.Formatter().parse(kind.template) if n})
        advice = app_advice(text)
        assert advice is None or "--" not in advice
