"""The guards of step 2, kept up to date in the background.

Whenever the outcome, the predictors, the patient identifier or the settings the guards depend
on change, core.design.guards runs again on a pool thread (after a short pause, so ticking several
columns starts one check, not one per tick); a check that is overtaken by a newer change is
cancelled. Columns that look like they identify patients are left out of the predictors unless
the user ticked one back deliberately (Session.kept). Everything judged here is judged by core;
this module only says which columns to ask about and hands the result to the session.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from PySide6.QtCore import QObject, QTimer

from core.design import DesignSpec, GuardFinding, GuardReport, guard_design, identity_findings
from core.dictionary import PREDICTOR_KINDS, DataDictionary
from gui.workers import JobRunner

DELAY_MS = 250  # wait this long after the last change before checking


@dataclass(frozen=True)
class Screen:
    """What the guards found for one set of choices."""

    design: DesignSpec  # the choices with the identity-like columns left out
    left_out: tuple[GuardFinding, ...] = ()  # identity-like columns left out (with why)
    kept: tuple[GuardFinding, ...] = ()  # identity-like columns the user kept on purpose
    report: GuardReport | None = None  # leakage, repeat visits, rare classes
    error: str | None = None  # the checks themselves could not be made
    key: tuple | None = None  # what was checked (see GuardWatch.key)

    @property
    def left_out_columns(self) -> tuple[str, ...]:
        return tuple(f.column for f in self.left_out)

    @property
    def other_findings(self) -> tuple[GuardFinding, ...]:
        """Leakage, repeat-visit and rare-class findings (identity is in left_out and kept)."""
        if self.report is None:
            return ()
        return tuple(f for f in self.report.findings if f.kind != "identity")

    @property
    def warnings(self) -> tuple[GuardFinding, ...]:
        """Everything the user should look at before growing (kept identity columns too)."""
        return self.left_out + self.kept + tuple(f for f in self.other_findings
                                                 if f.severity != "note")


def offered_columns(dictionary: DataDictionary, design: DesignSpec | None) -> tuple[str, ...]:
    """The columns step 2 offers as predictors (what a tree can ask about, minus the outcome,
    the patient identifier and the site; all of them before an outcome is chosen)."""
    taken = set() if design is None else {design.outcome, design.patient_id, design.site}
    return tuple(c.name for c in dictionary.columns
                 if c.kind in PREDICTOR_KINDS and c.name not in taken)


def screen_design(frame, dictionary: DataDictionary, design: DesignSpec,
                  offered: tuple[str, ...], kept: frozenset[str], grouped: bool, seed: int,
                  min_leaf: int, progress=None, cancel=None) -> Screen:
    """Run core's guards on one set of choices (in a worker).

    Every offered column that identifies patients is left out (ticked or not, so the user
    always sees why it is not asked about) unless it is in ``kept``; the other guards run on
    what is left."""
    left_out = identity_findings(frame, dictionary, [c for c in offered if c not in kept])
    kept_found = identity_findings(frame, dictionary, [c for c in offered if c in kept])
    out = {f.column for f in left_out}
    guarded = replace(design, predictors=tuple(p for p in design.predictors if p not in out))
    report = guard_design(frame, dictionary, guarded, keep=guarded.predictors, grouped=grouped,
                          seed=seed, min_leaf=min_leaf, cancel=cancel)
    return Screen(design=guarded, left_out=left_out, kept=kept_found, report=report)


class GuardWatch(QObject):
    """Starts, restarts and cancels the guards as the session changes."""

    def __init__(self, session, delay_ms: int = DELAY_MS, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self.session = session
        # A newer check cancels the one under way; its result is dropped.
        self.runner = JobRunner(self, latest_wins=True)
        self._checking: tuple | None = None  # the key of the check under way
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(delay_ms)
        self._timer.timeout.connect(self._start)
        session.design_changed.connect(self.schedule)
        session.data_changed.connect(self.schedule)

    def key(self) -> tuple | None:
        """What the guards' result depends on; None when there is nothing to check yet."""
        s = self.session
        if s.table is None or s.dictionary is None or s.design is None or not s.design.outcome \
                or s.design.outcome not in s.dictionary:
            return None
        return (s.serial, s.dictionary, s.design, s.kept, s.cv.grouped, s.cv.seed,
                s.tree.min_leaf)

    @property
    def job(self):
        return self.runner.job

    @property
    def running(self) -> bool:
        return self.runner.busy

    def schedule(self) -> None:
        """Check again (soon) if the choices differ from the ones last checked."""
        key = self.key()
        screen = self.session.screen
        if key is None or (screen is not None and screen.key == key):
            self.runner.forget()
            self._timer.stop()
            if key is None:
                self.session.set_screen(None, pending=False)
            else:
                self.session.set_guard_pending(False)
            return
        if self.running and self._checking == key:
            return  # already checking exactly this
        self.runner.forget()
        self.session.set_guard_pending(True)
        self._timer.start()

    def _start(self) -> None:
        s = self.session
        key = self.key()
        if key is None:
            self.session.set_screen(None, pending=False)
            return
        self._checking = key
        self.runner.start(screen_design, s.table.frame, s.dictionary, s.design,
                          offered_columns(s.dictionary, s.design), s.kept, s.cv.grouped,
                          s.cv.seed, s.tree.min_leaf,
                          done=lambda screen: self._done(key, screen),
                          failed=lambda message: self._failed(key, message))

    def _done(self, key: tuple, screen: Screen) -> None:
        if key != self.key():
            return  # the choices changed meanwhile; a newer check is on its way
        s = self.session
        # Identity-like columns leave the predictors: the result is for the choices as they
        # are once that is done, so it is current then and no second check starts.
        after = key[:2] + (screen.design,) + key[3:]
        s.set_screen(replace(screen, key=after), pending=False)

    def _failed(self, key: tuple, message: str) -> None:
        if key != self.key():
            return
        self.session.set_screen(Screen(design=self.session.design, error=message, key=key),
                                pending=False)
