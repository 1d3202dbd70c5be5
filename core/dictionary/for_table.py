"""The dictionary of a loaded table: inferred from its cells, then overridden column by column
by a saved dictionary (a file beside the data, one given, or a project's)."""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

from ..data.cells import yes_no_levels
from ..messages.message import Message, say
from .columns import ColumnSpec, DataDictionary
from .inference import infer_dictionary

# Notes that propose missing-value codes (their ``codes`` field names them).
PROPOSALS = ("infer.sentinel", "infer.probable_missing")


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


def open_proposals(notes, dictionary: DataDictionary) -> list:
    """The notes without the proposed missing codes the dictionary has settled: every code
    named as "not recorded" or listed as a level by the user's or the project's dictionary."""
    kept = []
    for note in notes:
        if getattr(note, "code", "") in PROPOSALS and note.fields.get("column") in dictionary:
            spec = dictionary.get(note.fields["column"])
            named = {c.casefold() for c in spec.missing_codes}
            if all(str(c).casefold() in named for c in note.fields.get("codes", ())):
                continue
        kept.append(note)
    return kept


def confirm_missing_codes(dictionary: DataDictionary, column: str, codes,
                          ) -> tuple[DataDictionary, Message]:
    """``codes`` of ``column`` read as "not recorded" from now on, as the user confirmed: added
    to its missing codes and taken out of its levels (two yes/no levels left make it a yes/no
    column again); with the note that says so."""
    spec = dictionary.get(column)
    folded = {str(c).casefold() for c in codes}
    missing = tuple(spec.missing_codes) + tuple(
        str(c) for c in codes if str(c).casefold() not in {m.casefold() for m in spec.missing_codes})
    levels = tuple(lv for lv in spec.levels if lv.casefold() not in folded)
    kind = spec.kind
    if kind in ("nominal", "binary") and len(levels) == 2:
        kind = "binary"
        if yes_no_levels(list(levels)):
            levels = ("no", "yes")
    positive = spec.positive if spec.positive in levels else None
    note = say("infer.confirmed_missing", column=column,
               codes=", ".join(repr(str(c)) for c in codes))
    return dictionary.with_column(column, missing_codes=missing, levels=levels, kind=kind,
                                  positive=positive), note


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
        return merged, open_proposals(notes, merged) + more
    if dictionary_path:
        saved = DataDictionary.load(dictionary_path)
        merged, more = merge_dictionary(inferred, saved)
        guessed = [str(c) for c in table.frame.columns if str(c) not in saved]
        # Say "guessed" only when some column was guessed, and name them.
        used = (say("dictionary.used", file=Path(dictionary_path).name,
                    guessed=", ".join(guessed[:8]) + (" …" if len(guessed) > 8 else ""))
                if guessed else say("dictionary.used_whole", file=Path(dictionary_path).name))
        return merged, [used] + open_proposals(notes, merged) + more
    return inferred, notes
