"""Checking a parsed JSON document (a model or project file) field by field, by its path.

Prunella's own files may have been edited by hand, cut short or written by another program.
Their checkers walk the document with :class:`Field`, which names every field by its path in
the file (``nodes[3].counts``, ``request.cv.repeats``), so a refusal says exactly where the
file is wrong. The sizes a file may ask for are limited here, once, so that no file can make a
command work for hours or fill the memory: texts, lists and nesting have upper ends far above
anything Prunella writes; numbers of the settings follow core/option_limits.py.
"""

from __future__ import annotations

from collections.abc import Callable, Iterator

from .errors import InputError
from .option_limits import problem_with
from .safe_files import is_finite_number, is_whole_number

# Upper ends of what a file may hold (README: "Limits on what a file may ask for").
NAME_LENGTH = 1_000  # a column name, label, unit, level, class, site, file name
TEXT_LENGTH = 10_000  # any other text: a note, a title, a source, a description
LONG_TEXT_LENGTH = 100_000  # a box's question or outcome in words (up to 40 levels), a
#                             finding naming many columns; no text anywhere is longer
LIST_LENGTH = 100_000  # items of a list of names, levels, boxes or sizes
DEPTH = 20  # objects and lists inside one another (Prunella's own files use at most 6)

Refusal = Callable[[str, str], InputError]  # (where, problem) → the error to raise


class Field:
    """One value of a document and its path; its methods refuse (InputError, from
    ``refuse(where, problem)``) a value of the wrong type, size or range."""

    def __init__(self, value, path: str, refuse: Refusal, note: str = "",
                 given: bool = True) -> None:
        self.value, self.path, self.refuse, self.note = value, path, refuse, note
        self.given = given  # whether the key is there at all (its value may still be null)

    @property
    def where(self) -> str:
        """The path as the message says it, e.g. 'nodes[3].counts (box 4)'."""
        return (self.path or "the top of the file") + (f" ({self.note})" if self.note else "")

    def fail(self, problem: str):
        raise self.refuse(self.where, problem)

    # --- moving down ----------------------------------------------------------------------

    def __getitem__(self, key: str) -> "Field":
        """The field ``key`` of this object (its value None when absent)."""
        given = isinstance(self.value, dict) and key in self.value
        return Field(self.value[key] if given else None, f"{self.path}.{key}" if self.path
                     else key, self.refuse, self.note, given)

    @property
    def unsaid(self) -> bool:
        """True when the key is not in the file at all: pass as ``optional`` where a reader
        takes a default for an absent key but would fail on a null one."""
        return not self.given

    def has(self, key: str) -> bool:
        return isinstance(self.value, dict) and key in self.value

    def items(self, note: Callable[[int], str] | None = None) -> Iterator["Field"]:
        """The items of this list, each named ``path[i]`` (none when it is not a list)."""
        for index, value in enumerate(self.value if isinstance(self.value, list) else ()):
            yield Field(value, f"{self.path}[{index}]", self.refuse,
                        note(index) if note else self.note)

    def entries(self) -> Iterator[tuple[str, "Field"]]:
        """The keys and fields of this object."""
        for key, value in self.value.items():
            yield key, Field(value, f"{self.path}.{key}", self.refuse, self.note)

    # --- what a value must be -------------------------------------------------------------

    def absent(self, optional: bool) -> bool:
        """True when the value is absent (None) and may be; refuses it when it may not."""
        if self.value is None:
            if not optional:
                self.fail("it is null" if self.given else "it is missing")
            return True
        return False

    def object(self, optional: bool = True) -> bool:
        """A JSON object; True when there is one to look into."""
        if self.absent(optional):
            return False
        if not isinstance(self.value, dict):
            self.fail("it must be a JSON object")
        return True

    def list(self, optional: bool = True, least: int = 0, most: int = LIST_LENGTH,
             length: int | None = None) -> bool:
        """A JSON list of ``least`` to ``most`` items (or exactly ``length``)."""
        if self.absent(optional):
            return False
        if not isinstance(self.value, list):
            self.fail("it must be a list")
        if length is not None and len(self.value) != length:
            self.fail(f"it must have {length} item{'s' if length != 1 else ''}, not "
                      f"{len(self.value)}")
        if not least <= len(self.value) <= most:
            self.fail(f"it must have from {least} to {most:,} items, not {len(self.value):,}")
        return True

    def text(self, optional: bool = True, choices: tuple[str, ...] = (), longest: int =
             NAME_LENGTH, empty: bool = False) -> bool:
        """A text of at most ``longest`` characters (not empty unless ``empty``), one of
        ``choices`` when given."""
        if self.absent(optional):
            return False
        if not isinstance(self.value, str) or (not self.value and not empty):
            self.fail("it must be a text (not empty)" if not empty else "it must be a text")
        if len(self.value) > longest:
            self.fail(f"it is {len(self.value):,} characters long, far longer than any "
                      f"Prunella writes (at most {longest:,})")
        if choices and self.value not in choices:
            self.fail(f"{self.value[:40]!r} is not one of {', '.join(choices)}")
        return True

    def texts(self, optional: bool = True, most: int = LIST_LENGTH, longest: int =
              NAME_LENGTH, unique: bool = False, least: int = 0, empty: bool = True) -> bool:
        """A list of texts, each at most ``longest`` characters (none empty unless
        ``empty``); no text twice if ``unique``."""
        if not self.list(optional, least=least, most=most):
            return False
        for item in self.items():
            item.text(optional=False, longest=longest, empty=empty)
        if unique and len(set(self.value)) != len(self.value):
            twice = next(v for v in self.value if self.value.count(v) > 1)
            self.fail(f"{twice[:40]!r} is listed twice")
        return True

    def whole(self, optional: bool = True, least: int | None = 0,
              most: int | None = None) -> bool:
        """A whole number from ``least`` (to ``most``; either may be None for no bound);
        JSON's true and false are not numbers."""
        if self.absent(optional):
            return False
        if not is_whole_number(self.value) or (least is not None and self.value < least) or \
                (most is not None and self.value > most):
            span = ("" if least is None and most is None else
                    f" of {least} or more" if most is None else
                    f" of at most {most:,}" if least is None else f" from {least} to {most:,}")
            self.fail(f"it must be a whole number{span}")
        return True

    def number(self, optional: bool = True, least: float | None = None,
               most: float | None = None) -> bool:
        """A finite number from ``least`` to ``most`` (both included, each when given)."""
        if self.absent(optional):
            return False
        if not is_finite_number(self.value) or (least is not None and self.value < least) or \
                (most is not None and self.value > most):
            span = ("" if least is None and most is None else
                    f" of {least:g} or more" if most is None else
                    f" of at most {most:g}" if least is None else f" from {least:g} to {most:g}")
            self.fail(f"it must be a number{span}")
        return True

    def numbers(self, optional: bool = True, least: float | None = None,
                most: float | None = None, length: int | None = None,
                nulls: bool = False, maximum: int = LIST_LENGTH) -> bool:
        """A list of numbers (or null where ``nulls``), each inside the bounds."""
        if not self.list(optional, length=length, most=maximum):
            return False
        for item in self.items():
            item.number(optional=nulls, least=least, most=most)
        return True

    def truth(self, optional: bool = True) -> bool:
        if self.absent(optional):
            return False
        if not isinstance(self.value, bool):
            self.fail("it must be true or false")
        return True

    def limited(self, setting: str) -> None:
        """A number of the table of limits (core/option_limits.py); absent where the table
        allows it."""
        problem = problem_with(setting, self.value)
        if problem is not None:
            self.fail(problem)


