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
from dataclasses import dataclass
from typing import Callable, Iterator, TypeVar

from .errors import InputError
from .messages.message import say
from .option_limits import check_setting

ALL_CORES = -1  # joblib's word for every core of this computer
CLUSTER_TIMEOUT = 5.0  # seconds to reach a scheduler before saying it cannot be reached

T = TypeVar("T")


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

    @property
    def n_jobs(self) -> int:
        """The ``jobs`` argument for core's long work: every worker of a cluster, else ``jobs``."""
        return ALL_CORES if self.cluster else self.jobs

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
        if not self.cluster:
            yield
            return
        client = connect(self.cluster, timeout)
        try:
            import joblib

            with joblib.parallel_config(backend="dask", client=client):
                yield
        finally:
            client.close()

    def run(self, work: Callable[..., T], *args, **kwargs) -> T:
        """``work(*args, jobs=..., **kwargs)`` run on this place."""
        with self.active():
            return work(*args, jobs=self.n_jobs, **kwargs)


def connect(address: str, timeout: float = CLUSTER_TIMEOUT):
    """A ``distributed.Client`` for the scheduler at ``address``, refused with one sentence
    when Dask is not installed or the scheduler does not answer within ``timeout`` seconds."""
    try:
        from distributed import Client
    except ImportError:
        raise InputError(say("work.no_dask")) from None
    address = address.strip()
    if not address:
        raise InputError(say("work.cluster_unreachable", address=address, seconds=timeout))
    try:
        return Client(address, timeout=timeout, set_as_default=False)
    except (OSError, TimeoutError, ValueError, TypeError) as error:
        raise InputError(say("work.cluster_unreachable", address=address,
                             seconds=f"{timeout:g}")) from error
