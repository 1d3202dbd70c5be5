"""Where the long work runs: the folds, the nested cross-validation and the bootstrap
resamples, on this computer's cores (all of them by default) or on a Dask cluster.

Every piece of that work goes through joblib, so the place is only a joblib setting: a number
of worker processes, or joblib's Dask backend bound to a ``distributed.Client``. The work is
split the same way whatever the place, and every seed comes from the user's settings, never
from the worker count, so one worker, all cores and a cluster give identical results.
What travels to a cluster's workers is what each task needs: the rows as numbers (the design
matrix's columns, the outcome, fold positions) and the settings; never the spreadsheet file,
its path, or identifier values (patients are travelled as integer codes).
"""

from __future__ import annotations

import os
from contextlib import contextmanager
from contextvars import ContextVar
from dataclasses import dataclass
from typing import Callable, Iterator, TypeVar

from .errors import InputError
from .messages.message import say
from .option_limits import check_setting

ALL_CORES = -1  # joblib's word for every core of this computer
CLUSTER_TIMEOUT = 5.0  # seconds to reach a scheduler before saying it cannot be reached

T = TypeVar("T")

# The cluster's client while WorkPlace.active() runs, so the work inside can send its data
# to the workers once (sent_once); per thread, like joblib's own setting.
_CLIENT: ContextVar = ContextVar("prunella_cluster_client", default=None)


def cores() -> int:
    """How many cores this computer offers this process."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # not every system has affinity
        return max(1, os.cpu_count() or 1)


@dataclass(frozen=True)
class WorkPlace:
    """Where folds, nested CV and bootstrap resamples run.

    ``jobs``: worker processes on this computer (-1 = all cores, the default). ``cluster``: the
    address of a Dask scheduler (``tcp://host:8786``); when given, the work runs on that
    cluster's workers and ``jobs`` is not used.
    """

    jobs: int = ALL_CORES
    cluster: str | None = None

    def __post_init__(self) -> None:
        check_setting("jobs", self.jobs)  # the table of limits: 1 to 1024, or -1
        if self.cluster is not None and not self.cluster.strip():
            # An empty address is a mistake, never a quiet run on this computer.
            raise InputError(say("work.cluster_address", address=self.cluster))

    @property
    def n_jobs(self) -> int:
        """The ``jobs`` argument for core's long work: every worker of a cluster, else ``jobs``."""
        return ALL_CORES if self.cluster is not None else self.jobs

    def describe(self) -> str:
        """Where the work runs, in words."""
        if self.cluster:
            return f"the Dask cluster at {self.cluster}"
        if self.jobs == ALL_CORES:
            n = cores()
            return f"this computer, all {n} cores" if n > 1 else "this computer, its one core"
        return f"this computer, {self.jobs} worker{'s' if self.jobs != 1 else ''}"

    @contextmanager
    def active(self, timeout: float = CLUSTER_TIMEOUT) -> Iterator[None]:
        """Within this block joblib runs on this place (for a cluster: connected within
        ``timeout`` seconds, else refused with one sentence; disconnected afterwards).
        joblib's setting is per thread, so enter it in the thread that runs the work."""
        if self.cluster is None:
            yield
            return
        client = connect(self.cluster, timeout)
        try:
            import joblib

            token = _CLIENT.set(client)
            try:
                with joblib.parallel_config(backend="dask", client=client):
                    yield
            finally:
                _CLIENT.reset(token)
        finally:
            client.close()

    def run(self, work: Callable[..., T], *args, **kwargs) -> T:
        """``work(*args, jobs=..., **kwargs)`` run on this place."""
        with self.active():
            return work(*args, jobs=self.n_jobs, **kwargs)


@contextmanager
def sent_once(*shared: object) -> Iterator[None]:
    """Within this block, on a cluster, ``shared`` (the analysis every task of a Parallel call
    reads) travels to each worker once, beforehand, and the tasks carry only a reference to
    it; without this every batch of tasks would carry its own copy of the rows. Off a cluster
    nothing changes: joblib's own processes already share large arrays through memory-mapped
    files. Run the Parallel call, and read its results, inside the block."""
    client = _CLIENT.get()
    if client is None:
        yield
        return
    import joblib

    # joblib's Dask backend scatters these to every worker (broadcast) and swaps each task's
    # argument that *is* one of them (same object) for its future.
    with joblib.parallel_config(backend="dask", client=client, scatter=list(shared)):
        yield


def connect(address: str, timeout: float = CLUSTER_TIMEOUT):
    """A ``distributed.Client`` for the scheduler at ``address``, refused with one sentence
    when Dask is not installed, the address is not a scheduler's (``tcp://host:port``), or no
    Dask scheduler answers within ``timeout`` seconds."""
    try:
        from distributed import Client
    except ImportError:
        raise InputError(say("work.no_dask")) from None
    address = address.strip()
    host_port = scheduler_address(address)
    refused = InputError(say("work.cluster_unreachable", address=address,
                             seconds=f"{timeout:g}"))
    try:
        _scheduler_answers(address, host_port, timeout)
        return Client(address, timeout=timeout, set_as_default=False)
    except InputError:
        raise
    except Exception as error:  # refused, timed out, or something that is not a scheduler
        raise refused from error


def scheduler_address(address: str) -> tuple[str, int]:
    """The host and port of a scheduler's address (``tcp://host:port``, ``tls://host:port``
    or ``host:port``), refused with one sentence when it is not one."""
    from distributed.comm.addressing import parse_address, parse_host_port

    wrong = InputError(say("work.cluster_address", address=address))
    try:
        scheme, place = parse_address(address.strip())  # "host:port" alone means tcp
        host, port = parse_host_port(place)  # raises without a port
    except (ValueError, TypeError):
        raise wrong from None
    if scheme not in ("tcp", "tls") or not host or not 0 < int(port) < 65536 or " " in host:
        raise wrong
    return host, int(port)


def _scheduler_answers(address: str, host_port: tuple[str, int], timeout: float) -> None:
    """Raise unless a Dask scheduler completes its greeting at ``address`` within ``timeout``
    seconds. Tried before a Client is made, because a Client that cannot connect keeps
    retrying past its timeout and then complains while being thrown away."""
    import asyncio
    import threading

    import socket

    from distributed.comm import connect as dask_connect

    outcome: list[BaseException | None] = []

    async def greet() -> None:
        comm = await asyncio.wait_for(dask_connect(address, timeout=timeout), timeout)
        await comm.close()

    def attempt() -> None:  # in its own thread, so a slow name lookup cannot outlast timeout
        try:
            # A closed port is told at once; Dask's own connect would retry until timeout.
            socket.create_connection(host_port, timeout=timeout).close()
            asyncio.run(greet())
            outcome.append(None)
        except BaseException as error:  # noqa: BLE001 - handed to the caller
            outcome.append(error)

    thread = threading.Thread(target=attempt, daemon=True, name="prunella-cluster-check")
    thread.start()
    thread.join(timeout + 1.0)
    if not outcome:
        raise TimeoutError(f"no answer from {address} within {timeout:g} s")
    if outcome[0] is not None:
        raise outcome[0]
