"""Running the side-by-side work on a Dask cluster (core/work_place.py): a real cluster on
127.0.0.1 started here (a scheduler and two worker processes) gives the same path,
cross-validated risks, chosen tree, nested cross-validation and bootstrap stability as one
worker and as all cores; a wrong or unreachable address is refused in one sentence (exit 2);
what is sent to the workers holds neither the spreadsheet, its path nor any identifier.

The equality checks need no outside reference: the work is split the same way and every seed
comes from the settings, so the numbers must be bit-for-bit the same (common practice for
parallel statistical software: results may not depend on where they were computed).
"""

from __future__ import annotations

import pickle

import numpy as np
import pandas as pd
import pytest

pytest.importorskip("distributed")

from distributed import Client, LocalCluster, get_task_stream  # noqa: E402

from core.checking import bootstrap_stability, nested_cross_validate  # noqa: E402
from core.data import read_table  # noqa: E402
from core.design import DesignSpec  # noqa: E402
from core.dictionary import infer_dictionary  # noqa: E402
from core.errors import InputError  # noqa: E402
from core.sizing import CVSettings, DerivationRequest, derive  # noqa: E402
from core.work_place import ALL_CORES, WorkPlace  # noqa: E402
from tests.helpers import DEMO_CSV, demo_inputs, prunella, run_prunella  # noqa: E402

PREDICTORS = ("age", "resp_rate", "spo2", "arrival_mode", "crp", "triage_level")


@pytest.fixture(scope="module")
def cluster():
    """A scheduler and two single-threaded worker processes on 127.0.0.1, as the brief of a
    real cluster would start them (`dask scheduler`, `dask worker tcp://...`), made here."""
    with LocalCluster(n_workers=2, threads_per_worker=1, processes=True, host="127.0.0.1",
                      dashboard_address=None) as local, Client(local) as client:
        client.wait_for_workers(2, timeout=120)
        yield local.scheduler_address, client


def _request(**cv) -> DerivationRequest:
    # Repeated grouped folds: each visit is held out twice, so its losses are added up across
    # folds, which is where an order that followed the workers would show.
    return DerivationRequest(DesignSpec("admitted", PREDICTORS, patient_id="patient_id"),
                             cv=CVSettings(folds=5, repeats=2, seed=3, **cv))


def _workers_used(stream) -> set[str]:
    return {task["worker"] for task in stream.data}


def test_a_local_cluster_gives_the_same_path_risks_and_tree_as_one_worker_and_all_cores(cluster):
    address, client = cluster
    table, dictionary, _ = demo_inputs()
    request = _request()
    one = derive(table, dictionary, request, jobs=1)
    every = derive(table, dictionary, request, jobs=ALL_CORES)
    with get_task_stream(client) as stream:
        on_cluster = WorkPlace(cluster=address).run(derive, table, dictionary, request)
    assert len(_workers_used(stream)) == 2  # both workers took folds
    assert len(stream.data) >= 10  # every fold of 5 × 2 went to the cluster
    for other in (every, on_cluster):
        assert np.array_equal(one.path.leaves, other.path.leaves)
        assert np.array_equal(one.path.alpha, other.path.alpha)
        assert np.array_equal(one.path.cv_risk, other.path.cv_risk)  # exact, not approximate
        assert np.array_equal(one.path.cv_se, other.path.cv_se)
        assert one.model.nodes == other.model.nodes
        assert one.model.to_dict() == other.model.to_dict()


def test_nested_cv_and_bootstrap_resamples_run_on_the_cluster_with_the_same_results(cluster):
    address, client = cluster
    table, dictionary, _ = demo_inputs()
    derivation = derive(table, dictionary, _request(), jobs=1)
    data, request, model = derivation.data, derivation.request, derivation.model
    place = WorkPlace(cluster=address)
    local_nested = nested_cross_validate(data, request, outer_folds=3, jobs=1)
    local_stability = bootstrap_stability(data, request, model, resamples=4, jobs=ALL_CORES)
    with get_task_stream(client) as stream:
        nested = place.run(nested_cross_validate, data, request, outer_folds=3)
    assert len(stream.data) >= 3 and _workers_used(stream)  # the outer folds went there
    with get_task_stream(client) as stream:
        stability = place.run(bootstrap_stability, data, request, model, resamples=4)
    assert len(stream.data) >= 4 and _workers_used(stream)  # so did the resamples
    assert repr(nested) == repr(local_nested)  # repr: the ROC's first cut is NaN, never == itself
    assert repr(stability) == repr(local_stability)


