"""The data dictionary: what each column is, in the user's words.

For every column: its role (outcome, predictor, patient identifier, site, ignore), its kind
(numeric, binary, ordinal with a level order, nominal, identifier, date, free text), a display
label, a unit, extra missing-value codes and, for categories, the levels. Sensible defaults are
inferred from the data; the user overrides any of them, and the dictionary is saved beside the
data as JSON or CSV.
"""

from __future__ import annotations

import csv
import json
import re
from dataclasses import asdict, dataclass, field, replace
from pathlib import Path

import numpy as np
import pandas as pd

from .errors import InputError
from .values import (
    YES_WORDS, is_missing_text, level_text, parse_dates, parse_levels, parse_numbers,
    yes_no_levels,
)

ROLES = ("outcome", "predictor", "patient_id", "site", "ignore")
KINDS = ("numeric", "binary", "ordinal", "nominal", "identifier", "date", "text")
CATEGORY_KINDS = ("binary", "ordinal", "nominal")
PREDICTOR_KINDS = ("numeric",) + CATEGORY_KINDS
DICTIONARY_FORMAT = "prunella-dictionary/1"
MAX_NOMINAL_LEVELS = 40

_ORDINAL_HINT = re.compile(r"(level|grade|score|stage|class|category|triage|scale|rank)", re.I)
_SITE_HINT = re.compile(r"(site|campus|hospital|centre|center|clinic|facility)", re.I)
_PATIENT_HINT = re.compile(r"(patient|person|subject|mrn|nhs|medical.?record|client)", re.I)
_ID_HINT = re.compile(r"(^id$|_id$|^id_|\bid\b|number|record|^no$|code$)", re.I)
_UNIT_IN_HEADER = re.compile(r"^(?P<label>.*?)\s*[\(\[](?P<unit>[^\)\]]{1,20})[\)\]]\s*$")


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

    def __post_init__(self) -> None:
        if self.role not in ROLES:
            raise InputError(f"Column {self.name!r}: role {self.role!r} is not one of "
                             + ", ".join(ROLES) + ".")
        if self.kind not in KINDS:
            raise InputError(f"Column {self.name!r}: kind {self.kind!r} is not one of "
                             + ", ".join(KINDS) + ".")

    @property
    def display(self) -> str:
        return self.label or self.name

    def to_dict(self) -> dict:
        data = asdict(self)
        data["missing_codes"] = list(self.missing_codes)
        data["levels"] = list(self.levels)
        return data

    @classmethod
    def from_dict(cls, data: dict) -> "ColumnSpec":
        if "name" not in data:
            raise InputError("A column in the data dictionary has no 'name'; add one.")
        known = {f for f in cls.__dataclass_fields__}
        clean = {k: v for k, v in data.items() if k in known}
        for key in ("missing_codes", "levels"):
            if key in clean:
                value = clean[key]
                if isinstance(value, str):
                    value = [v for v in value.split("|") if v != ""] if value else []
                clean[key] = tuple(str(v) for v in (value or ()))
        for key in ("label", "unit", "note"):
            if clean.get(key) is None:
                clean[key] = ""
        if clean.get("positive") in ("", None):
            clean["positive"] = None
        return cls(**clean)


