"""Choices the app and the command line share (core functions, so both behave alike): the
default outcome and predictors, the dictionary's roles following the outcome step, the
identity guard's "keep it anyway" policy, and a report made from results already computed."""

from __future__ import annotations

import pytest

from core.checking import bootstrap_stability, nested_cross_validate
from core.design import DesignSpec, default_design
from core.design.guards import kept_on_purpose
from core.dictionary import PREDICTOR_KINDS
from core.errors import InputError
from core.report import prepare_report
from core.sizing import CVSettings, DerivationRequest, derive
from tests.helpers import demo_inputs


def test_default_design_from_the_demo_dictionary():
    _table, dictionary, _ = demo_inputs()
    design = default_design(dictionary)
    assert design.outcome == "admitted" and design.task == "classification"
    assert design.positive == "yes" and design.patient_id == "patient_id"
    assert design.site == "campus"
    marked = [c.name for c in dictionary.columns if c.role == "predictor"
              and c.kind in PREDICTOR_KINDS]
    assert design.predictors == tuple(marked)
    # Another outcome: a number, so regression, and never its own predictor.
    other = default_design(dictionary, "los_hours", predictors=design.predictors + ("los_hours",))
    assert other.task == "regression" and other.positive is None
    assert "los_hours" not in other.predictors
    # Named choices win; excluded columns, the patient number and the site never are asked.
    named = default_design(dictionary, "admitted", predictors=("age", "spo2", "campus"),
                           exclude=("spo2",), patient_id="visit_id", site=None)
    assert named.predictors == ("age",) and named.patient_id == "visit_id"
    with pytest.raises(InputError, match="no column called 'nope'"):
        default_design(dictionary, "admitted", exclude=("nope",))


def test_default_design_without_an_outcome_role():
    _table, dictionary, _ = demo_inputs()
    bare = dictionary.with_column("admitted", role="ignore")
    assert default_design(bare) is None


def test_roles_follow_the_outcome_step():
    _table, dictionary, _ = demo_inputs()
    moved = dictionary.with_roles("los_hours", patient_id=None, site="campus")
    assert [c.name for c in moved.by_role("outcome")] == ["los_hours"]
    assert moved.get("admitted").role == "ignore"
    assert moved.by_role("patient_id") == () and moved.get("patient_id").role == "ignore"
    assert moved.get("age").role == "predictor"  # other roles are left as they are
    back = moved.with_roles("admitted", patient_id="patient_id", site="campus")
    assert [c.name for c in back.by_role("outcome")] == ["admitted"]
    assert back.get("patient_id").role == "patient_id"
    with pytest.raises(InputError):
        dictionary.with_roles("no such column")


def test_keep_it_anyway_policy():
    offered = ("age", "surname", "postcode")
    # Ticked back one at a time: kept.
    assert kept_on_purpose((), ("age", "surname"), offered, ("surname", "postcode")) == {"surname"}
    # Ticked with "All": nothing that identifies patients is kept.
    assert kept_on_purpose((), offered, offered, ("surname", "postcode"),
                           many_at_once=True) == frozenset()
    # A kept column that is unticked is left out again; one not offered any more stays kept.
    assert kept_on_purpose({"surname", "ward"}, ("age",), offered, ()) == {"ward"}


def test_report_uses_results_already_computed():
    table, dictionary, predictors = demo_inputs()
    request = DerivationRequest(DesignSpec("admitted", predictors, patient_id="patient_id"),
                                cv=CVSettings(folds=3), holdout=0.25)
    derivation = derive(table, dictionary, request)
    nested = nested_cross_validate(derivation.data, request, outer_folds=2)
    stability = bootstrap_stability(derivation.data, request, derivation.model, resamples=3)
    steps = []
    contents = prepare_report(derivation, outer_folds=2, bootstrap=3, nested_done=nested,
                              stability_done=stability, progress=lambda d, t: steps.append(t))
    assert contents.nested is nested and contents.stability is stability
    assert contents.checks == (derivation.heldout_check,)  # not checked again
    assert steps == []  # nothing was left to run
