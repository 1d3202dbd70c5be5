"""Small wording helpers shared by the chart, the report and the command line."""

from __future__ import annotations


def plural(n: int, singular: str, plural: str) -> str:
    """A count with its noun: '1 outcome box', '2,104 outcome boxes'.

    Both forms are given: English plurals are not made by one rule (box, boxes; patient,
    patients), and cutting a letter off the plural gave '1 outcome boxe'."""
    return f"{n:,} {singular if n == 1 else plural}"


def short_fingerprint(digest: str) -> str:
    """The first 12 hexadecimal digits of a SHA-256, as every page and screen shows it."""
    return str(digest)[:12]
