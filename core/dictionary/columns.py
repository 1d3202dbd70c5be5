"""The data dictionary: what each column is, in the user's words.

For every column: its role (outcome, predictor, patient identifier, site, ignore), its kind
(numeric, binary, ordinal with a level order, nominal, identifier, date, free text), a display
label, a unit, extra missing-value codes and, for categories, the levels. Sensible defaults are
inferred from the data; the user overrides any of them, and the dictionary is saved beside the
data as JSON or CSV.
"""

from __future__ import annotations

import csv
import io
import json
import math
import re
from collections.abc import Iterable
from dataclasses import asdict, dataclass, replace
from pathlib import Path

from ..errors import InputError
from ..messages.message import say
from ..safe_files import check_format, read_json_document, write_text_atomic

ROLES = ("outcome", "predictor", "patient_id", "site", "ignore")
KINDS = ("numeric", "binary", "ordinal", "nominal", "identifier", "date", "text")
CATEGORY_KINDS = ("binary", "ordinal", "nominal")
PREDICTOR_KINDS = ("numeric",) + CATEGORY_KINDS
DICTIONARY_FORMAT = "prunella-dictionary/1"
DICTIONARY_VERSIONS = (1,)  # versions this Prunella reads
MAX_NOMINAL_LEVELS = 40



def _text_list(value, key: str, name: str) -> tuple[str, ...]:
    if value is None:
        return ()
    if isinstance(value, str):
        return tuple(v for v in value.split("|") if v != "")
    if not isinstance(value, (list, tuple)) or \
            not all(isinstance(v, (str, int, float)) and not isinstance(v, bool) for v in value):
        raise InputError(say("dictionary.bad_field", column=name, key=key,
                             expected="a list of texts"))
    return tuple(str(v) for v in value)


@dataclass(frozen=True)
class ColumnSpec:
    """One column of the data dictionary."""

    name: str
    role: str = "predictor"
    kind: str = "numeric"
    label: str = ""
    unit: str = ""
    missing_codes: tuple[str, ...] = ()
    levels: tuple[str, ...] = ()
    positive: str | None = None
    note: str = ""
    # The lowest and highest value a measurement can plausibly take (e.g. 0 and 100 for a
    # percentage, 20 and 45 for a temperature in °C); the lookup flags a value outside them.
    plausible: tuple[float, float] | None = None

    def __post_init__(self) -> None:
        if self.role not in ROLES:
            raise InputError(say("variables.bad_role", name=self.name, role=self.role,
                                 roles=", ".join(ROLES)))
        if self.kind not in KINDS:
            raise InputError(say("variables.bad_kind", name=self.name, kind=self.kind,
                                 kinds=", ".join(KINDS)))
        if len(set(self.levels)) != len(self.levels):
            twice = sorted({lv for lv in self.levels if self.levels.count(lv) > 1})
            raise InputError(say("dictionary.repeated_levels", column=self.name,
                                 levels=", ".join(repr(lv) for lv in twice)))

    @property
    def display(self) -> str:
        return self.label or self.name

    def to_dict(self) -> dict:
        data = asdict(self)
        data["missing_codes"] = list(self.missing_codes)
        data["levels"] = list(self.levels)
        if self.plausible is None:  # written only when given: older files stay as they were
            del data["plausible"]
        else:
            data["plausible"] = list(self.plausible)
        return data

    @classmethod
    def from_dict(cls, data: dict) -> "ColumnSpec":
        """An entry from saved data; wrong types are refused naming the column and field."""
        if not isinstance(data, dict):
            raise InputError(say("dictionary.entry_not_object", found=type(data).__name__))
        if not isinstance(data.get("name"), str) or not data["name"]:
            raise InputError(say("variables.no_name"))
        name = data["name"]
        known = {f for f in cls.__dataclass_fields__}
        clean = {k: v for k, v in data.items() if k in known}
        for key in ("missing_codes", "levels"):
            if key in clean:
                clean[key] = _text_list(clean[key], key, name)
        for key in ("role", "kind", "label", "unit", "note", "positive"):
            value = clean.get(key)
            if value is not None and not isinstance(value, str):
                raise InputError(say("dictionary.bad_field", column=name, key=key,
                                     expected="a text"))
        for key in ("label", "unit", "note"):
            if clean.get(key) is None:
                clean[key] = ""
        for key in ("role", "kind"):
            if clean.get(key) in ("", None):
                clean.pop(key, None)
        if clean.get("positive") in ("", None):
            clean["positive"] = None
        clean["plausible"] = _plausible(clean.get("plausible"), name)
        return cls(**clean)