@dataclass(frozen=True)
class DataDictionary:
    """The whole dictionary, in column order."""

    columns: tuple[ColumnSpec, ...]

    def __post_init__(self) -> None:
        names = [c.name for c in self.columns]
        if len(set(names)) != len(names):
            dup = sorted({n for n in names if names.count(n) > 1})
            raise InputError("The data dictionary lists " + ", ".join(map(repr, dup))
                             + " more than once; keep one entry per column.")

    @property
    def names(self) -> tuple[str, ...]:
        return tuple(c.name for c in self.columns)

    def __contains__(self, name: str) -> bool:
        return name in self.names

    def get(self, name: str) -> ColumnSpec:
        for spec in self.columns:
            if spec.name == name:
                return spec
        raise InputError(f"There is no column called {name!r}; the columns are: "
                         + ", ".join(repr(n) for n in self.names[:30])
                         + (" ..." if len(self.names) > 30 else "") + ".")

    def with_column(self, name: str, **changes) -> "DataDictionary":
        """A copy with one column's entry changed."""
        self.get(name)
        return DataDictionary(tuple(replace(c, **changes) if c.name == name else c
                                    for c in self.columns))

    def by_role(self, role: str) -> tuple[ColumnSpec, ...]:
        return tuple(c for c in self.columns if c.role == role)

    def to_dict(self) -> dict:
        return {"format": DICTIONARY_FORMAT, "columns": [c.to_dict() for c in self.columns]}

    @classmethod
    def from_dict(cls, data: dict) -> "DataDictionary":
        if not isinstance(data, dict) or data.get("format") != DICTIONARY_FORMAT:
            raise InputError(f"This is not a Prunella data dictionary (expected format "
                             f"{DICTIONARY_FORMAT!r}); choose the dictionary file saved "
                             "with the data.")
        return cls(tuple(ColumnSpec.from_dict(c) for c in data.get("columns", [])))

    def save(self, path: str | Path) -> None:
        """Save as JSON (``.json``) or CSV (any other suffix), atomically."""
        from .safe_files import write_text_atomic

        path = Path(path)
        if path.suffix.lower() == ".json":
            write_text_atomic(path, json.dumps(self.to_dict(), indent=2, ensure_ascii=False) + "\n")
            return
        rows = [["name", "role", "kind", "label", "unit", "missing_codes", "levels", "positive",
                 "note"]]
        for c in self.columns:
            rows.append([c.name, c.role, c.kind, c.label, c.unit, "|".join(c.missing_codes),
                         "|".join(c.levels), c.positive or "", c.note])
        import io

        buffer = io.StringIO()
        csv.writer(buffer, lineterminator="\n").writerows(rows)
        write_text_atomic(path, buffer.getvalue())

    @classmethod
    def load(cls, path: str | Path) -> "DataDictionary":
        """Load a dictionary saved as JSON or CSV."""
        path = Path(path)
        if not path.exists():
            raise InputError(f"No data dictionary at {path}; check the path.")
        text = path.read_text(encoding="utf-8-sig")
        if path.suffix.lower() == ".json":
            try:
                data = json.loads(text)
            except json.JSONDecodeError as exc:
                raise InputError(f"{path.name} is not valid JSON (line {exc.lineno}); fix it "
                                 "or save the dictionary again from Prunella.") from None
            return cls.from_dict(data)
        rows = list(csv.DictReader(text.splitlines()))
        if not rows or "name" not in rows[0]:
            raise InputError(f"{path.name} has no 'name' column; a dictionary CSV needs the "
                             "columns name, role, kind, label, unit, missing_codes, levels.")
        return cls(tuple(ColumnSpec.from_dict(r) for r in rows))


# --- inference ------------------------------------------------------------------------------


def _label_and_unit(name: str) -> tuple[str, str]:
    match = _UNIT_IN_HEADER.match(name)
    if match and match.group("label"):
        label, unit = match.group("label"), match.group("unit").strip()
    else:
        label, unit = name, ""
    label = re.sub(r"[_\.]+", " ", label).strip()
    if label and label == label.lower():
        label = label[0].upper() + label[1:]
    return label or name, unit


