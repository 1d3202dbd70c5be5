"""The tree as an interactive diagram: zoom, pan, fit to window, click a box for details, and
a lit path for one patient. Positions come from the layout; texts from the model."""

from __future__ import annotations

from PySide6.QtCore import QPointF, QRectF, Qt, Signal
from PySide6.QtGui import (
    QBrush, QColor, QFont, QFontMetricsF, QKeySequence, QPainter, QPainterPath, QPen, QShortcut,
)
from PySide6.QtWidgets import (
    QGraphicsItem, QGraphicsPathItem, QGraphicsScene, QGraphicsSimpleTextItem, QGraphicsTextItem,
    QGraphicsView,
)

from core.model import TreeModel
from gui.tree_layout import simple_layout

QUESTION_EDGE = QColor("#0072B2")  # Okabe–Ito blue
OUTCOME_FILL = QColor("#eef3f8")
QUESTION_FILL = QColor("#ffffff")
INK = QColor("#1a1a1a")
LIT = QColor("#D55E00")  # Okabe–Ito vermilion; the lit path is also drawn thicker
TEXT_WIDTH = 190.0
PADDING = 10.0


class BoxItem(QGraphicsPathItem):
    """One numbered box; clicking it selects it."""

    def __init__(self, box: int, leaf: bool, text: str, font: QFont) -> None:
        super().__init__()
        self.box, self.leaf = box, leaf
        self.setFlag(QGraphicsItem.ItemIsSelectable, True)
        self.setCursor(Qt.PointingHandCursor)
        self.label = QGraphicsTextItem(self)
        self.label.setDefaultTextColor(INK)
        self.label.setFont(font)
        self.label.setTextWidth(TEXT_WIDTH)
        # A word joiner after "/" keeps units such as "/min" on one line with their number.
        self.label.setPlainText(text.replace(" /", "\u00a0/").replace("/", "/\u2060"))
        self.badge = QGraphicsSimpleTextItem(str(box), self)
        badge_font = QFont(font)
        badge_font.setBold(True)
        self.badge.setFont(badge_font)
        self.badge.setBrush(QBrush(INK))
        self.lit = False

    def natural_size(self) -> tuple[float, float]:
        text = self.label.boundingRect()
        badge = self.badge.boundingRect()
        return (TEXT_WIDTH + 2 * PADDING,
                text.height() + badge.height() + 2 * PADDING)

    def place(self, x: float, y: float, w: float, h: float) -> None:
        path = QPainterPath()
        radius = 4.0 if not self.leaf else 12.0  # outcome boxes are rounder
        path.addRoundedRect(QRectF(0, 0, w, h), radius, radius)
        self.setPath(path)
        self.setPos(x, y)
        self.badge.setPos(PADDING, PADDING * 0.6)
        self.label.setPos((w - TEXT_WIDTH) / 2, PADDING * 0.6 + self.badge.boundingRect().height())
        self.restyle()

    def restyle(self) -> None:
        width = 3.5 if self.lit else 1.5
        colour = LIT if self.lit else (INK if self.leaf else QUESTION_EDGE)
        pen = QPen(colour, width)
        if self.isSelected():
            pen.setStyle(Qt.DashLine)
            pen.setWidthF(width + 1.0)
        self.setPen(pen)
        self.setBrush(QBrush(OUTCOME_FILL if self.leaf else QUESTION_FILL))

    def itemChange(self, change, value):  # noqa: N802
        if change == QGraphicsItem.ItemSelectedHasChanged:
            self.restyle()
        return super().itemChange(change, value)


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
        self.edges: dict[int, QGraphicsPathItem] = {}  # keyed by child box
        self.model: TreeModel | None = None
        self._user_zoomed = False
        self.scene().selectionChanged.connect(self._selection_changed)
        for keys, slot in ((QKeySequence.ZoomIn, self.zoom_in), (QKeySequence.ZoomOut, self.zoom_out),
                           (QKeySequence("Ctrl+0"), self.fit)):
            shortcut = QShortcut(keys, self)
            shortcut.setContext(Qt.WidgetWithChildrenShortcut)
            shortcut.activated.connect(slot)

    # --- building -------------------------------------------------------------------------

    def show_model(self, model: TreeModel | None) -> None:
        scene = self.scene()
        scene.clear()
        self.boxes.clear()
        self.edges.clear()
        self.model = model
        if model is None:
            return
        font = QFont(self.font())
        for node in model.nodes:
            self.boxes[node.id] = BoxItem(node.id, node.leaf, node.text, font)
        sizes = {box: item.natural_size() for box, item in self.boxes.items()}
        positions = simple_layout(model, lambda box: sizes[box])
        for box, (x, y, w, h) in positions.items():
            item = self.boxes[box]
            item.place(x, y, w, h)
            scene.addItem(item)
        small = QFont(font)
        small.setPointSizeF(max(7.0, font.pointSizeF() * 0.9))
        metrics = QFontMetricsF(small)
        for node in model.nodes:
            if node.leaf:
                continue
            x, y, w, h = positions[node.id]
            start = QPointF(x + w / 2, y + h)
            for branch, child in enumerate(node.children):
                cx, cy, cw, _ = positions[child]
                end = QPointF(cx + cw / 2, cy)
                middle = (start.y() + end.y()) / 2
                path = QPainterPath(start)
                path.lineTo(start.x(), middle)
                path.lineTo(end.x(), middle)
                path.lineTo(end)
                edge = QGraphicsPathItem(path)
                edge.setPen(QPen(INK, 1.3))
                edge.setZValue(-1)
                scene.addItem(edge)
                self.edges[child] = edge
                answer = "yes" if branch == 0 else "no"
                words = answer.upper()
                if node.question.missing_goes == answer and node.question.kind != "missing":
                    words += " (or not recorded)"
                label = QGraphicsSimpleTextItem(words)
                bold = QFont(small)
                bold.setBold(True)
                label.setFont(bold)
                label.setBrush(QBrush(INK))
                width = metrics.horizontalAdvance(words) * 1.1
                label.setPos(end.x() - width / 2, middle + 3)
                label.setZValue(1)
                scene.addItem(label)
        scene.setSceneRect(scene.itemsBoundingRect().adjusted(-30, -30, 30, 30))
        self.fit()

    # --- interaction ----------------------------------------------------------------------

    def light_path(self, boxes: tuple[int, ...]) -> None:
        """Draw the boxes and arrows of one patient's way through the tree thicker, in colour."""
        on = set(boxes)
        for box, item in self.boxes.items():
            item.lit = box in on
            item.restyle()
        for child, edge in self.edges.items():
            lit = child in on
            edge.setPen(QPen(LIT if lit else INK, 3.5 if lit else 1.3))

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
            if self.transform().m11() > 1.6:  # a tiny tree: do not blow it up
                self.resetTransform()
                self.scale(1.6, 1.6)

    def zoom_in(self) -> None:
        self._zoom(1.25)

    def zoom_out(self) -> None:
        self._zoom(0.8)

    def _zoom(self, factor: float) -> None:
        scale = self.transform().m11() * factor
        if 0.05 <= scale <= 8.0:
            self._user_zoomed = True
            self.scale(factor, factor)

    def wheelEvent(self, event) -> None:  # noqa: N802
        self._zoom(1.15 if event.angleDelta().y() > 0 else 1 / 1.15)
        event.accept()

    def resizeEvent(self, event) -> None:  # noqa: N802
        super().resizeEvent(event)
        if self.model is not None and not self._user_zoomed:
            self.fit()
