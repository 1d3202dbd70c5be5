"""Every message is worded once, in the catalogue, and said with its code; the README table is
generated from the catalogue."""

from __future__ import annotations

import ast
import json
import pickle
import re
import string
from pathlib import Path

import pytest

from core.errors import Cancelled, InputError
from core.messages import (
    Message, advice_for, app_advice, app_wording, distinct_messages, kind_of, kind_of_text,
    markdown_table, message_kinds, say,
)
from core.messages.message import PART

ROOT = Path(__file__).resolve().parents[1]
CORE = ROOT / "core"
MESSAGES = CORE / "messages"
# Lists whose items are messages for the user (notes and warnings of reading, the guards, …).
MESSAGE_LISTS = ("notes", "warnings", "messages")


def _core_modules(*also: Path):
    """(path, parsed module) of every module of core outside the catalogue's own package (and
    of the folders in ``also``)."""
    for path in sorted(CORE.rglob("*.py")) + sorted(p for d in also for p in d.rglob("*.py")):
        if MESSAGES not in path.parents:
            yield path, ast.parse(path.read_text(encoding="utf-8"))


def _is_say(node) -> bool:
    return isinstance(node, ast.Call) and getattr(node.func, "id", None) == "say"


def _called(node) -> str | None:
    func = node.func
    return func.id if isinstance(func, ast.Name) else getattr(func, "attr", None)


def _where(path: Path, node) -> str:
    return f"{path.relative_to(ROOT)}:{node.lineno}"


def test_every_error_in_core_is_raised_with_a_message_said_from_the_catalogue():
    wrong = []
    for path, tree in _core_modules():
        for node in ast.walk(tree):
            if not isinstance(node, ast.Call) or _called(node) not in ("InputError", "Cancelled"):
                continue
            if node.keywords or len(node.args) > 1:
                wrong.append(_where(path, node))
            elif node.args and not _is_say(node.args[0]):
                wrong.append(_where(path, node))
            elif not node.args and _called(node) == "InputError":
                wrong.append(_where(path, node))
    assert not wrong, "raise these with say(code, ...): " + ", ".join(wrong)


def test_notes_and_warnings_are_said_not_written_in_place():
    """A message list gets said messages (or messages passed on), never text worded there."""
    worded = (ast.Constant, ast.JoinedStr, ast.BinOp)
    wrong = []
    for path, tree in _core_modules():
        for node in ast.walk(tree):
            if not isinstance(node, ast.Call) or not isinstance(node.func, ast.Attribute):
                continue
            target = node.func.value
            if node.func.attr not in ("append", "insert") or \
                    getattr(target, "id", None) not in MESSAGE_LISTS:
                continue
            item = node.args[-1] if node.args else None
            if isinstance(item, worded):
                wrong.append(_where(path, node))
    assert not wrong, "say these from the catalogue: " + ", ".join(wrong)


def test_every_code_said_is_in_the_catalogue_and_every_entry_is_said():
    kinds = message_kinds()
    families = {code.split(".")[0] for code in kinds}
    said, mentioned, unknown = set(), set(), []
    for path, tree in _core_modules(ROOT / "gui"):  # the app's own messages are there too
        for node in ast.walk(tree):
            if _is_say(node):
                code = node.args[0]
                if isinstance(code, ast.Constant):
                    said.add(code.value)
            elif isinstance(node, ast.Constant) and isinstance(node.value, str):
                text = node.value
                if text in kinds:
                    mentioned.add(text)  # a code passed on, e.g. to the guards' findings
                elif re.fullmatch(r"[a-z]+(\.[a-z_0-9]+)+", text) and \
                        text.split(".")[0] in families and not text.endswith(".py"):
                    unknown.append(f"{path.relative_to(ROOT)}: {text}")
    assert said <= set(kinds), f"said but not in the catalogue: {sorted(said - set(kinds))}"
    assert not unknown, f"codes not in the catalogue: {unknown}"
    unused = set(kinds) - said - mentioned
    assert not unused, f"catalogue entries nothing says: {sorted(unused)}"


