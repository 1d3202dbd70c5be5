"""Drawing a planned chart as a one-page vector PDF with reportlab.

All text is real text in the embedded DejaVu fonts (searchable, selectable). The file is
deterministic (reportlab's ``invariant=1``, and the printed date as the file's own date): two
runs with the same model, options and printed date give identical bytes.
"""

from __future__ import annotations

import datetime as dt
import io
from pathlib import Path

from reportlab.graphics.barcode.qrencoder import QRCode, QRErrorCorrectLevel
from reportlab.lib.colors import HexColor
from reportlab.pdfgen import canvas as pdfcanvas

from .. import __version__
from ..model.tree import TreeModel
from ..safe_files import write_bytes_atomic
from . import style
from .layout import Line, PlacedArrow, PlacedBox, Rect
from .options import ChartOptions
from .page import ChartPlan, PanelBlock


class _Painter:
    """A thin layer over the canvas: top-left coordinates, and a record of every text colour
    drawn on every fill (so tests can check each pair's contrast)."""

    def __init__(self, canvas: pdfcanvas.Canvas, height: float):
        self.c, self.h = canvas, height
        self.pairs: set[tuple[str, str]] = set()

    def text(self, line: Line, ink: str, fill: str) -> None:
        self.pairs.add((ink, fill))
        c = self.c
        c.setFillColor(HexColor(ink))
        c.setFont(style.font_name(line.bold), line.size)
        if line.centred:
            c.drawCentredString(line.x, self.h - line.baseline, line.text)
        else:
            c.drawString(line.x, self.h - line.baseline, line.text)

    def _paint(self, fill: str | None, edge: str | None, width: float) -> None:
        if fill:
            self.c.setFillColor(HexColor(fill))
        if edge:
            self.c.setStrokeColor(HexColor(edge))
            self.c.setLineWidth(width)

    def rect(self, r: Rect, fill: str | None, edge: str | None = None, width: float = 1.0,
             radius: float = 0.0, dash: tuple[float, ...] | None = None) -> None:
        c = self.c
        c.saveState()
        self._paint(fill, edge, width)
        if dash:
            c.setDash(list(dash))
        if radius:
            c.roundRect(r.x, self.h - r.bottom, r.w, r.h, radius, stroke=int(bool(edge)),
                        fill=int(bool(fill)))
        else:
            c.rect(r.x, self.h - r.bottom, r.w, r.h, stroke=int(bool(edge)), fill=int(bool(fill)))
        c.restoreState()

    def polygon(self, points, fill: str | None, edge: str | None, width: float = 1.0) -> None:
        c = self.c
        c.saveState()
        path = c.beginPath()
        (x0, y0), rest = points[0], points[1:]
        path.moveTo(x0, self.h - y0)
        for x, y in rest:
            path.lineTo(x, self.h - y)
        path.close()
        self._paint(fill, edge, width)
        c.setLineJoin(1)  # round corners on the question boxes' points
        c.drawPath(path, stroke=int(bool(edge)), fill=int(bool(fill)))
        c.restoreState()

    def polyline(self, points, colour: str, width: float) -> None:
        c = self.c
        c.saveState()
        c.setStrokeColor(HexColor(colour))
        c.setLineWidth(width)
        c.setLineJoin(1)
        path = c.beginPath()
        path.moveTo(points[0][0], self.h - points[0][1])
        for x, y in points[1:]:
            path.lineTo(x, self.h - y)
        c.drawPath(path, stroke=1, fill=0)
        c.restoreState()

    def circle(self, x: float, y: float, r: float, fill: str) -> None:
        c = self.c
        c.saveState()
        c.setFillColor(HexColor(fill))
        c.circle(x, self.h - y, r, stroke=0, fill=1)
        c.restoreState()

    def hline(self, x0: float, x1: float, y: float, colour: str, width: float) -> None:
        self.polyline(((x0, y), (x1, y)), colour, width)