@dataclass(frozen=True)
class DataDictionary:
    """The whole dictionary, in column order."""

    columns: tuple[ColumnSpec, ...]

    def __post_init__(self) -> None:
        names = [c.name for c in self.columns]
        if len(set(names)) != len(names):
            dup = sorted({n for n in names if names.count(n) > 1})
            raise InputError(say("variables.listed_twice", names=", ".join(map(repr, dup))))

    @property
    def names(self) -> tuple[str, ...]:
        return tuple(c.name for c in self.columns)

    def __contains__(self, name: str) -> bool:
        return name in self.names

    def get(self, name: str) -> ColumnSpec:
        for spec in self.columns:
            if spec.name == name:
                return spec
        raise InputError(say("variables.no_column", name=name,
                             columns=", ".join(repr(n) for n in self.names[:30]),
                             more=" ..." if len(self.names) > 30 else ""))

    def with_column(self, name: str, **changes) -> "DataDictionary":
        """A copy with one column's entry changed."""
        self.get(name)
        return DataDictionary(tuple(replace(c, **changes) if c.name == name else c
                                    for c in self.columns))

    def by_role(self, role: str) -> tuple[ColumnSpec, ...]:
        return tuple(c for c in self.columns if c.role == role)

    def with_roles(self, outcome: str | None, patient_id: str | None = None,
                   site: str | None = None) -> "DataDictionary":
        """A copy in which these columns hold the outcome, patient-number and site roles and
        no other column holds them (a column that loses one of them is left out, "ignore"):
        the dictionary then says what the outcome step chose."""
        wanted = {"outcome": outcome, "patient_id": patient_id, "site": site}
        chosen = {name: role for role, name in wanted.items() if name is not None}
        for name in chosen:
            self.get(name)  # an unknown column is refused by name
        columns = []
        for c in self.columns:
            role = chosen.get(c.name, "ignore" if c.role in wanted else c.role)
            columns.append(c if role == c.role else replace(c, role=role))
        return DataDictionary(tuple(columns))

    def to_dict(self) -> dict:
        return {"format": DICTIONARY_FORMAT, "columns": [c.to_dict() for c in self.columns]}

    @classmethod
    def from_dict(cls, data: dict, name: str = "The data dictionary") -> "DataDictionary":
        """A dictionary from parsed JSON; refuses other files, other versions, wrong types."""
        check_format(data, "dictionary", DICTIONARY_VERSIONS, name)
        columns = data.get("columns", [])
        if not isinstance(columns, list):
            raise InputError(say("dictionary.columns_not_list", file=name))
        return cls(tuple(ColumnSpec.from_dict(c) for c in columns))

    def save(self, path: str | Path) -> None:
        """Save as JSON (``.json``) or CSV (any other suffix), atomically."""
        path = Path(path)
        if path.suffix.lower() == ".json":
            write_text_atomic(path, json.dumps(self.to_dict(), indent=2, ensure_ascii=False) + "\n")
            return
        limits = any(c.plausible is not None for c in self.columns)  # a column only if used
        rows = [["name", "role", "kind", "label", "unit", "missing_codes", "levels", "positive",
                 "note"] + (["plausible"] if limits else [])]
        for c in self.columns:
            rows.append([c.name, c.role, c.kind, c.label, c.unit, "|".join(c.missing_codes),
                         "|".join(c.levels), c.positive or "", c.note] +
                        (["" if c.plausible is None else "|".join(f"{v:.15g}" for v in c.plausible)]
                         if limits else []))
        buffer = io.StringIO()
        csv.writer(buffer, lineterminator="\n").writerows(rows)
        write_text_atomic(path, buffer.getvalue())

    @classmethod
    def load(cls, path: str | Path) -> "DataDictionary":
        """Load a dictionary saved as JSON or CSV."""
        path = Path(path)
        if not path.exists():
            raise InputError(say("variables.no_dictionary", path=path))
        if path.suffix.lower() == ".json":
            data = read_json_document(path, "dictionary", DICTIONARY_VERSIONS)
            return cls.from_dict(data, path.name)
        try:
            text = path.read_text(encoding="utf-8-sig")
            rows = list(csv.DictReader(io.StringIO(text, newline="")))
        except (UnicodeDecodeError, OSError, csv.Error):
            raise InputError(say("dictionary.csv_unreadable", file=path.name)) from None
        if not rows or "name" not in rows[0]:
            raise InputError(say("variables.dictionary_csv_no_name", file=path.name))
        return cls(tuple(ColumnSpec.from_dict(r) for r in rows))


