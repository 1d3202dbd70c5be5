"""What is predicted from what: the user's choices checked against the data, and the rows with
a recorded outcome parsed for growing (:class:`AnalysisData`).

Problems that make the choices unusable (no such column, one class, no predictor recorded …)
are refused here with one message each; the guards (core/design/guards.py) look for trees
that would look good for the wrong reasons.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass, field, replace

import numpy as np
import pandas as pd

from ..dictionary.columns import CATEGORY_KINDS, PREDICTOR_KINDS, ColumnSpec, DataDictionary
from ..dictionary.identity import may_group_patients
from ..dictionary.typed_columns import TypedColumn, positive_level, typed_column
from ..document_checks import NAME_LENGTH, TEXT_LENGTH
from ..errors import InputError
from ..messages.message import say
from ..phrases import patients_among, rows_word

TASKS = ("classification", "regression")


@dataclass(frozen=True)
class DesignSpec:
    """What is predicted from what: the user's choices on the outcome step."""

    outcome: str
    predictors: tuple[str, ...]
    task: str | None = None  # None: suggest from the outcome
    positive: str | None = None  # positive class of a two-class outcome
    patient_id: str | None = None
    site: str | None = None


@dataclass(frozen=True)
class AnalysisData:
    """Rows with a recorded outcome, ready for growing and cross-validation."""

    task: str
    outcome: ColumnSpec
    y: np.ndarray = field(repr=False)  # class index (int) or value (float)
    classes: tuple[str, ...]  # class labels; for two classes (negative, positive)
    predictors: tuple[TypedColumn, ...] = field(repr=False)
    rows: np.ndarray = field(repr=False)  # positions of these rows in the source table
    groups: np.ndarray | None = field(default=None, repr=False)  # patient codes
    sites: np.ndarray | None = field(default=None, repr=False)  # site codes
    site_levels: tuple[str, ...] = ()
    notes: tuple[str, ...] = ()

    @property
    def n(self) -> int:
        return len(self.y)

    @property
    def positive(self) -> str | None:
        return self.classes[1] if self.task == "classification" and len(self.classes) == 2 else None

    def for_workers(self) -> "AnalysisData":
        """What the side-by-side work (folds, outer folds, resamples) is sent: the predictors'
        values and codes, the outcome codes, patient and site codes and row positions, without
        the notes of reading (which quote cells). Never the file, its path or any identifier:
        patients are integer codes (``groups``)."""
        return AnalysisData(
            task=self.task, outcome=self.outcome, y=self.y, classes=self.classes,
            predictors=tuple(TypedColumn(p.spec, numbers=p.numbers, codes=p.codes)
                             for p in self.predictors),
            rows=self.rows, groups=self.groups, sites=self.sites, site_levels=self.site_levels)

    def subset(self, rows: np.ndarray) -> "AnalysisData":
        """The same analysis restricted to some of its rows (positions into ``y``)."""
        rows = np.asarray(rows)
        return AnalysisData(
            task=self.task, outcome=self.outcome, y=self.y[rows], classes=self.classes,
            predictors=tuple(_take(p, rows) for p in self.predictors), rows=self.rows[rows],
            groups=None if self.groups is None else self.groups[rows],
            sites=None if self.sites is None else self.sites[rows], site_levels=self.site_levels,
            notes=self.notes,
        )


def _take(column: TypedColumn, rows: np.ndarray) -> TypedColumn:
    return TypedColumn(column.spec,
                       numbers=None if column.numbers is None else column.numbers[rows],
                       codes=None if column.codes is None else column.codes[rows],
                       notes=column.notes)


def suggest_task(spec: ColumnSpec) -> str:
    """Classification for categories, regression for numbers."""
    return "classification" if spec.kind in CATEGORY_KINDS else "regression"


