"""Demo-cohort derivations shared by the chart tests (each is grown once per test session).

Invented demo data — not a reference: these runs exercise the chart on our own scenario.
"""

from __future__ import annotations

from dataclasses import replace
from functools import lru_cache

import pandas as pd

from core.design import DesignSpec
from core.dictionary import ColumnSpec, DataDictionary
from core.sizing import CVSettings, DerivationRequest, choose_model, derive
from tests.helpers import demo_inputs


@lru_cache(maxsize=None)
def admitted():
    """The demo's classification run (10-fold CV, patients kept together), 1-SE tree."""
    table, dictionary, predictors = demo_inputs()
    return derive(table, dictionary, DerivationRequest(
        DesignSpec("admitted", predictors, patient_id="patient_id")))


@lru_cache(maxsize=None)
def admitted_size(leaves: int):
    return choose_model(admitted(), leaves)


@lru_cache(maxsize=None)
def length_of_stay():
    """A regression run on los_hours (5-fold CV to keep the suite quick)."""
    table, dictionary, predictors = demo_inputs()
    dictionary = dictionary.with_column("los_hours", role="outcome")
    return derive(table, dictionary, DerivationRequest(
        DesignSpec("los_hours", predictors, task="regression", patient_id="patient_id"),
        cv=CVSettings(folds=5)))


@lru_cache(maxsize=None)
def three_classes():
    """A three-class outcome made from the stay: sent home quickly, short stay, long stay."""
    table, dictionary, predictors = demo_inputs()
    frame = table.frame.copy()
    hours = pd.to_numeric(frame["los_hours"], errors="coerce")
    frame["stay"] = pd.cut(hours, [-1, 6, 72, float("inf")],
                           labels=["under 6 h", "6 to 72 h", "over 72 h"]).astype(str)
    table = replace(table, frame=frame)
    spec = ColumnSpec("stay", role="outcome", kind="ordinal", label="Length of stay group",
                      levels=("under 6 h", "6 to 72 h", "over 72 h"))
    dictionary = DataDictionary(dictionary.columns + (spec,))
    return derive(table, dictionary, DerivationRequest(
        DesignSpec("stay", predictors, patient_id="patient_id"), cv=CVSettings(folds=5)))


@lru_cache(maxsize=None)
def length_of_stay_size(leaves: int):
    return choose_model(length_of_stay(), leaves)


@lru_cache(maxsize=None)
def three_classes_size(leaves: int):
    return choose_model(three_classes(), leaves)


def choose(derivation, leaves: int):
    return choose_model(derivation, leaves)