def check_nesting(document, refuse: Refusal, deepest: int = DEPTH) -> None:
    """Refuse a document with objects or lists nested more than ``deepest`` deep, or with a
    text or key longer than LONG_TEXT_LENGTH anywhere, before any part of it is used. Walked
    without recursion, so no depth can exhaust Python's stack; the path of the first
    too-deep or too-long value is named."""
    stack = [(document, "", 0)]
    while stack:
        value, path, depth = stack.pop()
        if depth >= deepest:
            raise refuse(_short(path) or "the top of the file",
                         f"it is nested more than {deepest} deep, far deeper than any file "
                         "Prunella writes")
        pairs = value.items() if isinstance(value, dict) else enumerate(value)
        for key, item in pairs:
            if isinstance(key, str) and len(key) > LONG_TEXT_LENGTH:
                _too_long(refuse, path, key)
            if isinstance(item, str):
                if len(item) > LONG_TEXT_LENGTH:
                    _too_long(refuse, _join(path, key), item)
            elif isinstance(item, (dict, list)):
                stack.append((item, _join(path, key), depth + 1))


def _short(path: str) -> str:
    """A very long path shortened for the message (its start says where it is)."""
    return path if len(path) <= 60 else path[:60] + "…"


def _join(path: str, key) -> str:
    if isinstance(key, int):
        return f"{path}[{key}]"
    return f"{path}.{key}" if path else key


def _too_long(refuse: Refusal, path: str, text: str):
    raise refuse(_short(path) or "the top of the file",
                 f"a text of {len(text):,} characters, far longer than any Prunella writes "
                 f"(at most {LONG_TEXT_LENGTH:,})")
