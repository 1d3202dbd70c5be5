"""Every message a user can meet, worded once: what is wrong, where, and what to do.

Core modules build their messages with :func:`say` from the catalogue in
``core/messages/catalogue.py``; messages raised by modules that word their own (e.g.
core/design/analysis.py) are listed there too, so the README table (``python -m core.messages``) covers
everything, and a test keeps the catalogue, the code and the README in step. The app can look
up any message it shows with :func:`explain` to offer the longer advice.
"""

from __future__ import annotations

import re
import string
from dataclasses import dataclass
from functools import lru_cache

from ..phrases import strip_rows_phrase

SEVERITIES = ("refused", "warning", "note")


@dataclass(frozen=True)
class MessageKind:
    """One kind of message: its code, how serious it is, its wording and the advice."""

    code: str
    severity: str  # "refused" (the step stops), "warning" (check this), "note" (for the record)
    template: str  # str.format template; fields in braces
    advice: str  # what to do, for the README table and the app's help
    source: str = ""  # module that words the message itself ("" = worded here)

    def pattern(self) -> re.Pattern:
        """A regular expression matching any message of this kind."""
        parts = []
        for literal, name, _, _ in string.Formatter().parse(self.template):
            parts.append(re.escape(literal))
            if name is not None:
                parts.append("(?:.|\n)*?")
        return re.compile("^" + "".join(parts) + "$")

    def shape(self) -> str:
        """The template with every field written as '{}' (to compare with source code)."""
        out = []
        for literal, name, _, _ in string.Formatter().parse(self.template):
            out.append(literal)
            if name is not None:
                out.append("{}")
        return "".join(out)

    def readable(self) -> str:
        """The template as the README shows it: fields in ‹angle quotes›."""
        out = []
        for literal, name, _, _ in string.Formatter().parse(self.template):
            out.append(literal)
            if name is not None:
                out.append(" (rows …)" if name == "rows" else f"‹{name}›")
        return "".join(out)


def _catalogue() -> dict[str, MessageKind]:
    from .catalogue import ENTRIES

    kinds = {}
    for entry in ENTRIES:
        kind = MessageKind(*entry)
        if kind.code in kinds:
            raise RuntimeError(f"message code {kind.code} is listed twice")
        if kind.severity not in SEVERITIES:
            raise RuntimeError(f"message {kind.code}: unknown severity {kind.severity}")
        kinds[kind.code] = kind
    return kinds


@lru_cache(maxsize=1)
def catalogue() -> dict[str, MessageKind]:
    """All message kinds by code."""
    return _catalogue()


def say(code: str, /, **fields) -> str:
    """The message ``code`` with its fields filled in."""
    return catalogue()[code].template.format(**fields)


def explain(message: str) -> MessageKind | None:
    """The catalogue entry a message text belongs to (None if it is not in the catalogue)."""
    text = message.strip()
    for prefix in ("prunella: ", "warning: ", "note: "):
        if text.startswith(prefix):
            text = text[len(prefix):]
    best = None
    for kind in catalogue().values():
        if kind.pattern().match(text):
            literal = len(kind.shape().replace("{}", ""))
            if best is None or literal > best[0]:
                best = (literal, kind)
    return None if best is None else best[1]


# What only the command line needs: its options in brackets, or a clause about it.
_CLI_BRACKETS = re.compile(r"\s*\((?:on the command line:?\s*)?--[^()]*(?:\([^()]*\)[^()]*)*\)",
                           re.I)  # one level of brackets inside, e.g. a column "SpO2 (%)"
_CLI_CLAUSE = re.compile(r"\s*;\s*on the command line\b[^.;]*", re.I)
_CLI_SENTENCE = re.compile(r"(?:^|(?<=[.!?])\s+)On the command line\b[^.]*\.?", re.I)


def app_wording(text: str) -> str:
    """A message or advice as the app shows it: without the command line's options
    ("(on the command line: --exclude crp)", "(--sheet NAME)", "; on the command line …")."""
    text = _CLI_BRACKETS.sub("", text)
    text = _CLI_CLAUSE.sub("", text)
    text = _CLI_SENTENCE.sub("", text)
    return text.strip()


def app_advice(message: str) -> str | None:
    """The catalogue's "what to do" for a message, as the app shows it beside the message;
    None when the message is not in the catalogue, needs nothing done, or the advice is only
    about the command line."""
    kind = explain(message)
    if kind is None:
        return None
    advice = app_wording(kind.advice)
    if not advice or "--" in advice or advice.rstrip(".").lower() == "nothing to do":
        return None
    return advice


def distinct_messages(messages) -> list[str]:
    """Messages in order without repeats; a finding given with and without rows counts once
    (the version with rows is kept)."""
    kept: dict[str, str] = {}
    for message in messages:
        key = strip_rows_phrase(message)
        if key not in kept or len(message) > len(kept[key]):
            kept[key] = message
    return list(kept.values())


# The step of the work where each family of messages comes up, in the user's order.
STEPS = (("read", "reading the file"), ("xlsx", "reading a workbook"),
         ("values", "reading cells"), ("infer", "suggesting the data dictionary"),
         ("dictionary", "data dictionary"), ("variables", "data dictionary"),
         ("design", "choosing outcome and predictors"), ("cli", "command line"),
         ("guard", "guards before growing"), ("grow", "growing settings"),
         ("resample", "cross-validation settings"), ("pathcv", "choosing the size"),
         ("derive", "held-out check"), ("chart", "printing the chart"),
         ("validate", "checking a tree"),
         ("nested", "methods report"), ("stability", "methods report"),
         ("file", "opening saved files"), ("project", "opening projects"),
         ("model", "model files and scoring"))


def markdown_table() -> str:
    """The README's table of messages: the step, what the user sees, and what to do."""
    step_of = dict(STEPS)
    position = {prefix: i for i, (prefix, _) in enumerate(STEPS)}
    order = {s: i for i, s in enumerate(SEVERITIES)}

    def key(kind: MessageKind):
        prefix = kind.code.split(".")[0]
        return (position.get(prefix, len(position)), order[kind.severity], kind.code)

    lines = ["| step | message | kind | what to do |", "| --- | --- | --- | --- |"]
    for kind in sorted(catalogue().values(), key=key):
        step = step_of.get(kind.code.split(".")[0], "other")
        cells = [step, kind.readable(), kind.severity, kind.advice]
        cells = [c.replace("|", "\\|").replace("\n", " ") for c in cells]
        lines.append("| " + " | ".join(cells) + " |")
    return "\n".join(lines) + "\n"