def _plausible(value, name: str) -> tuple[float, float] | None:
    """A column's plausible limits from a file: two numbers, lowest first (in a CSV
    dictionary written as "0|100"); empty means none."""
    if value in (None, "", []):
        return None
    if isinstance(value, str):
        value = value.split("|")
    try:
        if len(value) != 2 or any(isinstance(v, bool) for v in value):
            raise ValueError
        low, high = (float(v) for v in value)
    except (TypeError, ValueError):
        low = high = math.nan
    if not (math.isfinite(low) and math.isfinite(high) and low <= high):
        raise InputError(say("dictionary.bad_field", column=name, key="plausible",
                             expected="two numbers, the lowest and the highest plausible "
                                      "value (e.g. [0, 100])"))
    return (low, high)


# "20 to 45", "20–45", "20-45", "20; 45": one word or mark between the two numbers. A hyphen
# divides only after a digit, so "-5 to 5" and "-5-5" keep the minus sign of -5.
_RANGE_BETWEEN = re.compile(r"\s*(?:\bto\b|[–—;|]|(?<=[\d.])\s*-)\s*", re.IGNORECASE)


def plausible_in_words(limits: tuple[float, float] | None) -> str:
    """A column's plausible values as the dictionary table shows them: '20 to 45' ('' none)."""
    if limits is None:
        return ""
    return " to ".join(f"{v:.15g}" for v in limits)


def plausible_from_words(text: str, spec: "ColumnSpec") -> tuple[float, float] | None:
    """Plausible values typed in the dictionary table ('20 to 45'; empty: none), refused in one
    sentence when they are not two numbers lowest first or the column is not a measurement."""
    text = str(text).strip()
    if not text:
        return None
    if spec.kind != "numeric":
        raise InputError(say("dictionary.plausible_not_measurement", column=spec.display))
    parts = [part for part in _RANGE_BETWEEN.split(text) if part]
    if len(parts) != 2:
        raise InputError(say("dictionary.plausible_words", column=spec.display, given=text))
    try:
        return _plausible(parts, spec.name)
    except InputError:
        raise InputError(say("dictionary.plausible_words", column=spec.display,
                             given=text)) from None


def canonical_levels(spellings: Iterable[str]) -> list[str]:
    """Levels from spellings given commonest first: case variants merged under their
    commonest spelling, in natural order (numbers by value, then words)."""
    chosen: dict[str, str] = {}
    for spelling in spellings:
        chosen.setdefault(spelling.casefold(), spelling)
    return sorted(chosen.values(), key=_natural_key)


def _natural_key(level: str):
    try:
        return (0, float(level), level)
    except ValueError:
        return (1, 0.0, level.casefold())
