"""The tree as an interactive diagram drawn from the chart's own layout (core/chart/layout.py):
the same boxes, words, bands and arrows as the printed page, with zoom, pan, fit to window,
click a box for details, and a lit path for one patient. Geometry and words come from core;
this widget only paints them."""

from __future__ import annotations

from PySide6.QtCore import QPointF, QRectF, Qt, Signal
from PySide6.QtGui import (
    QBrush, QColor, QFont, QFontDatabase, QFontMetricsF, QKeySequence, QPainter, QPainterPath,
    QPen, QPolygonF, QShortcut,
)
from PySide6.QtWidgets import QGraphicsItem, QGraphicsScene, QGraphicsView

from core.chart.content import chart_text
from core.chart.layout import LayoutStyle, layout_tree
from core.chart.options import ChartOptions
from core.chart.style import ARROW, BADGE_FILL, DECISION_EDGE, INK, WHITE, font_directory, ink_for
from core.model import TreeModel

VIEW_TEXT_SIZE = 10.0  # points: the view's own zoom does the rest
LIT = QColor("#000000")  # the lit path: thick black over a yellow halo (Okabe–Ito yellow)
HALO = QColor("#F0E442")
_BASE_PIXELS = 100  # fonts are drawn at this pixel size and scaled, for any fractional size

_FAMILY: list[str] = []


def chart_family() -> str:
    """DejaVu Sans, the chart's embedded font, for the view too (so the words wrap alike)."""
    if not _FAMILY:
        import os

        family = ""
        for name in ("DejaVuSans.ttf", "DejaVuSans-Bold.ttf"):
            font_id = QFontDatabase.addApplicationFont(os.path.join(font_directory(), name))
            if font_id >= 0 and not family:
                family = QFontDatabase.applicationFontFamilies(font_id)[0]
        _FAMILY.append(family or QFont().family())
    return _FAMILY[0]


_FONTS: dict[bool, QFont] = {}


def _font(bold: bool) -> QFont:
    if bold not in _FONTS:
        font = QFont(chart_family())
        font.setPixelSize(_BASE_PIXELS)
        font.setBold(bold)
        _FONTS[bold] = font
    return _FONTS[bold]


def draw_line(painter: QPainter, line, colour: str) -> None:
    """One line of the layout at its size, anchored on its baseline as the PDF draws it."""
    font = _font(line.bold)
    scale = line.size / _BASE_PIXELS
    width = QFontMetricsF(font).horizontalAdvance(line.text) * scale
    x = line.x - width / 2 if line.centred else line.x
    painter.save()
    painter.translate(x, line.baseline)
    painter.scale(scale, scale)
    painter.setFont(font)
    painter.setPen(QColor(colour))
    painter.drawText(QPointF(0, 0), line.text)
    painter.restore()


