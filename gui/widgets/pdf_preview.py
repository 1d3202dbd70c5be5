"""A PDF page shown as printed: QtPdf renders the file itself at the size on screen, whole
(fit) or zoomed in to read the small print, scrolling around the enlarged page.

QPdfDocument.render draws the page (a dozen milliseconds for a screenful); the page keeps
the picture until its size changes. Drawn here rather than with QPdfView, which left some
landscape pages blank when fitted to a large window.
"""

from __future__ import annotations

from PySide6.QtCore import QRectF, QSize, Qt
from PySide6.QtGui import QColor, QImage, QPainter, QPen
from PySide6.QtPdf import QPdfDocument
from PySide6.QtWidgets import QScrollArea, QSizePolicy, QWidget

MARGIN = 14  # pixels of grey around the page
ZOOM_STEP = 1.25
MAX_ZOOM = 6.0  # six times the fitted page: 9 pt text is read easily on a small screen


class _Page(QWidget):
    """The page at the size its preview asks for."""

    def __init__(self, preview: "PdfPreview") -> None:
        super().__init__()
        self.preview = preview
        self._image: QImage | None = None
        self.setAttribute(Qt.WA_OpaquePaintEvent, True)

    def forget(self) -> None:
        self._image = None
        self.update()

    def page_rect(self) -> QRectF:
        document = self.preview.document
        if document.pageCount() < 1:
            return QRectF()
        page = document.pagePointSize(0)
        room_w, room_h = self.width() - 2 * MARGIN, self.height() - 2 * MARGIN
        if page.width() <= 0 or page.height() <= 0 or room_w <= 0 or room_h <= 0:
            return QRectF()
        scale = min(room_w / page.width(), room_h / page.height())
        w, h = page.width() * scale, page.height() * scale
        return QRectF((self.width() - w) / 2, (self.height() - h) / 2, w, h)

    def paintEvent(self, _event) -> None:  # noqa: N802
        painter = QPainter(self)
        painter.fillRect(self.rect(), QColor("#8c8c8c"))
        rect = self.page_rect()
        if rect.isEmpty():
            return
        ratio = self.devicePixelRatioF()
        pixels = QSize(round(rect.width() * ratio), round(rect.height() * ratio))
        if self._image is None or self._image.size() != pixels:
            self._image = self.preview.document.render(0, pixels)
            self._image.setDevicePixelRatio(ratio)
        painter.setPen(QPen(QColor("#5a5a5a"), 1))
        painter.fillRect(rect.translated(3, 3), QColor("#6f6f6f"))  # a soft shadow
        painter.fillRect(rect, QColor("#ffffff"))
        painter.drawImage(rect.topLeft(), self._image)
        painter.drawRect(rect)


class PdfPreview(QScrollArea):
    """The first page of a document: fitted to the space, or zoomed (Ctrl + wheel, or the
    zoom methods) and scrolled."""

    def __init__(self, document: QPdfDocument, parent=None) -> None:
        super().__init__(parent)
        self.document = document
        self.zoom = 1.0  # 1: the whole page fits
        self.page = _Page(self)
        self.setWidget(self.page)
        self.setWidgetResizable(False)
        self.setAlignment(Qt.AlignCenter)
        self.setSizePolicy(QSizePolicy.Expanding, QSizePolicy.Expanding)
        self.setMinimumSize(240, 240)
        self.setStyleSheet("QScrollArea { background: #8c8c8c; border: none; }")
        document.statusChanged.connect(lambda *_args: self.page.forget())

    def page_rect(self) -> QRectF:
        """Where the page is drawn, in the preview's own coordinates."""
        return self.page.page_rect().translated(self.page.pos())

    def set_zoom(self, zoom: float) -> None:
        self.zoom = min(max(zoom, 1.0), MAX_ZOOM)
        self._fit_page()

    def zoom_in(self) -> None:
        self.set_zoom(self.zoom * ZOOM_STEP)

    def zoom_out(self) -> None:
        self.set_zoom(self.zoom / ZOOM_STEP)

    def fit(self) -> None:
        self.set_zoom(1.0)

    def _fit_page(self) -> None:
        room = self.viewport().size()
        self.page.resize(QSize(max(1, round(room.width() * self.zoom)),
                               max(1, round(room.height() * self.zoom))))

    def resizeEvent(self, event) -> None:  # noqa: N802
        super().resizeEvent(event)
        self._fit_page()

    def wheelEvent(self, event) -> None:  # noqa: N802
        if event.modifiers() & Qt.ControlModifier:
            self.zoom_in() if event.angleDelta().y() > 0 else self.zoom_out()
            event.accept()
            return
        super().wheelEvent(event)