def test_templates_are_well_formed():
    for code, kind in message_kinds().items():
        names = [f for _, f, _, _ in string.Formatter().parse(kind.template) if f]
        sample = {n: ("" if n == "rows" else f"<{n}>") for n in names}
        text = kind.template.format(**sample)
        if kind.severity == PART:
            assert not kind.advice, f"{code}: a part takes the advice of its message"
            continue
        assert text.strip().endswith((".", ")", "?")) or kind.template.endswith("}"), code
        assert kind.advice.strip(), code
        assert kind_of_text(text).code == code, code  # the look-up by wording finds it too


def test_a_said_message_carries_its_code_wherever_it_goes():
    message = say("values.limits", n=2, column="crp", example="<5", rows=" (rows 2 and 3)")
    assert isinstance(message, str) and isinstance(message, Message)
    assert message == ("2 value(s) in crp written as limits (e.g. '<5') (rows 2 and 3) were "
                       "read as the limit itself; check that this is acceptable for crp.")
    assert message.code == "values.limits" and message.fields["column"] == "crp"
    assert kind_of(message).severity == "warning"
    assert advice_for(message).startswith("'<5' is read as 5")
    copy = pickle.loads(pickle.dumps(message))  # joblib's workers hand messages back pickled
    assert copy == message and copy.code == message.code
    assert json.loads(json.dumps([message])) == [str(message)]
    # An error raised with a message gives it back, code and all, as str(error).
    error = InputError(say("design.no_predictors"))
    assert str(error).code == "design.no_predictors" and kind_of(error).severity == "refused"
    assert str(Cancelled()).code == "work.cancelled"
    # The look-up is by code: the wording is not read.
    assert kind_of(Message("any wording at all", "guard.leakage")).code == "guard.leakage"
    assert kind_of("2 value(s) in crp written as limits (e.g. '<5') were read as the limit "
                   "itself; check that this is acceptable for crp.") is None
    assert kind_of_text("prunella: " + message).code == "values.limits"
    assert kind_of_text("something Prunella never says") is None


def test_readme_holds_the_generated_table():
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    match = re.search(r"<!-- messages:start -->\n(.*?)<!-- messages:end -->", readme, re.S)
    assert match, "README.md lacks the messages table markers"
    assert match.group(1) == markdown_table(), \
        "README table is out of date: run `python -m core.messages` and paste its output"
    parts = [k for k in message_kinds().values() if k.severity == PART]
    assert parts and not any(k.readable() in markdown_table() for k in parts)


def test_distinct_messages_keeps_the_version_with_rows():
    with_rows = say("values.limits", n=2, column="crp", example="<5", rows=" (rows 2 and 3)")
    without = say("values.limits", n=2, column="crp", example="<5", rows="")
    other = say("values.limits", n=2, column="ldh", example="<5", rows="")
    assert distinct_messages([without, with_rows, other, without]) == [with_rows, other]


def test_app_wording_drops_only_what_the_command_line_needs():
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


def test_app_advice_is_looked_up_by_code_and_by_wording_only_for_plain_text():
    leak = say("guard.leakage", column="bed_booked", outcome="admitted", evidence="ROC area 0.97")
    assert "recorded after the decision" in app_advice(leak)
    assert "recorded after the decision" in app_advice(InputError(leak))
    # By code: the wording is not read, so a message shown in other words keeps its advice.
    assert app_advice(Message("Leakage!", "guard.leakage")) == app_advice(leak)
    assert app_advice(Message("Probable leakage: 'x' on its own predicts 'y' almost perfectly "
                              "(z). Check when it is recorded.", "read.no_file")) == \
        app_advice(say("read.no_file", path="x"))
    # Plain text that lost its code (through a Qt signal) is found by its wording.
    assert app_advice(str(leak)) == app_advice(leak)
    grouped = say("guard.repeats_grouped", patients=3, n_rows=7, most=3, column="patient_id")
    assert app_advice(grouped) is None  # "Nothing to do."
    assert app_advice("something Prunella never says") is None
    for kind in message_kinds().values():  # no advice the app shows names an option
        if kind.severity == PART:
            continue
        fields = {n: "x" for _, n, _, _ in string.Formatter().parse(kind.template) if n}
        advice = app_advice(say(kind.code, **fields))
        assert advice is None or "--" not in advice


@pytest.mark.parametrize("family", sorted({c.split(".")[0] for c in message_kinds()}))
def test_every_family_of_codes_has_its_step_in_the_readme_table(family):
    from core.messages.readme_table import STEPS

    assert family in dict(STEPS), f"add the step of the '{family}' messages to STEPS"