class BoxItem(QGraphicsItem):
    """One numbered box, painted from its PlacedBox; clicking it selects it."""

    def __init__(self, placed, band, small: bool) -> None:
        super().__init__()
        self.placed, self.band, self.small = placed, band, small
        self.box = placed.id
        self.leaf = placed.kind == "outcome"
        self.lit = False
        self.setFlag(QGraphicsItem.ItemIsSelectable, True)
        self.setCursor(Qt.PointingHandCursor)
        self.setToolTip(f"Box {self.box}: click for details")

    def boundingRect(self) -> QRectF:  # noqa: N802
        r = self.placed.rect
        return QRectF(r.x, r.y, r.w, r.h).adjusted(-8, -8, 8, 8)

    def shape(self) -> QPainterPath:
        path = QPainterPath()
        path.addPolygon(self._outline())
        return path

    def _outline(self) -> QPolygonF:
        r, p = self.placed.rect, self.placed.point
        if self.leaf or p <= 0:
            return QPolygonF([QPointF(r.x, r.y), QPointF(r.right, r.y), QPointF(r.right, r.bottom),
                              QPointF(r.x, r.bottom), QPointF(r.x, r.y)])
        return QPolygonF([QPointF(r.x, r.cy), QPointF(r.x + p, r.y), QPointF(r.right - p, r.y),
                          QPointF(r.right, r.cy), QPointF(r.right - p, r.bottom),
                          QPointF(r.x + p, r.bottom), QPointF(r.x, r.cy)])

    def paint(self, painter: QPainter, _option, _widget=None) -> None:
        outline = self._outline()
        r = self.placed.rect
        if self.lit:
            painter.setPen(QPen(HALO, 9, Qt.SolidLine, Qt.RoundCap, Qt.RoundJoin))
            painter.setBrush(Qt.NoBrush)
            painter.drawPolygon(outline)
        if self.leaf:
            style = self.band.style
            painter.setPen(Qt.NoPen)
            painter.setBrush(QColor(style.body))
            painter.drawRect(QRectF(r.x, r.y, r.w, r.h))
            painter.setBrush(QColor(style.strip))
            painter.drawRect(QRectF(r.x, r.y, r.w, self.placed.strip))
            pen = QPen(QColor(style.edge), style.edge_width)
            if self.small:  # a small group is dashed, as on the chart
                pen.setStyle(Qt.DashLine)
        else:
            painter.setBrush(QColor(WHITE))
            pen = QPen(QColor(DECISION_EDGE), 1.4)
        if self.lit:
            pen = QPen(LIT, 3.5, pen.style(), Qt.RoundCap, Qt.RoundJoin)
        painter.setPen(pen)
        painter.setBrush(Qt.NoBrush if self.leaf else QColor(WHITE))
        painter.drawPolygon(outline)
        bx, by, radius = self.placed.badge
        painter.setPen(Qt.NoPen)
        painter.setBrush(QColor(BADGE_FILL))
        painter.drawEllipse(QPointF(bx, by), radius, radius)
        for index, line in enumerate(self.placed.lines):
            if index == 0:
                colour = ink_for(BADGE_FILL)  # the box number, on its badge
            elif self.leaf and index == 1 and self.band is not None:
                colour = self.band.style.strip_ink  # the band word, on its strip
            elif self.leaf:
                colour = self.band.style.body_ink
            else:
                colour = INK
            draw_line(painter, line, colour)
        if self.isSelected():
            painter.setPen(QPen(QColor(INK), 1.2, Qt.DashLine))
            painter.setBrush(Qt.NoBrush)
            painter.drawRect(QRectF(r.x, r.y, r.w, r.h).adjusted(-5, -5, 5, 5))


class ArrowItem(QGraphicsItem):
    """One arrow with its YES/NO label, painted from its PlacedArrow."""

    def __init__(self, arrow) -> None:
        super().__init__()
        self.arrow = arrow
        self.child = arrow.child
        self.lit = False
        self.setZValue(-1)

    def boundingRect(self) -> QRectF:  # noqa: N802
        xs = [x for x, _ in self.arrow.points] + [self.arrow.label.x, self.arrow.label.right]
        ys = [y for _, y in self.arrow.points] + [self.arrow.label.y, self.arrow.label.bottom]
        return QRectF(min(xs), min(ys), max(xs) - min(xs), max(ys) - min(ys)).adjusted(-8, -8, 8, 8)

    def paint(self, painter: QPainter, _option, _widget=None) -> None:
        points = [QPointF(x, y) for x, y in self.arrow.points]
        if self.lit:
            painter.setPen(QPen(HALO, 9, Qt.SolidLine, Qt.RoundCap, Qt.RoundJoin))
            painter.drawPolyline(points)
        colour = LIT if self.lit else QColor(ARROW)
        painter.setPen(QPen(colour, 3.0 if self.lit else 1.0, Qt.SolidLine, Qt.FlatCap,
                            Qt.MiterJoin))
        painter.drawPolyline(points)
        tip, before = points[-1], points[-2]
        size = 6.0 if not self.lit else 8.0
        direction = QPointF(tip.x() - before.x(), tip.y() - before.y())
        length = max((direction.x() ** 2 + direction.y() ** 2) ** 0.5, 1e-9)
        ux, uy = direction.x() / length, direction.y() / length
        head = QPolygonF([tip, QPointF(tip.x() - size * ux + size * 0.5 * uy,
                                       tip.y() - size * uy - size * 0.5 * ux),
                          QPointF(tip.x() - size * ux - size * 0.5 * uy,
                                  tip.y() - size * uy + size * 0.5 * ux)])
        painter.setPen(Qt.NoPen)
        painter.setBrush(colour)
        painter.drawPolygon(head)
        label = self.arrow.label
        painter.setBrush(QColor(WHITE))
        painter.drawRect(QRectF(label.x, label.y, label.w, label.h))
        for line in self.arrow.label_lines:
            draw_line(painter, line, INK)