def test_prunella_fit_and_report_on_the_cluster_write_the_same_files_as_one_worker(cluster,
                                                                                   tmp_path):
    address, client = cluster
    common = ("fit", DEMO_CSV, "--outcome", "admitted", "--predictors", ",".join(PREDICTORS),
              "--folds", "4", "--quiet")
    here = prunella(*common, "--jobs", "1", "--model", tmp_path / "here.json")
    there = prunella(*common, "--cluster", address, "--model", tmp_path / "there.json")
    assert here.returncode == 0 and there.returncode == 0, there.stderr
    assert (tmp_path / "here.json").read_text() == (tmp_path / "there.json").read_text()
    # The report's nested CV and bootstrap resamples on the cluster: the same report.
    report = ("report", tmp_path / "here.json", DEMO_CSV, "--bootstrap", "3", "--outer-folds",
              "2", "--date", "2026-12-03")
    here = prunella(*report, "--jobs", "1", "--out", tmp_path / "here.pdf")
    with get_task_stream(client) as stream:
        there = prunella(*report, "--cluster", address, "--out", tmp_path / "there.pdf")
    assert here.returncode == 0 and there.returncode == 0, there.stderr
    assert len(stream.data) >= 10 + 2 + 3  # folds, outer folds and resamples went there
    assert (tmp_path / "here.pdf").read_bytes() == (tmp_path / "there.pdf").read_bytes()


def test_the_rows_travel_to_each_worker_once_not_inside_every_task(cluster, monkeypatch):
    """On a cluster the analysis is scattered to every worker before the folds, outer folds
    and resamples start; each task sent carries only a reference (a future) to it, so a
    large cohort crosses the network once per worker, not once per batch of tasks."""
    from distributed import Future

    from core.design.analysis import AnalysisData

    address, client = cluster
    table, dictionary, _ = demo_inputs()
    derivation = derive(table, dictionary, _request(), jobs=1)
    data, request, model = derivation.data, derivation.request, derivation.model
    submitted, scattered = [], []
    real_submit, real_scatter = Client.submit, Client.scatter

    def submit(self, func, *args, **kwargs):
        submitted.append(kwargs.get("tasks", args))
        return real_submit(self, func, *args, **kwargs)

    def scatter(self, data, *args, **kwargs):
        scattered.append((data, kwargs.get("broadcast")))
        return real_scatter(self, data, *args, **kwargs)

    monkeypatch.setattr(Client, "submit", submit)
    monkeypatch.setattr(Client, "scatter", scatter)
    place = WorkPlace(cluster=address)
    on_cluster = place.run(derive, table, dictionary, request)
    place.run(nested_cross_validate, data, request, outer_folds=2)
    place.run(bootstrap_stability, data, request, model, resamples=2)
    # One broadcast of the analysis per Parallel call: derive's folds, the outer folds, the
    # resamples.
    rows_sent = [d for d, broadcast in scattered
                 if broadcast and any(isinstance(x, AnalysisData) for x in d)]
    assert len(rows_sent) == 3
    arguments = [a for tasks in submitted for _, args, kwargs in tasks
                 for a in list(args) + list(kwargs.values())]
    assert len(submitted) >= 3 and arguments
    assert not any(isinstance(a, AnalysisData) for a in arguments)  # never the rows themselves
    assert sum(isinstance(a, Future) for a in arguments) >= 10 + 2 + 2
    assert np.array_equal(on_cluster.path.cv_risk, derivation.path.cv_risk)


@pytest.mark.parametrize("address, said", [
    ("tcp://127.0.0.1:1", "No Dask scheduler answered at 'tcp://127.0.0.1:1' within 5 seconds."),
    ("127.0.0.1:1", "No Dask scheduler answered at '127.0.0.1:1' within 5 seconds."),
    ("tcp://no-such-scheduler.invalid:8786", "No Dask scheduler answered"),
    ("scheduler-without-port", "'scheduler-without-port' is not the address of a Dask scheduler."),
    ("http://10.0.0.5:8786", "'http://10.0.0.5:8786' is not the address of a Dask scheduler."),
    ("", "'' is not the address of a Dask scheduler."),
])
def test_a_wrong_or_unreachable_address_is_refused_in_one_sentence(address, said, tmp_path):
    out = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--cluster", address,
                   "--model", tmp_path / "m.json")
    assert out.returncode == 2
    line = out.stderr.strip().splitlines()[0]
    assert said in line and "Traceback" not in out.stderr
    assert not (tmp_path / "m.json").exists()
    with pytest.raises(InputError):  # the app's way in: the same refusal, as a message
        WorkPlace(cluster=address).run(lambda jobs: None)


