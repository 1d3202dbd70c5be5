"""Every text a user can read in the main window, each with the widget it belongs to: labels,
buttons, group titles, text views, choices in combo boxes and lists, tab and table headers,
spin-box affixes, tooltips, menu items with their tooltips, and the status bar."""

from __future__ import annotations

import re
from html import unescape

from matplotlib.figure import Figure
from matplotlib.text import Text
from PySide6.QtCore import QModelIndex, Qt
from PySide6.QtWidgets import (
    QAbstractButton, QAbstractItemView, QAbstractSpinBox, QComboBox, QGraphicsView, QGroupBox, QLabel,
    QLineEdit,
    QMenu, QPlainTextEdit, QStatusBar, QTabWidget, QTextEdit, QWidget,
)


def plain(text: str) -> str:
    """Rich text as read: tags dropped, entities turned back into characters."""
    return " ".join(unescape(re.sub(r"<[^>]+>", " ", text or "")).split())


def _where(widget: QWidget) -> str:
    names = []
    while widget is not None:
        name = widget.objectName() or widget.accessibleName()
        names.append(f"{type(widget).__name__}({name})" if name else type(widget).__name__)
        widget = widget.parentWidget()
        if len(names) > 4:
            break
    return " < ".join(names)


def _model_texts(view: QAbstractItemView) -> list[str]:
    model = view.model()
    if model is None:
        return []
    texts = []
    root = QModelIndex()
    try:
        columns = model.columnCount(root)
    except TypeError:  # a list's model keeps its one column private
        columns = 1
    for i in range(columns):  # the column headers (row numbers say nothing)
        for role in (Qt.DisplayRole, Qt.ToolTipRole):
            value = model.headerData(i, Qt.Horizontal, role)
            if value:
                texts.append(str(value))
    for r in range(min(model.rowCount(root), 200)):
        for c in range(min(columns, 12)):
            index = model.index(r, c)
            for role in (Qt.DisplayRole, Qt.ToolTipRole):
                value = model.data(index, role)
                if isinstance(value, str) and value:
                    texts.append(value)
    return texts


def visible_texts(window) -> list[tuple[str, str]]:
    """(where, text) for every text of ``window`` a user can see or hover over now."""
    found: list[tuple[str, str]] = [("window title", window.windowTitle())]
    for widget in window.findChildren(QWidget):
        if not widget.isVisible():
            continue
        where = _where(widget)
        texts = []
        if isinstance(widget, QLabel):
            texts.append(widget.text())
        elif isinstance(widget, QAbstractButton):
            texts.append(widget.text())
        elif isinstance(widget, QGroupBox):
            texts.append(widget.title())
        elif isinstance(widget, (QTextEdit, QPlainTextEdit)):
            texts.append(widget.toPlainText())
        elif isinstance(widget, QLineEdit):
            texts += [widget.text(), widget.placeholderText()]
        elif isinstance(widget, QComboBox):
            texts += [widget.itemText(i) for i in range(widget.count())]
            texts += [str(widget.itemData(i, Qt.ToolTipRole) or "") for i in range(widget.count())]
        elif isinstance(widget, QTabWidget):
            texts += [widget.tabText(i) for i in range(widget.count())]
            texts += [widget.tabToolTip(i) for i in range(widget.count())]
        elif isinstance(widget, QStatusBar):
            texts.append(widget.currentMessage())
        if isinstance(widget, QAbstractSpinBox):
            texts += [getattr(widget, "prefix", lambda: "")(), getattr(widget, "suffix", lambda: "")(),
                      widget.specialValueText()]
        if isinstance(widget, QAbstractItemView) and not isinstance(widget, QComboBox) \
                and type(widget.model()).__name__ != "FrameModel":  # not the user's own cells
            texts += _model_texts(widget)
        if isinstance(widget, QGraphicsView) and widget.scene() is not None:  # the tree view
            for item in widget.scene().items():
                texts.append(item.toolTip())
                texts += [line.text for line in getattr(getattr(item, "placed", None), "lines", ())]
        figure = getattr(widget, "figure", None)
        if isinstance(figure, Figure):  # a plot: its titles, axis labels, legends, notes
            texts += [t.get_text() for t in figure.findobj(Text)]
        texts.append(widget.toolTip())
        texts.append(widget.whatsThis())
        found += [(where, plain(t)) for t in texts if t and plain(t)]
    menus = [window.menuBar()] + window.menuBar().findChildren(QMenu)
    for menu in menus:
        for action in menu.actions():
            for t in (action.text(), action.toolTip(), action.statusTip()):
                if t and plain(t):
                    found.append((f"menu item {action.text()!r}", plain(t.replace("&", ""))))
    return found