class TreeView(QGraphicsView):
    box_clicked = Signal(int)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.setScene(QGraphicsScene(self))
        self.setRenderHints(QPainter.Antialiasing | QPainter.TextAntialiasing)
        self.setDragMode(QGraphicsView.ScrollHandDrag)
        self.setTransformationAnchor(QGraphicsView.AnchorUnderMouse)
        self.setResizeAnchor(QGraphicsView.AnchorViewCenter)
        self.setBackgroundBrush(QBrush(QColor("#fbfbfb")))
        self.setToolTip("Drag to move around, use the mouse wheel to zoom, click a box for its "
                        "details.")
        self.boxes: dict[int, BoxItem] = {}
        self.edges: dict[int, ArrowItem] = {}  # keyed by child box
        self.model: TreeModel | None = None
        self.layout = None
        self._user_zoomed = False
        self.scene().selectionChanged.connect(self._selection_changed)
        for keys, slot in ((QKeySequence.ZoomIn, self.zoom_in), (QKeySequence.ZoomOut, self.zoom_out),
                           (QKeySequence("Ctrl+0"), self.fit)):
            shortcut = QShortcut(keys, self)
            shortcut.setContext(Qt.WidgetWithChildrenShortcut)
            shortcut.activated.connect(slot)

    # --- building -------------------------------------------------------------------------

    def show_model(self, model: TreeModel | None, options: ChartOptions | None = None) -> None:
        """Draw ``model`` with the chart's words and layout (top-down, at the view's size)."""
        scene = self.scene()
        scene.clear()
        self.boxes.clear()
        self.edges.clear()
        self.model = model
        self.layout = None
        if model is None:
            return
        text = chart_text(model, (options or ChartOptions()).checked())
        self.layout = layout_tree(text.tree, LayoutStyle(VIEW_TEXT_SIZE, direction="down"))
        for arrow in self.layout.arrows:
            item = ArrowItem(arrow)
            scene.addItem(item)
            self.edges[arrow.child] = item
        for box_id, placed in self.layout.boxes.items():
            item = BoxItem(placed, text.bands.get(box_id), box_id in text.small)
            scene.addItem(item)
            self.boxes[box_id] = item
        scene.setSceneRect(QRectF(0, 0, self.layout.width, self.layout.height)
                           .adjusted(-24, -24, 24, 24))
        self.fit()

    # --- interaction ----------------------------------------------------------------------

    def light_path(self, boxes: tuple[int, ...]) -> None:
        """Draw the boxes and arrows of one patient's way through the tree thick, with a halo."""
        on = set(boxes)
        for box, item in self.boxes.items():
            item.lit = box in on
            item.update()
        for child, edge in self.edges.items():
            edge.lit = child in on
            edge.update()

    def select_box(self, box: int | None) -> None:
        self.scene().clearSelection()
        if box in self.boxes:
            self.boxes[box].setSelected(True)

    def _selection_changed(self) -> None:
        try:
            chosen = [i for i in self.scene().selectedItems() if isinstance(i, BoxItem)]
        except RuntimeError:  # the scene is being cleared
            return
        if chosen:
            self.box_clicked.emit(chosen[0].box)

    def fit(self) -> None:
        self._user_zoomed = False
        if self.scene().items():
            self.fitInView(self.scene().sceneRect(), Qt.KeepAspectRatio)
            if self.transform().m11() > 2.0:  # a tiny tree: do not blow it up
                self.resetTransform()
                self.scale(2.0, 2.0)

    def zoom_in(self) -> None:
        self._zoom(1.25)

    def zoom_out(self) -> None:
        self._zoom(0.8)

    def _zoom(self, factor: float) -> None:
        scale = self.transform().m11() * factor
        if 0.05 <= scale <= 12.0:
            self._user_zoomed = True
            self.scale(factor, factor)

    def wheelEvent(self, event) -> None:  # noqa: N802
        self._zoom(1.15 if event.angleDelta().y() > 0 else 1 / 1.15)
        event.accept()

    def resizeEvent(self, event) -> None:  # noqa: N802
        super().resizeEvent(event)
        if self.model is not None and not self._user_zoomed:
            self.fit()