def test_a_port_where_something_else_answers_is_refused(tmp_path):
    import socket
    import threading

    server = socket.socket()
    server.bind(("127.0.0.1", 0))
    server.listen()
    port = server.getsockname()[1]

    def talk_nonsense():  # not a scheduler: greets with bytes Dask cannot read, then hangs up
        for _ in range(3):
            try:
                conn, _ = server.accept()
            except OSError:
                return
            conn.sendall(b"\xff" * 64)
            conn.close()

    threading.Thread(target=talk_nonsense, daemon=True).start()
    try:
        out = prunella("report", tmp_path / "none.json", DEMO_CSV, "--cluster",
                       f"tcp://127.0.0.1:{port}", "--out", tmp_path / "r.pdf")
    finally:
        server.close()
    assert out.returncode == 2 and "No Dask scheduler answered" in out.stderr
    assert "Traceback" not in out.stderr


def test_the_real_command_gives_up_on_an_unreachable_cluster_without_hanging(tmp_path):
    # A child process, as a user runs it; the timeout only stops a hang (not a speed check):
    # the scheduler is given 5 seconds (core.work_place.CLUSTER_TIMEOUT).
    from core.work_place import CLUSTER_TIMEOUT

    assert CLUSTER_TIMEOUT <= 10
    for command in ("fit", "report"):
        args = ([DEMO_CSV, "--outcome", "admitted", "--model", tmp_path / "m.json"]
                if command == "fit" else [tmp_path / "m.json", DEMO_CSV, "--out",
                                          tmp_path / "r.pdf"])
        out = run_prunella(command, *args, "--cluster", "tcp://127.0.0.1:9", timeout=60)
        assert out.returncode == 2, out.stderr
        assert out.stderr.strip() == ("prunella: No Dask scheduler answered at "
                                      "'tcp://127.0.0.1:9' within 5 seconds.")


def _identifying_table(tmp_path):
    """An invented clinic file with record numbers, names and a lab limit that is noted."""
    rng = np.random.default_rng(14)
    n = 240
    frame = pd.DataFrame({
        "record_no": [f"RN-{700000 + i}" for i in range(n)],
        "full_name": [f"Quillon Marsh-{i:03d}" for i in range(n)],
        "lactate": np.round(rng.gamma(2.0, 1.2, n), 1).astype(object),
        "heart_rate": rng.integers(50, 150, n),
        "ward": rng.choice(["Larch", "Rowan", "Hazel"], n),
    })
    frame.loc[:9, "lactate"] = "<0.5"  # read as a limit, with a note quoting the cell
    frame["sepsis"] = np.where((frame["heart_rate"] > 110) | (rng.random(n) < 0.1), "yes", "no")
    path = tmp_path / "clinic_extract_2026.csv"
    frame.to_csv(path, index=False)
    return path, frame


def test_only_numbers_travel_to_the_workers(tmp_path, monkeypatch):
    """Every task sent to a worker (folds, outer folds, resamples), as it is pickled for the
    trip, holds neither the file's name or path, nor any record number or name."""
    import core.checking.nested as nested_module
    import core.checking.stability as stability_module
    import core.sizing.cross_validated_path as path_module
    import joblib

    path, frame = _identifying_table(tmp_path)
    sent = []

    class Recording(joblib.Parallel):
        def __call__(self, iterable):
            tasks = list(iterable)
            sent.extend(pickle.dumps(task) for task in tasks)
            return super().__call__(tasks)

    for module in (path_module, nested_module, stability_module):
        monkeypatch.setattr(module, "Parallel", Recording)
    table = read_table(path)
    dictionary, _ = infer_dictionary(table.frame)
    request = DerivationRequest(DesignSpec("sepsis", ("lactate", "heart_rate", "ward"),
                                           patient_id="record_no"), cv=CVSettings(folds=3))
    derivation = derive(table, dictionary, request, jobs=2)
    assert any(note for note in derivation.data.notes)  # the limit was noted at reading
    nested_cross_validate(derivation.data, request, outer_folds=2, jobs=2)
    bootstrap_stability(derivation.data, request, derivation.model, resamples=2, jobs=2)
    assert len(sent) == (1 + 3) + 2 + 2  # the full-data tree and 3 folds, 2 outer folds, 2 resamples
    forbidden = [str(path), path.name, "clinic_extract", "RN-70", "Quillon", "<0.5"]
    forbidden += list(frame["record_no"].sample(20, random_state=0))
    from core.checking.identifier_key import identifier_key

    key = identifier_key()  # this computer's key for the identifier digests stays here too
    assert key is not None
    for payload in sent:
        for text in forbidden:
            assert text.encode() not in payload, text
        assert key not in payload and key.hex().encode() not in payload
        assert b"DataFrame" not in payload and b"LoadedTable" not in payload
