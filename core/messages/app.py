"""A message as the app shows it: without what only the command line needs, and with the
catalogue's "what to do" beside it."""

from __future__ import annotations

import re

from .message import kind_of, kind_of_text

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


def app_advice(message: str | BaseException) -> str | None:
    """The catalogue's "what to do" for a message, as the app shows it beside the message;
    None when the message needs nothing done, the advice is only about the command line, or
    the message is not in the catalogue.

    A message said by core is looked up by its code. Plain text (a message that crossed a Qt
    signal, which carries text only) is looked up by its wording instead."""
    kind = kind_of(message)
    if kind is None and not isinstance(message, BaseException) \
            and getattr(message, "code", None) is None:
        kind = kind_of_text(message)
    if kind is None:
        return None
    advice = app_wording(kind.advice)
    if not advice or "--" in advice or advice.rstrip(".").lower() == "nothing to do":
        return None
    return advice
