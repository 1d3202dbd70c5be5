"""What the methods report shows: the derivation and the checks made on it.

:func:`prepare_report` runs what the report needs beyond the derivation (nested
cross-validation and bootstrap stability, with progress and cancel) and collects the held-out
check the derivation made and any external checks. The sections (core/report/sections.py)
read a :class:`ReportContents`; core/report/rendering.py lays them out.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, field

from ..checking.nested import DEFAULT_OUTER_FOLDS, NestedResult, nested_cross_validate
from ..checking.new_patients import CheckResult
from ..checking.stability import DEFAULT_RESAMPLES, Stability, bootstrap_stability
from ..progress import CancelFlag, Progress, stop_if_cancelled
from ..sizing.derivation import Derivation


@dataclass(frozen=True)
class ReportContents:
    """Everything the report shows: the derivation and the checks made on it."""

    derivation: Derivation = field(repr=False)
    checks: tuple[CheckResult, ...] = ()
    nested: NestedResult | None = None
    stability: Stability | None = None
    notes: tuple[str, ...] = ()  # e.g. "the data file differs from the model's"
    printed: str | None = None  # date printed (YYYY-MM-DD); None: the day it is written

    @property
    def model(self):
        return self.derivation.model

    @property
    def printed_on(self) -> dt.date:
        """The report's date: on its title page, its chart and in the PDF's own dates."""
        return dt.date.fromisoformat(self.printed) if self.printed else dt.date.today()


def prepare_report(derivation: Derivation, external: tuple[CheckResult, ...] = (),
                   nested: bool = True, outer_folds: int = DEFAULT_OUTER_FOLDS,
                   bootstrap: int = DEFAULT_RESAMPLES, jobs: int = 1,
                   progress: Progress | None = None, cancel: CancelFlag | None = None,
                   notes: tuple[str, ...] = (), printed: str | None = None,
                   nested_done: NestedResult | None = None,
                   stability_done: Stability | None = None) -> ReportContents:
    """Run nested cross-validation and ``bootstrap`` stability resamples (0 = none) and collect
    the held-out and ``external`` checks. Results already computed (``nested_done``,
    ``stability_done``, the derivation's own held-out check) are used as they are, not run
    again. ``progress(done, total)`` counts the outer folds plus resamples still to run;
    ``cancel()`` returning True raises :class:`Cancelled`."""
    run_nested = nested and nested_done is None
    run_bootstrap = bootstrap > 0 and stability_done is None
    total = (outer_folds if run_nested else 0) + (bootstrap if run_bootstrap else 0)
    done_before = 0

    def step(done: int, _total: int) -> None:
        if progress:
            progress(done_before + done, total)

    stop_if_cancelled(cancel)
    nested_result = nested_done if nested else None
    if run_nested:
        nested_result = nested_cross_validate(derivation.data, derivation.request,
                                              outer_folds=outer_folds, jobs=jobs,
                                              progress=step, cancel=cancel)
        done_before = outer_folds
    stability = stability_done if bootstrap > 0 else None
    if run_bootstrap:
        stability = bootstrap_stability(derivation.data, derivation.request, derivation.model,
                                        resamples=bootstrap, jobs=jobs, progress=step,
                                        cancel=cancel)
    held_out = (derivation.heldout_check,) if derivation.heldout_check is not None else ()
    checks = held_out + tuple(external)
    return ReportContents(derivation, checks, nested_result, stability, tuple(notes), printed)
