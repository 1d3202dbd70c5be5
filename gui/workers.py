"""Long work off the UI thread: a thin QRunnable runs a core function and turns its progress
callback into Qt signals; Cancel sets a flag the core function checks between steps.

Core functions take ``progress(done, total)`` and ``cancel() -> bool`` and raise
core.errors.Cancelled when asked to stop, so they never know about Qt.
"""

from __future__ import annotations

import itertools
import sys
import threading
import traceback
from typing import Callable

from PySide6.QtCore import QObject, QRunnable, QThreadPool, Signal
from shiboken6 import isValid

from core.errors import Cancelled, PrunellaError
from core.messages import say


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
            self.signals.failed.emit(say("work.out_of_memory"))
        except Exception as exc:  # never let a bug take the window down
            traceback.print_exc(file=sys.stderr)
            self.signals.failed.emit(say("work.internal_error", kind=type(exc).__name__,
                                         detail=str(exc)))
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


_TOKENS = itertools.count(1)  # one sequence for every runner: a token is never handed out twice


class JobRunner(QObject):
    """One kind of background work of a step, run one job at a time.

    It keeps the busy state (``busy_changed``), shows progress on an optional progress bar,
    enables an optional Cancel button while something runs, and delivers a job's result only
    while it is still wanted: each start takes a fresh token, and ``forget()`` (a new file, a
    new tree) or a newer start retires it, so a late result of old work is dropped.

    ``latest_wins``: starting while a job runs cancels it (its result is dropped) and the new
    job starts as soon as the old one is off the pool thread, so two never compete for the
    processor. Otherwise a start while busy is refused (returns False).
    """

    busy_changed = Signal(bool)
    progressed = Signal(int, int)  # the wanted job's progress (done, total)

    def __init__(self, parent: QObject | None = None, progress=None, cancel_button=None,
                 latest_wins: bool = False, hide_when_idle: bool = False) -> None:
        super().__init__(parent)
        self.progress_bar, self.cancel_button = progress, cancel_button
        self.latest_wins, self.hide_when_idle = latest_wins, hide_when_idle
        self.job: Job | None = None  # the latest job started (for closing and tests)
        self._token: int | None = None  # the wanted result's token; None when idle
        self._pending: tuple | None = None  # the next start, waiting for the pool thread
        self._held: Callable | None = None  # hold(): busy before the job can start
        if cancel_button is not None:
            cancel_button.clicked.connect(self.cancel)
        self._show_idle()

    @property
    def busy(self) -> bool:
        """A result is awaited (a job runs or waits for its turn)."""
        return self._token is not None

    @property
    def running(self) -> bool:
        """A job of this runner is still on a pool thread (wanted or not)."""
        return self.job is not None and self.job.running

    def start(self, fn: Callable, *args, done: Callable, failed: Callable | None = None,
              cancelled: Callable | None = None, takes_progress: bool = True, **kwargs) -> bool:
        """Run ``fn(*args, **kwargs)`` in the background; ``done(result)``, ``failed(message)``
        or ``cancelled()`` is called on the UI thread if the result is still wanted."""
        if self.busy and not self.latest_wins and self._held is None:
            return False
        token = next(_TOKENS)
        was_busy, self._token, self._held = self.busy, token, None
        request = (token, fn, args, kwargs, takes_progress, done, failed, cancelled)
        if self.running:
            self.job.cancel()
            self._pending = request
        else:
            self._launch(request)
        if not was_busy:
            self._show_busy()
        return True

    def hold(self, cancelled: Callable) -> bool:
        """Be busy before the job can start (it waits for something else); the next start
        goes ahead, and Cancel meanwhile calls ``cancelled()``."""
        if self.busy:
            return False
        self._token, self._held = next(_TOKENS), cancelled
        self._show_busy()
        return True

    @property
    def holding(self) -> bool:
        return self._held is not None

    def cancel(self) -> None:
        """The user's Cancel: ask the job to stop; ``cancelled()`` follows when it has."""
        self._pending = None
        if self.running:
            self.job.cancel()
            if self.cancel_button is not None:
                self.cancel_button.setEnabled(False)
        elif self.busy:
            held = self._held
            self._finish()
            if held is not None:
                held()

    def forget(self) -> None:
        """The result is no longer wanted (the window closes, another file is opened): stop
        the job and drop whatever it still sends back."""
        self._pending = None
        if self.running:
            self.job.cancel()
        if self.busy:
            self._finish()

    def _launch(self, request: tuple) -> None:
        token, fn, args, kwargs, takes_progress, done, failed, cancelled = request
        job = Job(fn, *args, takes_progress=takes_progress, **kwargs)
        job.token = token
        signals = job.signals
        signals.progress.connect(lambda d, t: self._progress(token, d, t))
        signals.done.connect(lambda result: self._deliver(token, done, result))
        signals.failed.connect(lambda message: self._deliver(token, failed, message))
        signals.cancelled.connect(lambda: self._deliver(token, cancelled))
        signals.finished.connect(self._thread_free)
        self.job = job
        start(job)

    def _deliver(self, token: int, handler: Callable | None, *value) -> None:
        if not isValid(self) or token != self._token:
            return  # overtaken or forgotten, or the step is gone with its window
        self._finish()
        if handler is not None:
            handler(*value)

    def _finish(self) -> None:
        self._token, self._held = None, None
        self._show_idle()
        self.busy_changed.emit(False)

    def _thread_free(self) -> None:
        if isValid(self) and self._pending is not None and not self.running:
            request, self._pending = self._pending, None
            self._launch(request)

    def _progress(self, token: int, done: int, total: int) -> None:
        if not isValid(self) or token != self._token:
            return
        bar = self.progress_bar
        if bar is not None and total > 0:
            bar.setFormat("%v of %m")
            bar.setRange(0, total)
            bar.setValue(done)
        self.progressed.emit(done, total)

    def _show_busy(self) -> None:
        if self.progress_bar is not None:
            self.progress_bar.setRange(0, 0)  # moving until the first progress report
            self.progress_bar.setVisible(True)
        if self.cancel_button is not None:
            self.cancel_button.setEnabled(True)
            self.cancel_button.setVisible(True)
        self.busy_changed.emit(True)

    def _show_idle(self) -> None:
        bar = self.progress_bar
        if bar is not None:
            bar.setRange(0, 1)
            bar.setValue(0)
            bar.setFormat("")
            bar.setVisible(not self.hide_when_idle)
        if self.cancel_button is not None:
            self.cancel_button.setEnabled(False)
            self.cancel_button.setVisible(not self.hide_when_idle)
