"""A PDF page shown whole, as printed: QtPdf renders the file itself at the size on screen.

QPdfDocument.render draws the page (a dozen milliseconds for a screenful); the widget keeps
the picture until its size changes. Drawn here rather than with QPdfView, which left some
landscape pages blank when fitted to a large window.
"""

from __future__ import annotations

from PySide6.QtCore import QRectF, QSize, Qt
from PySide6.QtGui import QColor, QImage, QPainter, QPen
from PySide6.QtPdf import QPdfDocument
from PySide6.QtWidgets import QSizePolicy, QWidget

MARGIN = 14  # pixels of grey around the page


class PdfPreview(QWidget):
    def __init__(self, document: QPdfDocument, parent=None) -> None:
        super().__init__(parent)
        self.document = document
        self._image: QImage | None = None
        self.setSizePolicy(QSizePolicy.Expanding, QSizePolicy.Expanding)
        self.setMinimumSize(240, 240)
        self.setAttribute(Qt.WA_OpaquePaintEvent, True)
        document.statusChanged.connect(self._forget)

    def _forget(self, *_args) -> None:
        self._image = None
        self.update()

    def page_rect(self) -> QRectF:
        """Where the first page goes: as large as fits, centred, its own proportions."""
        if self.document.pageCount() < 1:
            return QRectF()
        page = self.document.pagePointSize(0)
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
            self._image = self.document.render(0, pixels)
            self._image.setDevicePixelRatio(ratio)
        painter.setPen(QPen(QColor("#5a5a5a"), 1))
        painter.fillRect(rect.translated(3, 3), QColor("#6f6f6f"))  # a soft shadow
        painter.fillRect(rect, QColor("#ffffff"))
        painter.drawImage(rect.topLeft(), self._image)
        painter.drawRect(rect)
