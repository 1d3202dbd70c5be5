"""The held-out check is made once, by core, when a size is chosen, and kept on the Derivation
so the app and the report read it rather than redo it."""

from __future__ import annotations

from pathlib import Path

import pytest

from core.data import read_table
from core.design import DesignSpec
from core.dictionary import DataDictionary
from core.sizing import DerivationRequest, choose_model, derive

SAMPLE = Path(__file__).resolve().parents[1] / "sample_data"


@pytest.fixture(scope="module")
def demo():
    table = read_table(SAMPLE / "breathless_ed.csv")
    dictionary = DataDictionary.load(SAMPLE / "breathless_ed.dictionary.json")
    predictors = tuple(c.name for c in dictionary.columns if c.role == "predictor")
    return table, dictionary, predictors


@pytest.fixture(scope="module")
def derivation(demo):
    table, dictionary, predictors = demo
    request = DerivationRequest(DesignSpec("admitted", predictors, patient_id="patient_id"),
                                holdout=0.25)
    return derive(table, dictionary, request)


def test_derive_keeps_the_check_it_made(derivation):
    kept = derivation.heldout_check
    assert kept is not None and kept.kind == "held-out"
    again = derivation.check_on_heldout()
    assert (kept.n, kept.summary, kept.model_fingerprint) == \
        (again.n, again.summary, again.model_fingerprint)
    assert derivation.model.extra["validation"]["summary"] == kept.summary


def test_the_requested_size_again_is_the_same_tree(derivation):
    # Why the app may skip choose_model for the size derive already chose.
    same = choose_model(derivation, derivation.request.size)
    assert same.model.to_dict() == derivation.model.to_dict()
    assert same.heldout_check.summary == derivation.heldout_check.summary


def test_another_size_keeps_its_own_check(derivation):
    other = choose_model(derivation, "min")
    record = other.model.extra["validation"]
    assert other.heldout_check is not None
    assert other.heldout_check.model_fingerprint == record["model_fingerprint"]
    assert other.heldout_check.summary == record["summary"]


def test_no_heldout_part_no_check(demo):
    table, dictionary, predictors = demo
    request = DerivationRequest(DesignSpec("admitted", predictors, patient_id="patient_id"))
    derivation = derive(table, dictionary, request)
    assert derivation.heldout is None and derivation.heldout_check is None
    assert choose_model(derivation, "min").heldout_check is None
