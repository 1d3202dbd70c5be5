"""The multi-page methods and validation report (PDF) of a derived and checked tree.

``prepare_report`` runs what the report needs beyond the derivation (nested cross-validation,
bootstrap stability, the held-out check) with progress and cancel; ``render_report`` lays the
result out with reportlab; ``write_report`` saves it atomically. The sections
(core/report/sections.py) follow what a methods section or a governance committee asks for,
and the closing table maps the TRIPOD items (Collins, Reitsma, Altman & Moons 2015) that apply
to the section answering each.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

from .. import __version__
from ..checking.nested import DEFAULT_OUTER_FOLDS, NestedResult, nested_cross_validate
from ..checking.new_patients import ValidationResult, check_heldout
from ..checking.stability import DEFAULT_RESAMPLES, Stability, bootstrap_stability
from ..errors import Cancelled
from ..safe_files import write_bytes_atomic
from ..sizing.cross_validated_path import CancelFlag, Progress
from ..sizing.derivation import Derivation
from .section_numbers import SECTIONS, section
from .sections import SECTION_WRITERS, _title_page
from .style import Styles, build_pdf, para

__all__ = ["SECTIONS", "ReportContents", "prepare_report", "render_report", "section",
           "write_report"]


@dataclass(frozen=True)
class ReportContents:
    """Everything the report shows: the derivation and the checks made on it."""

    derivation: Derivation = field(repr=False)
    checks: tuple[ValidationResult, ...] = ()
    nested: NestedResult | None = None
    stability: Stability | None = None
    notes: tuple[str, ...] = ()  # e.g. "the data file differs from the model's"
    printed: str | None = None  # date printed, as it should appear

    @property
    def model(self):
        return self.derivation.model


def prepare_report(derivation: Derivation, external: tuple[ValidationResult, ...] = (),
                   nested: bool = True, outer_folds: int = DEFAULT_OUTER_FOLDS,
                   bootstrap: int = DEFAULT_RESAMPLES, jobs: int = 1,
                   progress: Progress | None = None, cancel: CancelFlag | None = None,
                   notes: tuple[str, ...] = (), printed: str | None = None) -> ReportContents:
    """Run nested cross-validation and ``bootstrap`` stability resamples (0 = none) and collect
    the held-out and ``external`` checks. ``progress(done, total)`` counts outer folds plus
    resamples; ``cancel()`` returning True raises :class:`Cancelled`."""
    total = (outer_folds if nested else 0) + max(bootstrap, 0)
    done_before = 0

    def step(done: int, _total: int) -> None:
        if progress:
            progress(done_before + done, total)

    if cancel is not None and cancel():
        raise Cancelled()
    nested_result = None
    if nested:
        nested_result = nested_cross_validate(derivation.data, derivation.request,
                                              outer_folds=outer_folds, jobs=jobs,
                                              progress=step, cancel=cancel)
        done_before = outer_folds
    stability = None
    if bootstrap > 0:
        stability = bootstrap_stability(derivation.data, derivation.request, derivation.model,
                                        resamples=bootstrap, jobs=jobs, progress=step,
                                        cancel=cancel)
    checks = ((check_heldout(derivation),) if derivation.heldout is not None else ()) + tuple(external)
    return ReportContents(derivation, checks, nested_result, stability, tuple(notes), printed)


def render_report(contents: ReportContents) -> bytes:
    """The report as PDF bytes (deterministic for the same contents)."""
    s = Styles()
    model = contents.model
    title = f"Decision tree for {model.outcome.display.lower()}: methods and validation report"
    story = _title_page(contents, title, s)
    for number, name in enumerate(SECTIONS, 1):
        story.append(para(f"{number}. {name}", s.h1))
        story += SECTION_WRITERS[name](contents, s)
    footer = (f"Prunella {__version__} · model {model.short_fingerprint} · decision support only "
              f"(section {section('Limitations and cautions')})")
    return build_pdf(story, header=title, footer=footer, title=title, author="Prunella")


def write_report(contents: ReportContents, path: str | Path) -> None:
    """Render and save the report (written atomically; never over an input file)."""
    write_bytes_atomic(path, render_report(contents))


