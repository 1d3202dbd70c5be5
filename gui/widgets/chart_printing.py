"""Printing the chart as vector text: the chart's own page plan (core.chart.fitting) drawn by
its own painting code (core.chart.pdf.paint) onto a QPainter on the printer.

core.chart.pdf.paint draws through a handful of reportlab canvas calls; ``QtCanvas`` answers
the same calls with QPainter, so the printout is the exported PDF's page — same words, boxes
and positions — as sharp as the printer prints text, not a picture of it.
"""

from __future__ import annotations

from PySide6.QtCore import QMarginsF, QPointF, QRectF, QSizeF, Qt
from PySide6.QtGui import (
    QBrush, QColor, QFont, QFontMetricsF, QPageLayout, QPageSize, QPainter, QPainterPath, QPen,
)
from PySide6.QtPrintSupport import QPrinter

from core.chart.options import ChartOptions
from core.chart.style import BOLD_FONT
from core.model import TreeModel
from gui.widgets.tree_view import chart_family


def _colour(color) -> QColor:
    """A reportlab colour as Qt's."""
    return QColor.fromRgbF(color.red, color.green, color.blue, getattr(color, "alpha", 1.0))


class _Path:
    """reportlab's path object (moveTo, lineTo, close), kept as a QPainterPath."""

    def __init__(self, height: float) -> None:
        self.h, self.path = height, QPainterPath()

    def moveTo(self, x: float, y: float) -> None:  # noqa: N802 - reportlab's names
        self.path.moveTo(x, self.h - y)

    def lineTo(self, x: float, y: float) -> None:  # noqa: N802
        self.path.lineTo(x, self.h - y)

    def close(self) -> None:
        self.path.closeSubpath()


class QtCanvas:
    """The reportlab canvas calls the chart is painted with, drawn by a QPainter in points
    (reportlab's origin is the page's bottom-left corner; Qt's the top-left)."""

    def __init__(self, painter: QPainter, height: float) -> None:
        self.p, self.h = painter, height
        self._fill, self._stroke, self._width = QColor("black"), QColor("black"), 1.0
        self._dash: list[float] | None = None
        self._join = Qt.MiterJoin
        self._font = QFont()
        self._stack: list[tuple] = []
        # A font of N points must come out N units tall in the painter's (point) coordinates.
        self._points_per_unit = 72.0 / painter.device().logicalDpiY()

    # state
    def saveState(self) -> None:  # noqa: N802
        self._stack.append((self._fill, self._stroke, self._width, self._dash, self._join,
                            QFont(self._font)))

    def restoreState(self) -> None:  # noqa: N802
        (self._fill, self._stroke, self._width, self._dash, self._join,
         self._font) = self._stack.pop()

    def setFillColor(self, color) -> None:  # noqa: N802
        self._fill = _colour(color)

    def setStrokeColor(self, color) -> None:  # noqa: N802
        self._stroke = _colour(color)

    def setLineWidth(self, width: float) -> None:  # noqa: N802
        self._width = float(width)

    def setDash(self, pattern) -> None:  # noqa: N802
        self._dash = [float(v) for v in pattern] if pattern else None

    def setLineJoin(self, join: int) -> None:  # noqa: N802
        self._join = (Qt.MiterJoin, Qt.RoundJoin, Qt.BevelJoin)[join]

    def setFont(self, name: str, size: float) -> None:  # noqa: N802
        font = QFont(chart_family())
        font.setBold(name == BOLD_FONT)
        font.setPointSizeF(size * self._points_per_unit)
        font.setKerning(False)  # reportlab measures without kerning
        self._font = font

    # text
    def _text(self, x: float, y: float, text: str) -> None:
        self.p.setFont(self._font)
        self.p.setPen(QPen(self._fill))
        self.p.drawText(QPointF(x, self.h - y), text)

    def drawString(self, x: float, y: float, text: str) -> None:  # noqa: N802
        self._text(x, y, text)

    def drawCentredString(self, x: float, y: float, text: str) -> None:  # noqa: N802
        width = QFontMetricsF(self._font, self.p.device()).horizontalAdvance(text)
        self._text(x - width / 2, y, text)

    # shapes
    def _use(self, stroke: int, fill: int) -> None:
        if stroke:
            pen = QPen(self._stroke, self._width)
            pen.setJoinStyle(self._join)
            if self._dash and self._width > 0:
                pen.setDashPattern([v / self._width for v in self._dash])  # in line widths
            self.p.setPen(pen)
        else:
            self.p.setPen(Qt.NoPen)
        self.p.setBrush(QBrush(self._fill) if fill else Qt.NoBrush)

    def _box(self, x: float, y: float, w: float, h: float) -> QRectF:
        return QRectF(x, self.h - y - h, w, h)

    def rect(self, x, y, w, h, stroke: int = 1, fill: int = 0) -> None:
        self._use(stroke, fill)
        self.p.drawRect(self._box(x, y, w, h))

    def roundRect(self, x, y, w, h, radius, stroke: int = 1, fill: int = 0) -> None:  # noqa: N802
        self._use(stroke, fill)
        self.p.drawRoundedRect(self._box(x, y, w, h), radius, radius)

    def circle(self, x, y, r, stroke: int = 1, fill: int = 0) -> None:
        self._use(stroke, fill)
        self.p.drawEllipse(QPointF(x, self.h - y), r, r)

    def beginPath(self) -> _Path:  # noqa: N802
        return _Path(self.h)

    def drawPath(self, path: _Path, stroke: int = 1, fill: int = 0) -> None:  # noqa: N802
        self._use(stroke, fill)
        self.p.drawPath(path.path)


def chart_plan(model: TreeModel, options: ChartOptions):
    """The chart's page plan, as the exported PDF follows it (raises ChartTooLarge)."""
    from core.chart import plan_chart

    return plan_chart(model, options)


def page_layout(plan) -> QPageLayout:
    """The chart's paper and orientation, with no margin of the printer's own (the chart
    keeps its margins inside the page)."""
    width, height = plan.width, plan.height
    size = QPageSize(QSizeF(min(width, height), max(width, height)), QPageSize.Point)
    orientation = QPageLayout.Landscape if width > height else QPageLayout.Portrait
    return QPageLayout(size, orientation, QMarginsF(0, 0, 0, 0))


def print_plan(plan, printer: QPrinter) -> bool:
    """Paint ``plan`` on the printer, scaled to its paper if the user chose another one;
    False if the printer could not be started."""
    from core.chart.pdf import paint

    printer.setFullPage(True)
    painter = QPainter()
    if not painter.begin(printer):
        return False
    try:
        paper = printer.paperRect(QPrinter.DevicePixel)
        scale = min(paper.width() / plan.width, paper.height() / plan.height)
        painter.setRenderHints(QPainter.Antialiasing | QPainter.TextAntialiasing)
        painter.translate((paper.width() - plan.width * scale) / 2,
                          (paper.height() - plan.height * scale) / 2)
        painter.scale(scale, scale)
        paint(QtCanvas(painter, plan.height), plan)
    finally:
        painter.end()
    return True
