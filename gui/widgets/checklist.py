"""A searchable checklist of columns (the predictors the tree may ask about)."""

from __future__ import annotations

from PySide6.QtCore import QSortFilterProxyModel, Qt, Signal
from PySide6.QtGui import QStandardItem, QStandardItemModel
from PySide6.QtWidgets import (
    QHBoxLayout, QLabel, QLineEdit, QListView, QPushButton, QVBoxLayout, QWidget,
)

from gui.binding import Kind

NAME_ROLE = Qt.UserRole + 1
TEXT_ROLE = Qt.UserRole + 2  # the item's own text, before any mark
TIP_ROLE = Qt.UserRole + 3


class Checklist(QWidget):
    """Items (name, shown text, tooltip); ``changed`` gives the checked names in list order."""

    changed = Signal(tuple)
    # Bound to the session as its checked names (gui/binding.py).
    binding_kind = Kind(lambda w: w.checked(), lambda w, names: w.set_checked(tuple(names)),
                        lambda w: w.changed)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self._model = QStandardItemModel(self)
        self._proxy = QSortFilterProxyModel(self)
        self._proxy.setSourceModel(self._model)
        self._proxy.setFilterCaseSensitivity(Qt.CaseInsensitive)
        self._proxy.setFilterRole(Qt.DisplayRole)
        self._suggested: tuple[str, ...] = ()
        self.bulk = False  # True while a button ticks or unticks many items at once

        self.search = QLineEdit()
        self.search.setPlaceholderText("Find a column…")
        self.search.setClearButtonEnabled(True)
        self.search.setToolTip("Type part of a column's name or label to narrow the list.")
        self.search.textChanged.connect(self._proxy.setFilterFixedString)
        self.view = QListView()
        self.view.setModel(self._proxy)
        self.view.setUniformItemSizes(True)
        self.all_button = QPushButton("All")
        self.all_button.setToolTip("Tick every column shown in the list.")
        self.none_button = QPushButton("None")
        self.none_button.setToolTip("Untick every column shown in the list.")
        self.suggested_button = QPushButton("As in the dictionary")
        self.suggested_button.setToolTip("Tick exactly the columns the data dictionary marks "
                                         "as 'may be asked about'.")
        self.count_label = QLabel()
        self.all_button.clicked.connect(self._tick_all)
        self.none_button.clicked.connect(self._tick_none)
        self.suggested_button.clicked.connect(self._tick_suggested)
        self._model.itemChanged.connect(self._item_changed)

        buttons = QHBoxLayout()
        for button in (self.all_button, self.none_button, self.suggested_button):
            buttons.addWidget(button)
        buttons.addStretch(1)
        buttons.addWidget(self.count_label)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.search)
        layout.addWidget(self.view, 1)
        layout.addLayout(buttons)

    def set_items(self, items: list[tuple[str, str, str]], checked: tuple[str, ...],
                  suggested: tuple[str, ...] = ()) -> None:
        """Replace the list without announcing a change."""
        self._suggested = tuple(suggested)
        blocker = self._model.blockSignals(True)
        self._model.clear()
        for name, text, tip in items:
            item = QStandardItem(text)
            item.setData(name, NAME_ROLE)
            item.setData(text, TEXT_ROLE)
            item.setData(tip, TIP_ROLE)
            item.setToolTip(tip)
            item.setEditable(False)
            item.setCheckable(True)
            item.setCheckState(Qt.Checked if name in checked else Qt.Unchecked)
            self._model.appendRow(item)
        self._model.blockSignals(blocker)
        self._proxy.invalidate()
        self._update_count()

    def set_choices(self, choices: tuple) -> None:
        """The items and the suggested names (how gui.binding fills the list)."""
        items, suggested = choices
        self.set_items(list(items), self.checked(), suggested)

    def set_marks(self, marks: dict[str, tuple[str, str]]) -> None:
        """Put a short mark after some items' text, with a line added to their tooltip
        (name -> (mark, tip)); items not named lose their mark."""
        blocker = self._model.blockSignals(True)
        for row in range(self._model.rowCount()):
            item = self._model.item(row)
            mark, tip = marks.get(item.data(NAME_ROLE), ("", ""))
            item.setText(item.data(TEXT_ROLE) + (f"   {mark}" if mark else ""))
            item.setToolTip(item.data(TIP_ROLE) + (f"\n{tip}" if tip else ""))
        self._model.blockSignals(blocker)
        self.view.viewport().update()

    def mark_of(self, name: str) -> str:
        """The mark shown after an item (empty if none)."""
        for row in range(self._model.rowCount()):
            item = self._model.item(row)
            if item.data(NAME_ROLE) == name:
                return item.text()[len(item.data(TEXT_ROLE)):].strip()
        return ""

    def set_checked(self, names: tuple[str, ...]) -> None:
        blocker = self._model.blockSignals(True)
        for row in range(self._model.rowCount()):
            item = self._model.item(row)
            item.setCheckState(Qt.Checked if item.data(NAME_ROLE) in names else Qt.Unchecked)
        self._model.blockSignals(blocker)
        self.view.viewport().update()
        self._update_count()

    def checked(self) -> tuple[str, ...]:
        return tuple(self._model.item(r).data(NAME_ROLE) for r in range(self._model.rowCount())
                     if self._model.item(r).checkState() == Qt.Checked)

    def names(self) -> tuple[str, ...]:
        return tuple(self._model.item(r).data(NAME_ROLE) for r in range(self._model.rowCount()))

    def _visible_items(self):
        for row in range(self._proxy.rowCount()):
            yield self._model.itemFromIndex(self._proxy.mapToSource(self._proxy.index(row, 0)))

    def _set_many(self, decide) -> None:
        blocker = self._model.blockSignals(True)
        for item in self._visible_items():
            item.setCheckState(Qt.Checked if decide(item.data(NAME_ROLE)) else Qt.Unchecked)
        self._model.blockSignals(blocker)
        self.view.viewport().update()
        self.bulk = True
        try:
            self._item_changed()
        finally:
            self.bulk = False

    def _tick_all(self) -> None:
        self._set_many(lambda name: True)

    def _tick_none(self) -> None:
        self._set_many(lambda name: False)

    def _tick_suggested(self) -> None:
        self.search.clear()
        self._set_many(lambda name: name in self._suggested)

    def _item_changed(self, *_args) -> None:
        self._update_count()
        self.changed.emit(self.checked())

    def _update_count(self) -> None:
        self.count_label.setText(f"{len(self.checked())} of {self._model.rowCount()} ticked")
