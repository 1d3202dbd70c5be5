"""Widgets bound to the session, one way for every step.

Each binding names how to read its value from the session and how to write the widget's value
back. ``Bindings.show()`` puts the session's values into the widgets with their signals
blocked, and only where they differ, so showing never writes back and never moves a cursor;
a change the user makes is written to the session at once. A combo box may also take its
choices from the session (they are replaced only when they change).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Callable, Sequence

from PySide6.QtCore import QSignalBlocker
from PySide6.QtWidgets import (
    QAbstractButton, QAbstractSpinBox, QComboBox, QDoubleSpinBox, QLineEdit, QSpinBox, QWidget,
)

Choices = Sequence[tuple[str, Any]]  # (words shown, value)


@dataclass(frozen=True)
class Kind:
    """How one sort of widget is read, set and listened to."""

    value: Callable[[QWidget], Any]
    set_value: Callable[[QWidget, Any], None]
    changed: Callable[[QWidget], Any]  # the signal a user's change emits


def _set_combo(combo: QComboBox, value) -> None:
    combo.setCurrentIndex(max(0, combo.findData(value)))


KINDS: list[tuple[type, Kind]] = [
    (QComboBox, Kind(lambda w: w.currentData(), _set_combo, lambda w: w.currentIndexChanged)),
    (QSpinBox, Kind(lambda w: w.value(), lambda w, v: w.setValue(v), lambda w: w.valueChanged)),
    (QDoubleSpinBox, Kind(lambda w: w.value(), lambda w, v: w.setValue(v),
                          lambda w: w.valueChanged)),
    (QAbstractButton, Kind(lambda w: w.isChecked(), lambda w, v: w.setChecked(bool(v)),
                           lambda w: w.toggled)),
    # textEdited: only the user's typing, never a setText.
    (QLineEdit, Kind(lambda w: w.text(), lambda w, v: w.setText(v or ""),
                     lambda w: w.textEdited)),
]


def kind_of(widget: QWidget) -> Kind:
    for cls, kind in KINDS:
        if isinstance(widget, cls):
            return kind
    own = getattr(widget, "binding_kind", None)  # a composite widget says how it is bound
    if own is not None:
        return own
    raise TypeError(f"no binding for a {type(widget).__name__}")


@dataclass
class Bound:
    widget: QWidget
    read: Callable[[], Any]
    write: Callable[[Any], None]
    choices: Callable[[], Choices] | None = None
    shown_choices: tuple | None = None


class Bindings:
    """The bindings of one step."""

    def __init__(self) -> None:
        self._bound: list[Bound] = []

    def bind(self, widget: QWidget, read: Callable[[], Any], write: Callable[[Any], None],
             choices: Callable[[], Choices] | None = None) -> QWidget:
        """Show ``read()`` in ``widget``; a user's change calls ``write(value)``."""
        bound = Bound(widget, read, write, choices)
        kind = kind_of(widget)
        kind.changed(widget).connect(lambda *_args: write(kind.value(widget)))
        self._bound.append(bound)
        return widget

    def show(self) -> None:
        """Put the session's values (and choices) into the widgets, without writing back."""
        for bound in self._bound:
            widget, kind = bound.widget, kind_of(bound.widget)
            with QSignalBlocker(widget):
                if bound.choices is not None:
                    choices = tuple(bound.choices())
                    if choices != bound.shown_choices:
                        if isinstance(widget, QComboBox):
                            widget.clear()
                            for words, value in choices:
                                widget.addItem(words, value)
                        else:  # a composite widget fills itself
                            widget.set_choices(choices)
                        bound.shown_choices = choices
                value = bound.read()
                if isinstance(widget, QAbstractSpinBox) and value is None:
                    value = widget.minimum()  # the spin box's special value ("none", "usual")
                if kind.value(widget) != value:
                    kind.set_value(widget, value)