def _arrow(p: _Painter, arrow: PlacedArrow, s: float) -> None:
    points = list(arrow.points)
    (x1, y1), (x2, y2) = points[-2], points[-1]
    length, half = 0.75 * s, 0.36 * s
    dx, dy = x2 - x1, y2 - y1
    norm = max((dx * dx + dy * dy) ** 0.5, 1e-9)
    ux, uy = dx / norm, dy / norm
    base = (x2 - ux * length, y2 - uy * length)
    p.polyline(points[:-1] + [base], style.ARROW, 0.12 * s)
    p.polygon([(x2, y2), (base[0] - uy * half, base[1] + ux * half),
               (base[0] + uy * half, base[1] - ux * half)], style.ARROW, None)
    p.rect(arrow.label, style.WHITE, None, radius=0.3 * s)
    for line in arrow.label_lines:
        p.text(line, style.INK, style.WHITE)


def _question(p: _Painter, box: PlacedBox, s: float) -> None:
    r, k = box.rect, box.point
    p.polygon([(r.x + k, r.y), (r.right - k, r.y), (r.right, r.cy), (r.right - k, r.bottom),
               (r.x + k, r.bottom), (r.x, r.cy)], style.WHITE, style.DECISION_EDGE, 0.16 * s)
    bx, by, radius = box.badge
    p.circle(bx, by, radius, style.BADGE_FILL)
    number, *rest = box.lines
    p.text(number, style.WHITE, style.BADGE_FILL)
    for line in rest:
        p.text(line, style.INK, style.WHITE)


def _outcome(p: _Painter, box: PlacedBox, plan: ChartPlan, s: float) -> None:
    band = plan.text.bands[box.id].style
    small = box.id in plan.text.small
    r, corner = box.rect, 0.45 * s
    p.rect(r, band.body, None, radius=corner)
    strip = Rect(r.x, r.y, r.w, box.strip)
    p.rect(strip, band.strip, None, radius=corner)
    p.rect(Rect(r.x, r.y + box.strip / 2, r.w, box.strip / 2), band.strip, None)
    edge = band.edge_width * s / 9
    inset = Rect(r.x + edge / 2, r.y + edge / 2, r.w - edge, r.h - edge)  # ink stays inside
    p.rect(inset, None, band.edge, edge, radius=corner, dash=(0.5 * s, 0.3 * s) if small else None)
    bx, by, radius = box.badge
    p.circle(bx, by, radius, style.BADGE_FILL)
    number, heading, *rest = box.lines
    p.text(number, style.WHITE, style.BADGE_FILL)
    p.text(heading, band.strip_ink, band.strip)
    for line in rest:
        p.text(line, band.body_ink, band.body)


def _panel(p: _Painter, block: PanelBlock, b: float) -> None:
    kind = block.section.kind
    fill = {"caution": style.CAUTION_FILL, "checked": style.CHECKED_FILL}.get(kind, style.WHITE)
    if kind in ("caution", "checked"):
        edge = style.CAUTION_EDGE if kind == "caution" else style.CHECKED_EDGE
        p.rect(block.rect, fill, edge, 1.0, radius=0.4 * b)
    for item, swatch in block.swatches:
        if item.band is not None:
            p.rect(swatch, item.band.style.strip, item.band.style.edge,
                   item.band.style.edge_width, radius=0.2 * b)
        else:
            p.rect(swatch, style.WHITE, style.INK, 1.0, radius=0.2 * b, dash=(0.5 * b, 0.3 * b))
    for line in block.lines:
        p.text(line, style.INK, fill)


def _qr(canvas: pdfcanvas.Canvas, plan: ChartPlan) -> None:
    """The model fingerprint as a QR code, drawn module by module with reportlab's encoder
    (its drawing widget would bring a font of its own into the file)."""
    code = QRCode(None, QRErrorCorrectLevel.M)
    code.addData(f"sha256:{plan.text.fingerprint}")
    code.make()
    count = code.getModuleCount()
    box = plan.qr
    unit = box.w / count
    canvas.saveState()
    canvas.setFillColor(HexColor(style.OKABE_ITO["black"]))
    for row in range(count):
        col = 0
        while col < count:
            if not code.isDark(row, col):
                col += 1
                continue
            start = col
            while col < count and code.isDark(row, col):
                col += 1
            canvas.rect(box.x + start * unit, plan.height - box.y - (row + 1) * unit,
                        (col - start) * unit, unit, stroke=0, fill=1)
    canvas.restoreState()


