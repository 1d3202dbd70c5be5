"""The README's table of messages, generated from the catalogue (``python -m core.messages``;
a test keeps README.md in step)."""

from __future__ import annotations

from .message import PART, SEVERITIES, MessageKind, message_kinds

# The step of the work where each family of messages comes up, in the user's order.
STEPS = (("read", "reading the file"), ("xlsx", "reading a workbook"),
         ("values", "reading cells"), ("infer", "suggesting the data dictionary"),
         ("dictionary", "data dictionary"), ("variables", "data dictionary"),
         ("design", "choosing outcome and predictors"), ("cli", "command line"),
         ("guard", "guards before growing"), ("limit", "limits of settings"), ("grow", "growing settings"),
         ("folds", "cross-validation settings"), ("size", "choosing the size"),
         ("goal", "building for a goal"), ("coarsen", "growing settings"),
         ("holdout", "held-out check"), ("chart", "printing the chart"),
         ("check", "checking a tree"),
         ("nested", "methods report"), ("stability", "methods report"),
         ("file", "opening saved files"), ("project", "opening projects"),
         ("model", "model files and scoring"), ("work", "any long work"),
         ("app", "the desktop app"))


def markdown_table() -> str:
    """The README's table of messages: the step, what the user sees, and what to do."""
    step_of = dict(STEPS)
    position = {prefix: i for i, (prefix, _) in enumerate(STEPS)}
    order = {s: i for i, s in enumerate(SEVERITIES)}

    def key(kind: MessageKind):
        prefix = kind.code.split(".")[0]
        return (position.get(prefix, len(position)), order[kind.severity], kind.code)

    lines = ["| step | message | kind | what to do |", "| --- | --- | --- | --- |"]
    shown = [kind for kind in message_kinds().values() if kind.severity != PART]
    for kind in sorted(shown, key=key):
        step = step_of.get(kind.code.split(".")[0], "other")
        cells = [step, kind.readable(), kind.severity, kind.advice]
        cells = [c.replace("|", "\\|").replace("\n", " ") for c in cells]
        lines.append("| " + " | ".join(cells) + " |")
    return "\n".join(lines) + "\n"
