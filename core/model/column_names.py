"""A file's columns found by the names a tree knows them by, the same way for ``prunella
check``, ``prunella score`` and the app: the exact name, else the one column whose name differs
only by case and spaces. A column the tree asks about that is still missing is refused in one
sentence, which names the file's column that looks meant for it ("SpO2 on air %" for "SpO2 on
air (%)") so the user can rename it."""

from __future__ import annotations

import difflib
import re
from collections.abc import Iterable

from ..errors import InputError
from ..messages.message import say
from .tree import TreeModel


def name_key(name: str) -> str:
    """A header as compared: no spaces, any case."""
    return re.sub(r"\s+", "", str(name)).casefold()


def _loose_key(name: str) -> str:
    """A header with only its letters, digits and % kept, for suggesting a near name."""
    return re.sub(r"[^\w%]|_", "", str(name)).casefold()


def find_columns(wanted: Iterable[str], columns: Iterable) -> tuple[
        dict[str, str], list[str], list[tuple[str, str]], list[str]]:
    """Where each wanted name is among ``columns``: the mapping file column → wanted name,
    the names found exactly, the (file column, wanted name) pairs found but for case and
    spaces, and the names not found."""
    columns = [str(c) for c in columns]
    exact = set(columns)
    by_key: dict[str, list[str]] = {}
    for c in columns:
        by_key.setdefault(name_key(c), []).append(c)
    mapping: dict[str, str] = {}
    matched: list[str] = []
    renamed: list[tuple[str, str]] = []
    absent: list[str] = []
    for name in dict.fromkeys(wanted):
        found = by_key.get(name_key(name), [])
        if name in exact:
            mapping[name] = name
            matched.append(name)
        elif len(found) == 1 and found[0] not in mapping:
            mapping[found[0]] = name
            renamed.append((found[0], name))
        else:
            absent.append(name)
    return mapping, matched, renamed, absent


def near_name(name: str, columns: Iterable, taken: Iterable[str] = ()) -> str | None:
    """The file's column that looks meant for ``name`` (the same letters and digits, or a
    close spelling), if exactly one does; None otherwise."""
    free = [str(c) for c in columns if str(c) not in set(taken)]
    same = [c for c in free if _loose_key(c) == _loose_key(name) and _loose_key(c)]
    if len(same) == 1:
        return same[0]
    if same:
        return None
    keys = {_loose_key(c): c for c in free if _loose_key(c)}
    close = difflib.get_close_matches(_loose_key(name), list(keys), n=2, cutoff=0.85)
    return keys[close[0]] if len(close) == 1 else None


def refuse_absent(model: TreeModel, absent: Iterable[str], columns: Iterable,
                  taken: Iterable[str] = ()) -> None:
    """Refuse, in one sentence, a file that lacks columns the tree asks about, naming for each
    the file's column that looks meant for it."""
    columns = [str(c) for c in columns]
    absent = list(absent)
    named = ", ".join(f"{c!r} ({model.spec(c).display})" for c in absent)
    near = [(c, near_name(c, columns, taken)) for c in absent]
    near = [(c, n) for c, n in near if n is not None]
    if not near:
        raise InputError(say("check.columns_absent", columns=named))
    raise InputError(say("check.columns_near", columns=named,
                         near=", ".join(f"{n!r} (for {c!r})" for c, n in near)))


def columns_for_tree(model: TreeModel, columns: Iterable) -> tuple[
        dict[str, str], list[tuple[str, str]]]:
    """The file's columns the tree asks about (mapping file column → the tree's name) and the
    ones found but for case and spaces; a file lacking one is refused (:func:`refuse_absent`)."""
    columns = [str(c) for c in columns]
    mapping, _matched, renamed, absent = find_columns(model.columns_asked(), columns)
    if absent:
        refuse_absent(model, absent, columns, mapping)
    return mapping, renamed
