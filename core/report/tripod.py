"""The closing table of the report: TRIPOD items that apply, and where the report answers them.

Item numbers and topics follow the TRIPOD checklist for prediction model development and
validation (Collins, Reitsma, Altman & Moons 2015), written down from memory: check them
against the published checklist before citing the table. Items a generated report cannot
answer (background, objectives, blinding, funding, discussion) are left to the authors.
"""

from __future__ import annotations

from typing import Callable

# (item, topic, section names that answer it), in checklist order.
_ITEMS: tuple[tuple[str, str, tuple[str, ...]], ...] = (
    ("1", "Title: identifies development and/or validation, the population and the outcome",
     ("title",)),
    ("2", "Summary of source, participants, predictors, outcome, model and performance",
     ("title",)),
    ("4a", "Study design or source of data", ("Data source",)),
    ("4b", "Key study dates: start and end of accrual", ("Participants",)),
    ("5a", "Key elements of the setting (sites)", ("Participants",)),
    ("5b", "Eligibility criteria for participants", ("Participants",)),
    ("6a", "Definition of the outcome", ("Outcome and predictors",)),
    ("7a", "Definition of all predictors used", ("Outcome and predictors",)),
    ("8", "How the study size was arrived at (participants and outcome events)",
     ("Participants", "The chosen tree")),
    ("9", "How missing data were handled", ("Missing values",)),
    ("10a", "How predictors were handled in the analyses", ("Outcome and predictors",
                                                            "Model building")),
    ("10b", "Type of model, model-building procedure, internal validation",
     ("Model building", "Pruning path and the choice of size", "Performance")),
    ("10c", "For validation: how the predictions were calculated", ("The chosen tree",
                                                                   "Performance")),
    ("10d", "Measures used to assess model performance", ("Performance",)),
    ("11", "Details of how risk groups were created", ("The chosen tree",)),
    ("12", "For validation: differences from the development data (setting, eligibility, "
           "outcome, predictors)", ("Performance",)),
    ("13a", "Flow of participants, numbers with and without the outcome", ("Participants",)),
    ("13b", "Characteristics of the participants, including missing data",
     ("Participants", "Missing values")),
    ("13c", "For validation: comparison with the development data", ("Performance",)),
    ("14a", "Number of participants and outcome events in each analysis",
     ("Participants", "Performance")),
    ("15a", "The full prediction model", ("The chosen tree",)),
    ("15b", "How to use the prediction model", ("The chosen tree",)),
    ("16", "Performance measures with confidence intervals", ("Performance",)),
    ("18", "Limitations (non-representative sample, few events, missing data)",
     ("Limitations and cautions", "Stability")),
    ("19a", "For validation: discussion of the results with reference to development "
            "performance", ("Performance", "Limitations and cautions")),
)

_NOT_ANSWERED = "3a, 3b, 5c, 6b, 7b, 14b, 17, 19b, 20, 21, 22"


def tripod_rows(contents, section: Callable[[str], int]) -> list[tuple[str, str, str]]:
    """(item, topic, where answered) for each applicable item; ``section`` numbers sections."""
    validated = bool(contents.checks)
    rows = []
    for item, topic, where in _ITEMS:
        if item in ("10c", "12", "13c", "19a") and not validated:
            rows.append((item, topic, "not applicable: no held-out or external check in this report"))
            continue
        places = []
        for name in where:
            places.append("title page and summary" if name == "title" else
                          f"section {section(name)} ({name.lower()})")
        rows.append((item, topic, "; ".join(places)))
    rows.append(("–", "Items for the authors to complete", _NOT_ANSWERED))
    return rows
