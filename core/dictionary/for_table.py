"""The dictionary of a loaded table: inferred from its cells, then overridden column by column
by a saved dictionary (a file beside the data, one given, or a project's)."""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

from ..messages.message import say
from .columns import ColumnSpec, DataDictionary
from .inference import infer_dictionary


def merge_dictionary(inferred: DataDictionary, given: DataDictionary) -> tuple[DataDictionary, list[str]]:
    """Entries from a saved dictionary override the inferred ones, column by column."""
    notes = []
    given_names = set(given.names)
    merged = tuple(_over(c, given.get(c.name)) if c.name in given_names else c
                   for c in inferred.columns)
    absent = [n for n in given.names if n not in inferred]
    if absent:
        notes.append(say("dictionary.absent_columns",
                         columns=", ".join(map(repr, absent[:20]))
                         + (" …" if len(absent) > 20 else "")))
    return DataDictionary(merged), notes


def _over(inferred: ColumnSpec, given: ColumnSpec) -> ColumnSpec:
    """A saved entry over the inferred one; a two-level entry that names no positive level
    keeps the inferred one (the event, or the rarer level), which the saved entry cannot
    know without the data."""
    if given.positive is None and inferred.positive is not None and len(given.levels) == 2 \
            and inferred.positive in given.levels:
        return replace(given, positive=inferred.positive)
    return given


def dictionary_beside(path: str | Path) -> Path | None:
    """A dictionary saved next to the data as NAME.dictionary.json (or .csv), if there is one."""
    path = Path(path)
    for suffix in (".dictionary.json", ".dictionary.csv"):
        candidate = path.with_name(path.stem + suffix)
        if candidate.is_file():
            return candidate
    return None


def dictionary_for(table, dictionary_path: str | Path | DataDictionary | None = None,
                   ) -> tuple[DataDictionary, list[str]]:
    """The dictionary of a loaded table: inferred from its cells (notes naming rows), overridden
    column by column by a saved dictionary (a file, or one already in hand such as a
    project's) if one is given; with the notes of both steps."""
    inferred, notes = infer_dictionary(table.frame, table.row_numbers)
    if isinstance(dictionary_path, DataDictionary):
        merged, more = merge_dictionary(inferred, dictionary_path)
        return merged, notes + more
    if dictionary_path:
        merged, more = merge_dictionary(inferred, DataDictionary.load(dictionary_path))
        return merged, [say("dictionary.used", file=Path(dictionary_path).name)] + notes + more
    return inferred, notes
