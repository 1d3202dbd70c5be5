"""Long work reports ``progress(done, total)`` and stops when ``cancel()`` returns True.

Every long core function (the cross-validated path, nested cross-validation, stability, the
report, the leakage screen) takes these two callbacks, so the app can show a progress bar and
a Cancel button, and the command line can run the same code without them.
"""

from __future__ import annotations

from typing import Callable

from .errors import Cancelled

Progress = Callable[[int, int], None]
CancelFlag = Callable[[], bool]


def stop_if_cancelled(cancel: CancelFlag | None) -> None:
    """Raise :class:`core.errors.Cancelled` when the user has asked to stop."""
    if cancel is not None and cancel():
        raise Cancelled()
