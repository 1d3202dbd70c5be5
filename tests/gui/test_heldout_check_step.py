"""A run with patients set aside checks the tree on them once (in core), not again on the UI
thread or for the size that was already chosen."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import traceback  # noqa: E402

import core.sizing.derivation  # noqa: E402


def test_one_heldout_check_per_run(demo, run, monkeypatch):
    window = demo
    calls = []
    real = core.sizing.derivation.check_heldout

    def counted(model, *rest):
        # The chart's size fitting builds candidate trees of its own; only the checks of the
        # tree the user gets are counted here.
        if not any(frame.filename.endswith("fitting.py") for frame in traceback.extract_stack()):
            calls.append(model.chosen["leaves"])
        return real(model, *rest)

    monkeypatch.setattr(core.sizing.derivation, "check_heldout", counted)
    size = window.panels["size"]
    size.folds.setValue(5)
    size.holdout.setValue(25)
    run(window)
    chosen = window.session.chosen
    assert chosen.heldout is not None
    assert len(calls) == 1
    window.go_to("checking")
    checking = window.panels["checking"]
    assert checking.checks and checking.checks[0] is chosen.heldout_check
    assert len(calls) == 1
