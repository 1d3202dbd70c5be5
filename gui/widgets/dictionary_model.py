"""The data dictionary as an editable table: one row per column of the data.

Each edit makes a new DataDictionary through core's ``with_column`` (which checks it) and is
announced by ``edited``; a refused edit is announced by ``refused`` with core's message.
"""

from __future__ import annotations

from PySide6.QtCore import QAbstractTableModel, QModelIndex, Qt, Signal
from PySide6.QtWidgets import QComboBox, QStyledItemDelegate

from core.dictionary import (KINDS, ROLES, DataDictionary, plausible_from_words,
                             plausible_in_words)
from core.errors import InputError

ROLE_WORDS = {
    "outcome": "outcome",
    "predictor": "may be asked about",
    "patient_id": "patient number",
    "site": "site",
    "ignore": "leave out",
}
KIND_WORDS = {
    "numeric": "number",
    "binary": "two categories",
    "ordinal": "ordered categories",
    "nominal": "unordered categories",
    "identifier": "identifier",
    "date": "date",
    "text": "free text",
}
SEPARATOR = "; "

# (field, header, tooltip): one sentence for each technical term.
COLUMNS = (
    ("name", "Column", "The column's header in the spreadsheet (cannot be changed here)."),
    ("role", "Use", "What the column is for: the outcome, a question the tree may ask, the "
                    "patient number, the site, or nothing."),
    ("kind", "Kind", "What sort of values the column holds; ordered categories (like triage "
                     "levels) keep their order in the tree's questions."),
    ("label", "Label", "The words the chart and questions use for this column."),
    ("unit", "Unit", "The unit printed after numbers, such as mmHg or /min."),
    ("plausible", "Plausible values",
     "For a measurement: the lowest and highest value it can really take, such as 20 to 45 "
     "for a temperature in °C; the one-patient look-up gives no box for a value outside "
     "them. Empty: only the usual limits (0 to 100 for a percentage)."),
    ("missing_codes", "Codes for 'not recorded'",
     "Cell values that mean the value was not recorded, such as -99; separate several with "
     "semicolons."),
    ("levels", "Levels in order",
     "The categories of the column, separated by semicolons; for ordered categories list them "
     "from lowest to highest."),
    ("note", "Note", "Your own note about the column (kept in the dictionary file)."),
)


def split_list(text: str) -> tuple[str, ...]:
    return tuple(part.strip() for part in text.replace("|", ";").split(";") if part.strip())


class DictionaryModel(QAbstractTableModel):
    edited = Signal(object)  # the new DataDictionary
    refused = Signal(str)  # core's message for an edit it refused

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self._dictionary: DataDictionary | None = None

    @property
    def dictionary(self) -> DataDictionary | None:
        return self._dictionary

    def set_dictionary(self, dictionary: DataDictionary | None) -> None:
        if dictionary is self._dictionary:
            return
        if (dictionary is not None and self._dictionary is not None
                and dictionary.names == self._dictionary.names):
            self._dictionary = dictionary  # same rows: repaint, keep selection and scroll
            self.dataChanged.emit(self.index(0, 0),
                                  self.index(self.rowCount() - 1, self.columnCount() - 1))
            return
        self.beginResetModel()
        self._dictionary = dictionary
        self.endResetModel()

    def rowCount(self, parent=QModelIndex()) -> int:  # noqa: N802
        return 0 if parent.isValid() or self._dictionary is None else len(self._dictionary.columns)

    def columnCount(self, parent=QModelIndex()) -> int:  # noqa: N802
        return 0 if parent.isValid() else len(COLUMNS)

    def flags(self, index: QModelIndex):
        base = Qt.ItemIsEnabled | Qt.ItemIsSelectable
        if index.column() > 0 and not (
                COLUMNS[index.column()][0] == "plausible" and self._dictionary is not None
                and self._dictionary.columns[index.row()].kind != "numeric"):
            base |= Qt.ItemIsEditable  # plausible values belong to measurements only
        return base

    def data(self, index: QModelIndex, role: int = Qt.DisplayRole):
        if not index.isValid() or self._dictionary is None:
            return None
        spec = self._dictionary.columns[index.row()]
        field = COLUMNS[index.column()][0]
        value = getattr(spec, field)
        if role == Qt.DisplayRole and field in ("role", "kind"):
            return (ROLE_WORDS if field == "role" else KIND_WORDS)[value]  # codes in words
        if role in (Qt.DisplayRole, Qt.EditRole):
            if field in ("missing_codes", "levels"):
                return SEPARATOR.join(value)
            if field == "plausible":
                return plausible_in_words(value)
            return value
        if role == Qt.ToolTipRole and field == "levels" and spec.kind == "ordinal":
            return "Ordered categories: the first level is the lowest."
        return None

    def setData(self, index: QModelIndex, value, role: int = Qt.EditRole) -> bool:  # noqa: N802
        if role != Qt.EditRole or not index.isValid() or self._dictionary is None \
                or not self.flags(index) & Qt.ItemIsEditable:
            return False
        spec = self._dictionary.columns[index.row()]
        field = COLUMNS[index.column()][0]
        try:
            if field in ("missing_codes", "levels"):
                value = split_list(str(value))
            elif field in ("label", "unit", "note"):
                value = str(value).strip()
            elif field == "plausible":
                value = plausible_from_words(value, spec)
            if getattr(spec, field) == value:
                return False
            changed = self._dictionary.with_column(spec.name, **{field: value})
        except InputError as exc:
            self.refused.emit(str(exc))
            return False
        self._dictionary = changed
        self.dataChanged.emit(self.index(index.row(), 0),
                              self.index(index.row(), self.columnCount() - 1))
        self.edited.emit(changed)
        return True

    def headerData(self, section: int, orientation, role: int = Qt.DisplayRole):  # noqa: N802
        if orientation != Qt.Horizontal:
            return str(section + 1) if role == Qt.DisplayRole else None
        if role == Qt.DisplayRole:
            return COLUMNS[section][1]
        if role == Qt.ToolTipRole:
            return COLUMNS[section][2]
        return None


class ChoiceDelegate(QStyledItemDelegate):
    """A drop-down of core's codes shown in the user's words (roles, kinds)."""

    def __init__(self, words: dict[str, str], parent=None) -> None:
        super().__init__(parent)
        self._words = words

    def createEditor(self, parent, option, index):  # noqa: N802
        combo = QComboBox(parent)
        for code, word in self._words.items():
            combo.addItem(word, code)
        return combo

    def setEditorData(self, editor: QComboBox, index) -> None:  # noqa: N802
        editor.setCurrentIndex(max(0, editor.findData(index.data(Qt.EditRole))))

    def setModelData(self, editor: QComboBox, model, index) -> None:  # noqa: N802
        model.setData(index, editor.currentData(), Qt.EditRole)


assert set(ROLE_WORDS) == set(ROLES) and set(KIND_WORDS) == set(KINDS)
