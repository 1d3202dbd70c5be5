"""The numbered sections of the methods report, in order: headings, cross-references and the
TRIPOD table all take their numbers from here, so none is typed by hand."""

from __future__ import annotations

SECTIONS = ("Data source", "Participants", "Outcome and predictors", "Missing values",
            "Model building", "Pruning path and the choice of size", "The chosen tree",
            "Performance", "Stability", "Limitations and cautions", "TRIPOD checklist")


def section(name: str) -> int:
    """The number of a report section (the TRIPOD table refers to these)."""
    return SECTIONS.index(name) + 1