def default_design(dictionary: DataDictionary, outcome: str | None = None, *,
                   predictors: Iterable[str] | None = None, exclude: Iterable[str] = (),
                   patient_id: str | None = None, site: str | None = None,
                   task: str | None = None, positive: str | None = None) -> DesignSpec | None:
    """The choices a derivation starts from, for the app's outcome step and ``prunella fit``
    alike: the outcome named (else the dictionary's first outcome column), the patient number
    and site named (else the dictionary's), the task and, for two classes, the outcome to catch
    suggested from the outcome unless named; the predictors named, else every column the
    dictionary marks as a predictor of a kind a tree can ask about. The outcome, the patient
    number, the site and ``exclude`` are never predictors. None when no outcome is named and
    the dictionary marks none."""
    if outcome is None:
        outcomes = dictionary.by_role("outcome")
        if not outcomes:
            return None
        outcome = outcomes[0].name
    spec = dictionary.get(outcome)
    if patient_id is None:  # a name marked as the patient number is not taken as one
        patient_id = next((c.name for c in dictionary.by_role("patient_id")
                           if may_group_patients(c)), None)
    if site is None:
        site = next((c.name for c in dictionary.by_role("site")), None)
    patient_id = None if patient_id == outcome else patient_id
    if patient_id is not None and not may_group_patients(dictionary.get(patient_id)):
        # Names, addresses, phone numbers and e-mails are never the patient number.
        raise InputError(say("design.patient_id_identifying", column=patient_id))
    site = None if site == outcome else site
    for name in exclude:
        dictionary.get(name)  # an unknown column is refused by name
    taken = set(exclude) | {outcome, patient_id, site}
    if predictors is None:
        predictors = (c.name for c in dictionary.by_role("predictor") if c.kind in PREDICTOR_KINDS)
    task = task or suggest_task(spec)
    if positive is not None:
        positive = same_level(positive, spec.levels)
    if positive is None and task == "classification" and spec.kind in CATEGORY_KINDS \
            and len(spec.levels) == 2:
        positive = positive_level(spec)
    return DesignSpec(outcome, tuple(p for p in predictors if p not in taken), task=task,
                      positive=positive, patient_id=patient_id, site=site)


def same_level(given: str, levels: Iterable[str]) -> str:
    """The level ``given`` names: itself when it is one, else the one level equal to it but
    for case and surrounding spaces (levels are lowercased when read, while the file and the
    user write "Yes"); unchanged when none or several match, to be refused with the levels."""
    levels = tuple(levels)
    if given in levels:
        return given
    matches = [level for level in levels if level.strip().casefold() == given.strip().casefold()]
    return matches[0] if len(matches) == 1 else given


def _check_lengths(spec: ColumnSpec) -> None:
    """Refuse an entry a model file could not hold (core/document_checks.py's limits): the
    model would be written, then refused by every command that reads it."""
    fields = [("label", spec.label, NAME_LENGTH), ("unit", spec.unit, NAME_LENGTH),
              ("note", spec.note, TEXT_LENGTH), ("positive level", spec.positive or "",
                                                 NAME_LENGTH)]
    fields += [("level", level, NAME_LENGTH) for level in spec.levels]
    fields += [("missing-value code", code, NAME_LENGTH) for code in spec.missing_codes]
    for field, text, limit in fields:
        if len(text) > limit:
            raise InputError(say("design.entry_too_long", column=spec.name[:40], field=field,
                                 length=f"{len(text):,}", limit=f"{limit:,}"))


def prepare_analysis(frame: pd.DataFrame, dictionary: DataDictionary,
                     design: DesignSpec) -> AnalysisData:
    """Check the user's choices against the data and parse the columns they name."""
    if design.outcome not in frame.columns:
        raise InputError(say("design.no_outcome_column", name=design.outcome,
                             columns=", ".join(repr(c) for c in list(frame.columns)[:20])))
    # The roles are those of this design, not of the dictionary it came with: the command
    # line's dictionary may still call the outcome a predictor while the app's says
    # "outcome", and one tree must have one fingerprint whichever path grew it.
    outcome = _in_role(dictionary.get(design.outcome), "outcome")
    for spec in [outcome] + [dictionary.get(n) for n in design.predictors if n in dictionary]:
        _check_lengths(spec)
    task = design.task or suggest_task(outcome)
    if task not in TASKS:
        raise InputError(say("design.bad_task", task=task))
    notes: list[str] = []
    if not design.predictors:
        raise InputError(say("design.no_predictors"))
    for name in design.predictors:
        if name not in frame.columns:
            raise InputError(say("design.no_predictor_column", name=name))
        if name == design.outcome:
            raise InputError(say("design.outcome_as_predictor", name=name))
    for role, name in (("patient identifier", design.patient_id), ("site", design.site)):
        if name is not None and name not in frame.columns:
            raise InputError(say("design.no_role_column", name=name, role=role))

    y, classes, keep = _outcome_values(frame[design.outcome], outcome, task, design.positive)
    n_dropped = int((~keep).sum())
    if n_dropped:
        notes.append(say("design.rows_without_outcome", n=n_dropped))
    rows = np.flatnonzero(keep)
    predictors = []
    for name in design.predictors:
        spec = _in_role(dictionary.get(name), "predictor")
        if spec.kind == "date":
            raise InputError(say("design.predictor_is_date", name=spec.display))
        if spec.kind not in PREDICTOR_KINDS:
            if spec.note.startswith("identity: "):  # never teach the way round the guard
                raise InputError(say("design.predictor_identifies", name=spec.display,
                                     what=spec.note[len("identity: "):]))
            raise InputError(say("design.predictor_kind", name=spec.display, kind=spec.kind))
        column = typed_column(frame[name].iloc[rows].reset_index(drop=True), spec)
        notes.extend(column.notes)
        if column.missing.all():
            raise InputError(say("design.predictor_never_recorded", name=spec.display))
        predictors.append(column)
    groups = _codes(frame[design.patient_id].iloc[rows]) if design.patient_id else None
    sites, site_levels = (None, ())
    if design.site:
        site_values = frame[design.site].iloc[rows]
        cat = pd.Categorical(site_values.astype("string").str.strip())
        sites = np.asarray(cat.codes, dtype=np.int64)
        site_levels = tuple(str(c) for c in cat.categories)
    return AnalysisData(task=task, outcome=outcome, y=y, classes=classes,
                        predictors=tuple(predictors), rows=rows, groups=groups, sites=sites,
                        site_levels=site_levels, notes=tuple(notes))


