"""Offline by design: loading, fitting, checking, charting and reporting open no network socket.

Every way a Python program reaches the network goes through the ``socket`` module (HTTP
libraries included), so the test replaces its constructors and resolvers with ones that fail
loudly, then runs the whole workflow in this process on the invented demo cohort.
"""

from __future__ import annotations

import socket

import pytest


class NetworkUsed(AssertionError):
    pass


@pytest.fixture
def no_network(monkeypatch):
    attempts = []

    def refuse(*args, **kwargs):
        attempts.append(args)
        raise NetworkUsed(f"network access attempted: {args!r}")

    class NoSocket(socket.socket):
        def __init__(self, *args, **kwargs):
            refuse("socket", *args)

    for name in ("create_connection", "getaddrinfo", "gethostbyname", "gethostbyname_ex",
                 "socketpair", "create_server", "fromfd"):
        monkeypatch.setattr(socket, name, refuse)
    monkeypatch.setattr(socket, "socket", NoSocket)
    monkeypatch.setattr(socket.socket, "connect", refuse, raising=False)
    return attempts


def test_the_whole_workflow_opens_no_socket(no_network, tmp_path):
    from core.chart import ChartOptions, write_chart
    from core.checking import check_table
    from core.data import read_table
    from core.design import DesignSpec, guard_design
    from core.dictionary import DataDictionary, infer_dictionary, merge_dictionary
    from core.model import TreeModel
    from core.report import prepare_report, write_report
    from core.safe_files import write_csv_safely
    from core.sizing import CVSettings, DerivationRequest, derive
    from tests.helpers import DEMO_CSV, DEMO_DICTIONARY, DEMO_XLSX  # imported under the guard too

    table = read_table(DEMO_XLSX, sheet="visits")
    inferred, _ = infer_dictionary(table.frame, table.row_numbers)
    dictionary, _ = merge_dictionary(inferred, DataDictionary.load(DEMO_DICTIONARY))
    predictors = tuple(c.name for c in dictionary.by_role("predictor"))
    design = DesignSpec("admitted", predictors, patient_id="patient_id")
    report = guard_design(table.frame, dictionary, design)
    derivation = derive(table, dictionary,
                        DerivationRequest(report.design, cv=CVSettings(folds=5), holdout=0.25))
    model = derivation.model
    model.save(tmp_path / "model.json")
    model = TreeModel.load(tmp_path / "model.json")
    scored = model.apply(table.frame)
    write_csv_safely(table.frame.assign(box=scored.leaf), tmp_path / "scored.csv")
    csv_table = read_table(DEMO_CSV)
    check = check_table(model, csv_table, source="the demo file again")
    assert check is not None
    contents = prepare_report(derivation, external=(check,), nested=True, outer_folds=2,
                              bootstrap=2)
    write_report(contents, tmp_path / "report.pdf")
    assert (tmp_path / "report.pdf").read_bytes().startswith(b"%PDF")
    write_chart(model, tmp_path / "chart.pdf", ChartOptions(paper="a3"))  # 7 boxes: A3 holds them
    assert (tmp_path / "chart.pdf").read_bytes().startswith(b"%PDF")
    assert no_network == []


def test_the_guard_really_catches_a_socket(no_network):
    with pytest.raises(NetworkUsed):
        socket.create_connection(("192.0.2.1", 80), timeout=0.1)
    with pytest.raises(NetworkUsed):
        socket.socket(socket.AF_INET, socket.SOCK_STREAM)
    import urllib.request

    with pytest.raises(Exception):
        urllib.request.urlopen("http://192.0.2.1/", timeout=0.1)
    assert len(no_network) == 3