def infer_column(name: str, values: pd.Series) -> tuple[ColumnSpec, list[str]]:
    """A sensible dictionary entry for one column, and notes on what was decided and why."""
    notes: list[str] = []
    label, unit = _label_and_unit(name)
    missing = is_missing_text(values)
    present = values[~missing]
    n_present = len(present)
    base = dict(name=name, label=label, unit=unit)
    if n_present == 0:
        notes.append(f"{name!r} has no recorded values; it is left out.")
        return ColumnSpec(kind="numeric", role="ignore", note="no recorded values", **base), notes
    if pd.api.types.is_datetime64_any_dtype(values.dtype):
        return ColumnSpec(kind="date", role="ignore", note="date", **base), notes

    numbers = parse_numbers(values, label=name)
    readable_share = 1.0 - numbers.n_unreadable / n_present
    n_unique = int(pd.Series(level_text(present)).nunique())
    if readable_share >= 0.95:
        finite = numbers.values[~np.isnan(numbers.values)]
        distinct = np.unique(finite)
        if len(distinct) <= 1:
            notes.append(f"{name!r} has the same value in every row; it is left out.")
            return ColumnSpec(kind="numeric", role="ignore", note="constant", **base), notes
        if set(distinct.tolist()) <= {0.0, 1.0}:
            return ColumnSpec(kind="binary", levels=("0", "1"), **base), notes
        whole = bool(np.all(distinct == np.round(distinct)))
        # A negative code such as -99 in a column whose other values are all >= 0.
        sentinels = tuple(str(int(v)) for v in distinct if v in (-9, -99, -999, -9999)
                          and not (finite[finite != v] < 0).any()
                          and np.sum(finite == v) < 0.5 * len(finite))
        if sentinels:
            notes.append(f"{name!r}: the value {', '.join(sentinels)} looks like a code for "
                         "'not recorded' and is treated as missing; remove it from the "
                         "column's missing-value codes if it is a real value.")
        if whole and len(distinct) <= 10 and _ORDINAL_HINT.search(name):
            levels = tuple(str(int(v)) for v in distinct if str(int(v)) not in sentinels)
            return ColumnSpec(kind="ordinal", levels=levels, missing_codes=sentinels,
                              **base), notes
        if whole and n_unique == n_present and n_present >= 20 and _ID_HINT.search(name):
            notes.append(f"{name!r} is different in every row, like a record number; it is "
                         "left out of the predictors.")
            return ColumnSpec(kind="identifier", role="ignore", **base), notes
        if numbers.notes:
            notes.extend(numbers.notes)
        return ColumnSpec(kind="numeric", missing_codes=sentinels, **base), notes

    text = level_text(present)
    folded = text.str.casefold()
    levels_seen = list(pd.unique(folded))
    if len(levels_seen) == 2 or yes_no_levels(levels_seen):
        if yes_no_levels(levels_seen):
            spellings = pd.unique(text)
            if len(spellings) > 2:
                notes.append(f"{name!r} writes yes and no in several ways ("
                             + ", ".join(repr(s) for s in spellings[:6])
                             + "); they were read as 'yes' and 'no'.")
            return ColumnSpec(kind="binary", levels=("no", "yes"), positive=None, **base), notes
        levels = _canonical_levels(text)
        role = "site" if _SITE_HINT.search(name) else "predictor"
        return ColumnSpec(kind="binary", levels=tuple(levels), role=role, **base), notes
    if n_unique >= 0.95 * n_present and n_present >= 20:
        dates = parse_dates(present)
        if dates.notna().mean() >= 0.9:
            return ColumnSpec(kind="date", role="ignore", note="date", **base), notes
        notes.append(f"{name!r} is different in (almost) every row, like an identifier; it is "
                     "left out of the predictors.")
        return ColumnSpec(kind="identifier", role="ignore", **base), notes
    dates = parse_dates(present) if text.str.contains(r"\d[-/.]\d", regex=True).mean() > 0.9 else None
    if dates is not None and dates.notna().mean() >= 0.9:
        return ColumnSpec(kind="date", role="ignore", note="date", **base), notes
    if _PATIENT_HINT.search(name) and n_unique < n_present:
        notes.append(f"{name!r} looks like a patient identifier with repeat visits; "
                     "cross-validation will keep each patient's visits together.")
        return ColumnSpec(kind="identifier", role="patient_id", **base), notes
    levels = _canonical_levels(text)
    if len(levels) > MAX_NOMINAL_LEVELS:
        notes.append(f"{name!r} has {len(levels)} different texts, too many for a chart "
                     "question; it is left out (group the texts into fewer categories to use it).")
        return ColumnSpec(kind="text", role="ignore", **base), notes
    if readable_share < 0.95 and numbers.n_unreadable < n_present and readable_share > 0.5:
        notes.append(f"{name!r} mixes numbers and words; it is treated as categories. If it "
                     "should be a number, correct the words or mark them as missing codes.")
    role = "site" if _SITE_HINT.search(name) and len(levels) >= 2 else "predictor"
    if len(set(folded)) < len(set(text)):
        notes.append(f"{name!r} spells some categories with different capitals; they were "
                     "merged.")
    return ColumnSpec(kind="nominal", levels=tuple(levels), role=role, **base), notes


