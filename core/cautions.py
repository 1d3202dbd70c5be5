"""The standard cautions, worded once: every chart, report and the app's first screen shows them."""

from __future__ import annotations

CAUTION_TITLE = "Decision support only"

CAUTIONS: tuple[str, ...] = (
    "This decision tree supports and does not replace clinical judgment.",
    "It was derived from one cohort and is valid only for patients like those it was derived from.",
    "It must be validated locally before use.",
    "Follow local protocols, policies and regulations and licensed clinical practice.",
    "It is not a certified medical device unless separately approved.",
)

UNCHECKED_BANNER = "Not yet checked on separate patients"

UNCHECKED_DETAIL = (
    "This tree has only been cross-validated on the patients it was derived from; check it on "
    "held-out or external patients before relying on it."
)


def caution_text(separator: str = " ") -> str:
    """All cautions as one paragraph."""
    return separator.join(CAUTIONS)
