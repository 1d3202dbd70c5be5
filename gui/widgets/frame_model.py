"""A read-only table model over a pandas DataFrame.

The view asks only for the cells it shows, so a million rows preview as fast as a hundred:
nothing is copied into widgets, and each column is turned into a NumPy array once, on first use.
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
from PySide6.QtCore import QAbstractTableModel, QModelIndex, Qt
from PySide6.QtGui import QBrush, QColor

_MISSING = QBrush(QColor("#6b6b6b"))  # grey text for "not recorded" (contrast 5.3:1 on white)


def cell_text(value) -> str:
    """How a cell is shown: whole numbers without '.0', blanks for missing values."""
    if value is None:
        return ""
    if isinstance(value, (float, np.floating)):
        if math.isnan(value):
            return ""
        if math.isfinite(value) and value == int(value) and abs(value) < 1e15:
            return str(int(value))
        return f"{value:.6g}"
    if value is pd.NaT:  # float NaN was handled above
        return ""
    if isinstance(value, pd.Timestamp):
        return value.date().isoformat() if value == value.normalize() else value.isoformat()
    if value is pd.NA:
        return ""
    return str(value)


ROW_NUMBERS_TIP = ("Rows are numbered as in the spreadsheet (row {header} holds the column "
                   "names), as the notes and warnings number them.")


class FrameModel(QAbstractTableModel):
    """Rows of a DataFrame, shown lazily; row headers are the spreadsheet's row numbers when
    given (those the notes name), else count from 1."""

    def __init__(self, frame: pd.DataFrame | None = None, parent=None) -> None:
        super().__init__(parent)
        self._frame = pd.DataFrame() if frame is None else frame
        self._arrays: dict[int, np.ndarray] = {}
        self._numeric: dict[int, bool] = {}
        self._row_numbers: np.ndarray | None = None
        self._header_row = 1

    @property
    def frame(self) -> pd.DataFrame:
        return self._frame

    def set_frame(self, frame: pd.DataFrame | None, row_numbers=None,
                  header_row: int = 1) -> None:
        """Show ``frame``; ``row_numbers`` (one per row) are the spreadsheet's numbers of its
        rows, shown as the row headers, ``header_row`` the row of the column names."""
        self.beginResetModel()
        self._frame = pd.DataFrame() if frame is None else frame
        self._row_numbers = None if row_numbers is None or frame is None or \
            len(row_numbers) != len(frame) else np.asarray(row_numbers)
        self._header_row = header_row
        self._arrays.clear()
        self._numeric.clear()
        self.endResetModel()

    def rowCount(self, parent=QModelIndex()) -> int:  # noqa: N802 (Qt's name)
        return 0 if parent.isValid() else len(self._frame)

    def columnCount(self, parent=QModelIndex()) -> int:  # noqa: N802
        return 0 if parent.isValid() else self._frame.shape[1]

    def _column(self, col: int) -> np.ndarray:
        array = self._arrays.get(col)
        if array is None:
            series = self._frame.iloc[:, col]
            self._numeric[col] = pd.api.types.is_numeric_dtype(series.dtype)
            array = series.to_numpy(dtype=object) if not self._numeric[col] else series.to_numpy()
            self._arrays[col] = array
        return array

    def data(self, index: QModelIndex, role: int = Qt.DisplayRole):
        if not index.isValid():
            return None
        if role == Qt.DisplayRole:
            return cell_text(self._column(index.column())[index.row()])
        if role == Qt.TextAlignmentRole:
            self._column(index.column())
            if self._numeric[index.column()]:
                return int(Qt.AlignRight | Qt.AlignVCenter)
            return int(Qt.AlignLeft | Qt.AlignVCenter)
        if role == Qt.ToolTipRole:
            if cell_text(self._column(index.column())[index.row()]) == "":
                return "Not recorded (blank cell)."
        return None

    def headerData(self, section: int, orientation, role: int = Qt.DisplayRole):  # noqa: N802
        if role == Qt.ToolTipRole and orientation == Qt.Vertical and \
                self._row_numbers is not None:
            return ROW_NUMBERS_TIP.format(header=self._header_row)
        if role != Qt.DisplayRole:
            return None
        if orientation == Qt.Horizontal:
            return str(self._frame.columns[section])
        if self._row_numbers is not None:
            return str(int(self._row_numbers[section]))
        return str(section + 1)
