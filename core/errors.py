"""Errors a user can meet. Every message says what is wrong and how to fix it."""

from __future__ import annotations


class PrunellaError(Exception):
    """Base class: the message is a complete sentence meant for the user."""


class InputError(PrunellaError):
    """The data, the settings or a file cannot be used as given."""


class Cancelled(PrunellaError):
    """The user cancelled a long computation."""

    def __init__(self, message: str = "The computation was cancelled.") -> None:
        super().__init__(message)
