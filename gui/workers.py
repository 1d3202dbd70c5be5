"""Long work off the UI thread: a thin QRunnable runs a core function and turns its progress
callback into Qt signals; Cancel sets a flag the core function checks between steps.

Core functions take ``progress(done, total)`` and ``cancel() -> bool`` and raise
core.errors.Cancelled when asked to stop, so they never know about Qt.
"""

from __future__ import annotations

import sys
import threading
import traceback
from typing import Callable

from PySide6.QtCore import QObject, QRunnable, QThreadPool, Signal

from core.errors import Cancelled, PrunellaError


class JobSignals(QObject):
    """What a job reports; delivered on the UI thread (queued across threads)."""

    progress = Signal(int, int)
    done = Signal(object)
    failed = Signal(str)
    cancelled = Signal()
    finished = Signal()  # after done, failed or cancelled


class Job(QRunnable):
    """Runs ``fn(*args, progress=..., cancel=..., **kwargs)`` on the global thread pool."""

    def __init__(self, fn: Callable, *args, takes_progress: bool = True, **kwargs) -> None:
        super().__init__()
        self.setAutoDelete(False)  # Python owns the object; Qt must not delete it under us
        self.signals = JobSignals()
        self._fn, self._args, self._kwargs = fn, args, kwargs
        self._takes_progress = takes_progress
        self._stop = threading.Event()
        self.running = False

    def cancel(self) -> None:
        self._stop.set()

    @property
    def cancel_requested(self) -> bool:
        return self._stop.is_set()

    def _progress(self, done: int, total: int) -> None:
        self.signals.progress.emit(int(done), int(total))

    def run(self) -> None:  # on a pool thread
        self.running = True
        try:
            if self._takes_progress:
                result = self._fn(*self._args, progress=self._progress,
                                  cancel=self._stop.is_set, **self._kwargs)
            else:
                result = self._fn(*self._args, **self._kwargs)
            if self._stop.is_set():
                raise Cancelled()
        except Cancelled:
            self.signals.cancelled.emit()
        except PrunellaError as exc:
            self.signals.failed.emit(str(exc))
        except MemoryError:
            self.signals.failed.emit("The computer ran out of memory; close other programs, or "
                                     "use fewer rows or predictors.")
        except Exception as exc:  # never let a bug take the window down
            traceback.print_exc(file=sys.stderr)
            self.signals.failed.emit(f"Something went wrong inside Prunella ({type(exc).__name__}: "
                                     f"{exc}). Your work is still open; please report this.")
        else:
            self.signals.done.emit(result)
        finally:
            self.running = False
            self.signals.finished.emit()


def start(job: Job) -> Job:
    """Queue a job on the global pool and return it (keep the reference while it runs)."""
    job.running = True  # from now until the pool thread is done with it
    QThreadPool.globalInstance().start(job)
    return job
