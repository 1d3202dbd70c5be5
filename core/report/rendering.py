"""The multi-page methods and validation report (PDF) of a derived and checked tree.

``render_report`` lays out what core/report/contents.py gathered, with reportlab;
``write_report`` saves it atomically. The sections (core/report/sections.py) follow what a
methods section or a governance committee asks for, and the closing table maps the TRIPOD items
(Collins, Reitsma, Altman & Moons 2015) that apply to the section answering each.
"""

from __future__ import annotations

from pathlib import Path

from .. import __version__
from ..phrases import in_sentence
from ..safe_files import write_bytes_atomic
from .contents import ReportContents
from .section_numbers import SECTIONS, section
from .sections import SECTION_WRITERS, title_page
from .style import Styles, build_pdf, para


def render_report(contents: ReportContents) -> bytes:
    """The report as PDF bytes (deterministic for the same contents)."""
    s = Styles()
    model = contents.model
    title = f"Decision tree for {in_sentence(model.outcome.display)}: methods and validation report"
    story = title_page(contents, title, s)
    for number, name in enumerate(SECTIONS, 1):
        story.append(para(f"{number}. {name}", s.h1))
        story += SECTION_WRITERS[name](contents, s)
    footer = (f"Prunella {__version__} · model {model.short_fingerprint} · decision support only "
              f"(section {section('Limitations and cautions')})")
    return build_pdf(story, header=title, footer=footer, title=title, author="Prunella",
                     dated=contents.printed_on)


def write_report(contents: ReportContents, path: str | Path) -> None:
    """Render and save the report (written atomically; never over an input file)."""
    write_bytes_atomic(path, render_report(contents))