def _in_role(spec: ColumnSpec, role: str) -> ColumnSpec:
    return spec if spec.role == role else replace(spec, role=role)


def rows_word_of_table(frame: pd.DataFrame, patient_id: str | None) -> str:
    """"visits" or "patients" for a table's rows before anything is grown (the app's step 3
    labels): by the patient-number column as the analysis reads it (core/phrases.py)."""
    if not patient_id or patient_id not in frame.columns:
        return rows_word(len(frame), None)
    return rows_word(len(frame), patients_among(_codes(frame[patient_id])))


def _codes(values: pd.Series) -> np.ndarray:
    text = values.astype("string").str.strip()
    codes, _ = pd.factorize(text, use_na_sentinel=True)
    # A visit without a patient identifier is its own group.
    missing = codes < 0
    codes = codes.astype(np.int64)
    codes[missing] = codes.max(initial=-1) + 1 + np.arange(int(missing.sum()))
    return codes


def _outcome_values(values: pd.Series, spec: ColumnSpec, task: str, positive: str | None):
    name = spec.display
    if task == "regression":
        if spec.kind in CATEGORY_KINDS and spec.kind != "ordinal":
            raise InputError(say("design.categories_need_classification", name=name))
        numeric_spec = spec if spec.kind == "numeric" else ColumnSpec(spec.name, kind="numeric",
                                                                      label=spec.label)
        parsed = typed_column(values, numeric_spec).numbers
        keep = ~np.isnan(parsed)
        if not keep.any():
            raise InputError(say("design.outcome_not_recorded", name=name))
        if np.unique(parsed[keep]).size < 2:
            raise InputError(say("design.outcome_constant", name=name))
        return parsed[keep], (), keep
    if spec.kind == "numeric":
        spec = ColumnSpec(spec.name, kind="nominal", label=spec.label, role=spec.role,
                          missing_codes=spec.missing_codes)
    column = typed_column(values, spec)
    spec = column.spec
    keep = column.codes >= 0
    if not keep.any():
        raise InputError(say("design.outcome_not_recorded", name=name))
    present = np.unique(column.codes[keep])
    if present.size < 2:
        only = spec.levels[present[0]]
        raise InputError(say("design.one_class", name=name, only=only))
    levels = [spec.levels[i] for i in present]
    codes = column.codes[keep]
    remap = np.full(len(spec.levels), -1, dtype=np.int64)
    if len(levels) == 2:
        positive = None if positive is None else same_level(positive, levels)
        pos = positive or (spec.positive if spec.positive in levels else None) or \
            positive_level(ColumnSpec(spec.name, kind="binary", levels=tuple(levels)),
                           np.bincount(column.codes[keep])[present].tolist())
        if pos not in levels:
            raise InputError(say("design.positive_not_level", positive=pos, name=name,
                                 levels=", ".join(map(repr, levels))))
        neg = levels[0] if levels[1] == pos else levels[1]
        classes = (neg, pos)
    else:
        classes = tuple(levels)
    for index, label in enumerate(classes):
        remap[spec.levels.index(label)] = index
    return remap[codes], classes, keep
