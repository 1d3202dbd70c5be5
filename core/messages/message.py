"""A message as said: worded once in the catalogue (core/messages/catalogue/), filled in by
:func:`say`, and carrying its code, so how serious it is and what to do are looked up by code
(:func:`kind_of`, :func:`advice_for`), never guessed from the wording.
"""

from __future__ import annotations

import re
import string
from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from functools import lru_cache

from .catalogue import ENTRIES

SEVERITIES = ("refused", "warning", "note")
PART = "part"  # fills a field of another message's template; not a message of its own


class Message(str):
    """A message's text with the ``code`` of its catalogue entry and the ``fields`` that filled
    it in. It is a ``str``: it prints, compares, joins and is saved as JSON as its text."""

    code: str
    fields: Mapping[str, object]

    def __new__(cls, text: str, code: str, fields: Mapping[str, object] | None = None,
                ) -> "Message":
        message = super().__new__(cls, text)
        message.code = code
        message.fields = dict(fields or {})
        return message

    def __reduce__(self):  # copied and pickled (joblib's workers) with its code
        return (Message, (str(self), self.code, self.fields))


@dataclass(frozen=True)
class MessageKind:
    """One entry of the catalogue: its code, how serious it is, its wording and the advice."""

    code: str
    severity: str  # "refused" (the step stops), "warning" (check this), "note" (for the record)
    template: str  # str.format template; fields in braces
    advice: str  # what to do, for the README table and the app's help

    def pattern(self) -> re.Pattern:
        """A regular expression matching any text of this kind (for :func:`kind_of_text`)."""
        parts = []
        for literal, name, _, _ in string.Formatter().parse(self.template):
            parts.append(re.escape(literal))
            if name is not None:
                parts.append("(?:.|\n)*?")
        return re.compile("^" + "".join(parts) + "$")

    def readable(self) -> str:
        """The template as the README shows it: fields in ‹angle quotes›."""
        out = []
        for literal, name, _, _ in string.Formatter().parse(self.template):
            out.append(literal)
            if name is not None:
                out.append(" (rows …)" if name == "rows" else f"‹{name}›")
        return "".join(out)


@lru_cache(maxsize=1)
def message_kinds() -> dict[str, MessageKind]:
    """Every entry of the catalogue by code."""
    kinds: dict[str, MessageKind] = {}
    for entry in ENTRIES:
        kind = MessageKind(*entry)
        if kind.code in kinds:
            raise RuntimeError(f"message code {kind.code} is listed twice")
        if kind.severity not in SEVERITIES + (PART,):
            raise RuntimeError(f"message {kind.code}: unknown severity {kind.severity}")
        kinds[kind.code] = kind
    return kinds


def say(code: str, /, **fields) -> Message:
    """The message ``code`` of the catalogue with its fields filled in."""
    return Message(message_kinds()[code].template.format(**fields), code, fields)


def kind_of(message: str | BaseException) -> MessageKind | None:
    """The catalogue entry of a message said by :func:`say` (or of the error raised with one);
    None for text that carries no code."""
    if isinstance(message, BaseException):
        message = str(message)
    code = getattr(message, "code", None)
    return None if code is None else message_kinds().get(code)


def severity_of(message: str | BaseException, default: str = "note") -> str:
    """How serious a message is, from its catalogue entry ("note", "warning", …); ``default``
    for text that carries no code."""
    kind = kind_of(message)
    return default if kind is None else kind.severity


def advice_for(message: str | BaseException) -> str | None:
    """What to do about a message said by :func:`say`, from its catalogue entry."""
    kind = kind_of(message)
    return None if kind is None else kind.advice


def kind_of_text(text: str) -> MessageKind | None:
    """The catalogue entry whose wording matches ``text``: the one look-up by wording, for a
    message that reaches its reader as plain text with its code lost (through a Qt signal,
    which carries text only). Everything in core uses :func:`kind_of`."""
    text = text.strip()
    for prefix in ("prunella: ", "warning: ", "note: "):
        if text.startswith(prefix):
            text = text[len(prefix):]
    best = None
    for kind in message_kinds().values():
        if kind.severity != PART and kind.pattern().match(text):
            literal = sum(len(lit) for lit, _, _, _ in string.Formatter().parse(kind.template))
            if best is None or literal > best[0]:
                best = (literal, kind)
    return None if best is None else best[1]


def distinct_messages(messages: Iterable[str]) -> list[str]:
    """Messages in order without repeats; a finding said with and without its rows counts once
    (the version with rows is kept)."""
    kept: dict[object, str] = {}
    for message in messages:
        fields = getattr(message, "fields", None)
        key = message if fields is None else (message.code, tuple(
            (name, str(value)) for name, value in sorted(fields.items()) if name != "rows"))
        if key not in kept or len(message) > len(kept[key]):
            kept[key] = message
    return list(kept.values())
