"""Errors a user can meet. Every message says what is wrong and how to fix it."""

from __future__ import annotations

from .messages.message import say


class PrunellaError(Exception):
    """Base class: the message is a complete sentence meant for the user, said by
    :func:`core.messages.say`."""

    def __str__(self) -> str:
        # The message itself, not a copy of its text, so its code goes wherever str(error) goes.
        if len(self.args) == 1 and isinstance(self.args[0], str):
            return self.args[0]
        return super().__str__()


class InputError(PrunellaError):
    """The data, the settings or a file cannot be used as given."""


class Cancelled(PrunellaError):
    """The user cancelled a long computation."""

    def __init__(self, message: str | None = None) -> None:
        super().__init__(message if message is not None else say("work.cancelled"))