def paint(c: pdfcanvas.Canvas, plan: ChartPlan) -> set[tuple[str, str]]:
    """Draw the whole chart of ``plan`` onto canvas ``c`` in page coordinates (the caller may
    translate or scale first, as the methods report does); returns the (ink, fill) pairs."""
    p = _Painter(c, plan.height)
    b, s = plan.scale.body, plan.text_size
    for line in plan.header:
        p.text(line, style.INK if line.bold else style.SOFT_INK, style.WHITE)
    if plan.banner is not None:
        p.rect(plan.banner, style.UNCHECKED_FILL, style.UNCHECKED_EDGE, 2.0, radius=0.4 * b)
        for line in plan.banner_lines:
            p.text(line, style.INK, style.UNCHECKED_FILL)
    if plan.tree is not None:
        for arrow in plan.tree.arrows:
            _arrow(p, arrow, s)
        for box in plan.tree.boxes.values():
            if box.kind == "question":
                _question(p, box, s)
            else:
                _outcome(p, box, plan, s)
    for k, row in enumerate(plan.rules):  # the rules form: a box and its route per row
        if k and row.rect.y > plan.rules[k - 1].rect.y:  # a thin rule between rows
            p.hline(row.rect.x, row.rect.right, row.rect.y - 0.4 * s, style.RULE, 0.4)
        _outcome(p, row.box, plan, s)
        for line in row.route:
            p.text(line, style.INK, style.WHITE)
    for x0, y0, x1, y1 in plan.dividers:
        p.polyline(((x0, y0), (x1, y1)), style.RULE, 0.6)
    for block in plan.panel:
        _panel(p, block, b)
    for line in plan.footer:
        p.text(line, style.INK if line.bold else style.SOFT_INK, style.WHITE)
    _qr(c, plan)
    return p.pairs


def stamp_date(canvas: pdfcanvas.Canvas, day: dt.date) -> None:
    """Give the file ``day`` as its creation and modification date. reportlab's invariant
    mode, which keeps reruns byte for byte the same, would write 1 January 2000."""
    canvas.setDateFormatter(lambda *_clock: f"D:{day:%Y%m%d}000000+00'00'")


def draw(plan: ChartPlan) -> tuple[bytes, set[tuple[str, str]]]:
    """The PDF of ``plan``, and every (text colour, fill) pair it drew."""
    regular, _ = style.register_fonts()
    out = io.BytesIO()
    c = pdfcanvas.Canvas(out, pagesize=(plan.width, plan.height), invariant=1,
                         initialFontName=regular, initialFontSize=plan.scale.body,
                         pageCompression=1)
    c.setTitle(plan.text.title)
    c.setAuthor("Prunella")
    c.setCreator(f"Prunella {__version__}")
    c.setSubject(plan.text.subtitle)
    c.setKeywords(f"model sha256 {plan.text.fingerprint}")
    stamp_date(c, plan.options.printed)
    pairs = paint(c, plan)
    c.showPage()
    c.save()
    return out.getvalue(), pairs


def render_chart(model: TreeModel, options: ChartOptions | None = None) -> bytes:
    """The one-page PDF chart of ``model``; raises InputError when it cannot fit legibly."""
    from .fitting import plan_chart

    return draw(plan_chart(model, options))[0]


def write_chart(model: TreeModel, path: str | Path, options: ChartOptions | None = None) -> ChartPlan:
    """Write the chart of ``model`` to ``path`` (atomically); returns the plan it followed."""
    from .fitting import plan_chart

    plan = plan_chart(model, options)
    write_bytes_atomic(path, draw(plan)[0])
    return plan