def _canonical_levels(text: pd.Series) -> list[str]:
    """Distinct levels, merging case variants under their most frequent spelling."""
    counts = text.value_counts()
    chosen: dict[str, str] = {}
    for spelling in counts.index:  # most frequent first
        chosen.setdefault(str(spelling).casefold(), str(spelling))
    return sorted(chosen.values(), key=_natural_key)


def _natural_key(level: str):
    try:
        return (0, float(level), level)
    except ValueError:
        return (1, 0.0, level.casefold())


def infer_dictionary(frame: pd.DataFrame) -> tuple[DataDictionary, list[str]]:
    """Infer a dictionary entry for every column; returns the dictionary and notes."""
    specs, notes = [], []
    for name in frame.columns:
        spec, col_notes = infer_column(str(name), frame[name])
        specs.append(spec)
        notes.extend(col_notes)
    return DataDictionary(tuple(specs)), notes


def merge_dictionary(inferred: DataDictionary, given: DataDictionary) -> tuple[DataDictionary, list[str]]:
    """Entries from a saved dictionary override the inferred ones, column by column."""
    notes = []
    given_names = set(given.names)
    merged = tuple(given.get(c.name) if c.name in given_names else c for c in inferred.columns)
    absent = [n for n in given.names if n not in inferred]
    if absent:
        notes.append("The data dictionary describes column(s) that are not in the data: "
                     + ", ".join(map(repr, absent)) + "; they were skipped.")
    return DataDictionary(merged), notes


# --- typed values ---------------------------------------------------------------------------


@dataclass(frozen=True)
class TypedColumn:
    """One column's values ready for analysis."""

    spec: ColumnSpec
    numbers: np.ndarray | None = field(default=None, repr=False)  # numeric kind
    codes: np.ndarray | None = field(default=None, repr=False)  # category kinds, -1 = missing
    notes: tuple[str, ...] = ()

    @property
    def missing(self) -> np.ndarray:
        if self.numbers is not None:
            return np.isnan(self.numbers)
        return self.codes < 0


def typed_column(values: pd.Series, spec: ColumnSpec) -> TypedColumn:
    """Parse one column according to its dictionary entry."""
    if spec.kind == "numeric":
        parsed = parse_numbers(values, spec.missing_codes, spec.display)
        return TypedColumn(spec, numbers=parsed.values, notes=parsed.notes)
    if spec.kind in CATEGORY_KINDS:
        levels = spec.levels
        if not levels:
            present = level_text(values[~is_missing_text(values, spec.missing_codes)])
            levels = tuple(_canonical_levels(present))
            spec = replace(spec, levels=levels)
        cat, notes = parse_levels(values, levels, spec.missing_codes, spec.display)
        return TypedColumn(spec, codes=np.asarray(cat.codes, dtype=np.int32), notes=notes)
    raise InputError(f"Column {spec.display!r} is of kind {spec.kind!r}, which cannot be used "
                     "in a tree; set its kind to numeric, binary, ordinal or nominal.")


def positive_level(spec: ColumnSpec) -> str:
    """The positive class of a binary outcome: as set, else 'yes'/'1'/the second level."""
    if spec.positive:
        if spec.positive not in spec.levels:
            raise InputError(f"The positive class {spec.positive!r} is not a level of "
                             f"{spec.display!r} (levels: {', '.join(spec.levels)}).")
        return spec.positive
    for level in spec.levels:
        if level.casefold() in YES_WORDS:
            return level
    return spec.levels[-1]

