"""The look of the methods report: fonts, paragraph styles, tables, figures, page frame.

DejaVu Sans (shipped inside matplotlib) carries the Unicode the report needs (≤, ≥, ±, –,
°C, ², ·). Pages are A4 with a running header, and a footer with the model fingerprint and
"page X of Y". reportlab's ``invariant`` mode keeps the clock out of the file, and the file
carries the report's own date, so a rerun with the same date gives the same bytes.
"""

from __future__ import annotations

import datetime as dt
import io
from pathlib import Path
from xml.sax.saxutils import escape

from reportlab.lib import colors
from reportlab.lib.enums import TA_LEFT
from reportlab.lib.pagesizes import A4
from reportlab.lib.styles import ParagraphStyle
from reportlab.lib.units import cm
from reportlab.pdfbase import pdfmetrics
from reportlab.pdfbase.ttfonts import TTFont
from reportlab.pdfgen import canvas
from reportlab.platypus import (
    BaseDocTemplate, Flowable, Frame, Image, KeepTogether, PageTemplate, Paragraph, Spacer, Table,
    TableStyle,
)

from ..chart.pdf import stamp_date
from .figures import figure_png

PAGE = A4
MARGIN = 2.2 * cm
TEXT_WIDTH = PAGE[0] - 2 * MARGIN
FONT = "PrunellaSans"
INK = colors.HexColor("#1a1a1a")
RULE = colors.HexColor("#8a8a8a")
HEAD_FILL = colors.HexColor("#e4edf5")  # pale blue behind table headers; black text on it
CAUTION_FILL = colors.HexColor("#fff4d6")
CAUTION_EDGE = colors.HexColor("#b07800")

_registered = False


def register_fonts() -> None:
    """Register DejaVu Sans (regular, bold, italic, bold italic) from matplotlib's fonts."""
    global _registered
    if _registered:
        return
    from ..chart.style import font_directory

    folder = Path(font_directory())
    faces = {"": "DejaVuSans.ttf", "-Bold": "DejaVuSans-Bold.ttf",
             "-Italic": "DejaVuSans-Oblique.ttf", "-BoldItalic": "DejaVuSans-BoldOblique.ttf"}
    for suffix, file in faces.items():
        pdfmetrics.registerFont(TTFont(FONT + suffix, str(folder / file)))
    pdfmetrics.registerFontFamily(FONT, normal=FONT, bold=FONT + "-Bold", italic=FONT + "-Italic",
                                  boldItalic=FONT + "-BoldItalic")
    _registered = True


def _style(name: str, size: float, leading: float, bold: bool = False, **more) -> ParagraphStyle:
    more.setdefault("textColor", INK)
    return ParagraphStyle(name, fontName=FONT + ("-Bold" if bold else ""), fontSize=size,
                          leading=leading, alignment=TA_LEFT, **more)


class Styles:
    """The paragraph styles (made after the fonts are registered)."""

    def __init__(self) -> None:
        register_fonts()
        self.title = _style("title", 17, 21, bold=True, spaceAfter=6)
        self.subtitle = _style("subtitle", 9.5, 13, textColor=colors.HexColor("#333333"))
        self.h1 = _style("h1", 13, 16, bold=True, spaceBefore=12, spaceAfter=5, keepWithNext=1)
        self.h2 = _style("h2", 10.5, 13, bold=True, spaceBefore=8, spaceAfter=3, keepWithNext=1)
        self.body = _style("body", 9, 12.2, spaceAfter=4)
        self.bullet = _style("bullet", 9, 12.2, leftIndent=12, bulletIndent=2, spaceAfter=2)
        self.cell = _style("cell", 7.8, 9.6)
        self.cell_bold = _style("cellbold", 7.8, 9.6, bold=True)
        self.caption = ParagraphStyle("caption", parent=self.body, fontName=FONT + "-Italic",
                                      fontSize=8, leading=10, spaceBefore=2, spaceAfter=8)
        self.caution = _style("caution", 8.8, 11.5, leftIndent=10, bulletIndent=0)
        self.figures = 0

    def next_figure(self) -> int:
        """Figures are numbered in the order they appear."""
        self.figures += 1
        return self.figures


def text(value) -> str:
    """Plain text made safe for a Paragraph."""
    return escape(str(value))


def para(value: str, style: ParagraphStyle, markup: bool = False) -> Paragraph:
    return Paragraph(value if markup else text(value), style)


def table(rows: list[list], widths: list[float], styles: Styles, header: bool = True,
          bold_first: bool = False, align_right: tuple[int, ...] = (), keep: bool = True):
    """A ruled table whose cells wrap; ``widths`` are shares of the text width (sum ≤ 1)."""
    cells = []
    for i, row in enumerate(rows):
        out = []
        for j, value in enumerate(row):
            if isinstance(value, (Paragraph, Image, Table)):
                out.append(value)
                continue
            bold = (header and i == 0) or (bold_first and j == 0)
            style = styles.cell_bold if bold else styles.cell
            if j in align_right:
                style = ParagraphStyle("r", parent=style, alignment=2)
            out.append(Paragraph(text(value), style))
        cells.append(out)
    result = Table(cells, colWidths=[w * TEXT_WIDTH for w in widths], repeatRows=1 if header else 0,
                   hAlign="LEFT", spaceBefore=2, spaceAfter=8)
    commands = [("VALIGN", (0, 0), (-1, -1), "TOP"),
                ("LINEBELOW", (0, -1), (-1, -1), 0.6, RULE),
                ("TOPPADDING", (0, 0), (-1, -1), 2.2), ("BOTTOMPADDING", (0, 0), (-1, -1), 2.2),
                ("LEFTPADDING", (0, 0), (-1, -1), 3), ("RIGHTPADDING", (0, 0), (-1, -1), 3)]
    if header:
        commands += [("BACKGROUND", (0, 0), (-1, 0), HEAD_FILL),
                     ("LINEABOVE", (0, 0), (-1, 0), 0.8, RULE),
                     ("LINEBELOW", (0, 0), (-1, 0), 0.6, RULE)]
    else:
        commands.append(("LINEABOVE", (0, 0), (-1, 0), 0.6, RULE))
    commands.append(("LINEBELOW", (0, 1 if header else 0), (-1, -2), 0.25,
                     colors.HexColor("#cfcfcf")))
    result.setStyle(TableStyle(commands))
    # A short table is never split over two pages (a lone row on a page reads badly).
    # (keep=False when the caller keeps it together with its introduction: nested
    # KeepTogethers leave pages half empty.)
    return KeepTogether([result]) if keep and len(rows) <= 20 else result


def figure(fig, caption: str, styles: Styles, width: float = 1.0) -> KeepTogether:
    """A matplotlib figure as a high-resolution image with its caption, kept on one page."""
    png = figure_png(fig)
    w_in, h_in = fig.get_size_inches()
    width_pt = min(width * TEXT_WIDTH, w_in * 72)
    image = Image(io.BytesIO(png), width=width_pt, height=width_pt * h_in / w_in)
    image.hAlign = "LEFT"
    return KeepTogether([image, Paragraph(caption, styles.caption)])


def figures_side_by_side(figs: list, caption: str, styles: Styles,
                         width: float = 0.88) -> KeepTogether:
    """Two or three figures in one row (``width`` of the text width), one caption below."""
    share = width / len(figs)
    images = []
    for fig in figs:
        w_in, h_in = fig.get_size_inches()
        width_pt = share * TEXT_WIDTH - 6
        images.append(Image(io.BytesIO(figure_png(fig)), width=width_pt,
                            height=width_pt * h_in / w_in))
    row = Table([images], colWidths=[share * TEXT_WIDTH] * len(figs), hAlign="LEFT")
    row.setStyle(TableStyle([("LEFTPADDING", (0, 0), (-1, -1), 0),
                             ("VALIGN", (0, 0), (-1, -1), "TOP")]))
    return KeepTogether([row, Paragraph(caption, styles.caption)])


def caution_box(title: str, lines: list[str], styles: Styles, banner: str | None = None) -> Table:
    """The cautions in a tinted, ruled box (the rule, not only the tint, marks it out)."""
    content = []
    if banner:
        content.append(Paragraph(f"<b>{text(banner)}</b>", styles.caution))
        content.append(Spacer(1, 3))
    content.append(Paragraph(f"<b>{text(title)}</b>", styles.caution))
    content += [Paragraph(text(line), styles.caution, bulletText="•") for line in lines]
    box = Table([[content]], colWidths=[TEXT_WIDTH], hAlign="LEFT", spaceBefore=4, spaceAfter=8)
    box.setStyle(TableStyle([("BACKGROUND", (0, 0), (-1, -1), CAUTION_FILL),
                             ("BOX", (0, 0), (-1, -1), 1.2, CAUTION_EDGE),
                             ("TOPPADDING", (0, 0), (-1, -1), 6),
                             ("BOTTOMPADDING", (0, 0), (-1, -1), 6),
                             ("LEFTPADDING", (0, 0), (-1, -1), 8)]))
    return box


class _NumberedCanvas(canvas.Canvas):
    """Holds every page until the end, so the footer can say 'page X of Y'."""

    footer_left = ""
    header = ""

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        self._pages: list[dict] = []

    def showPage(self):  # noqa: N802 (reportlab's name)
        self._pages.append(dict(self.__dict__))
        self._startPage()

    def save(self):
        total = len(self._pages)
        for state in self._pages:
            self.__dict__.update(state)
            self._frame(total)
            super().showPage()
        super().save()

    def _frame(self, total: int) -> None:
        self.saveState()
        self.setFont(FONT, 7.5)
        self.setFillColor(colors.HexColor("#444444"))
        width, height = PAGE
        self.drawString(MARGIN, height - 1.3 * cm, self.header)
        self.setStrokeColor(RULE)
        self.setLineWidth(0.4)
        self.line(MARGIN, height - 1.45 * cm, width - MARGIN, height - 1.45 * cm)
        self.line(MARGIN, 1.45 * cm, width - MARGIN, 1.45 * cm)
        self.drawString(MARGIN, 1.05 * cm, self.footer_left)
        self.drawRightString(width - MARGIN, 1.05 * cm, f"Page {self._pageNumber} of {total}")
        self.restoreState()


def keep_headings_with_next(story: list) -> list:
    """Headings pulled into the KeepTogether block that follows them.

    reportlab's keepWithNext does not reach into a KeepTogether (it is a container), so a
    heading followed by a kept-together figure or table could be left alone at the foot of a
    page, its content on the next."""
    out: list = []
    for flowable in reversed(story):
        if out and isinstance(out[-1], KeepTogether) and flowable.getKeepWithNext() \
                and not isinstance(flowable, KeepTogether):
            out[-1]._content.insert(0, flowable)  # the block keeps its own kind
        else:
            out.append(flowable)
    return out[::-1]


def build_pdf(story: list, header: str, footer: str, title: str, author: str,
              dated: dt.date) -> bytes:
    """Lay out ``story`` on A4 pages with the running header and numbered footer; the file
    is dated ``dated``."""
    story = keep_headings_with_next(story)
    register_fonts()
    buffer = io.BytesIO()
    doc = BaseDocTemplate(buffer, pagesize=PAGE, leftMargin=MARGIN, rightMargin=MARGIN,
                          topMargin=2.0 * cm, bottomMargin=2.0 * cm, title=title, author=author,
                          subject="Methods and validation report", creator="Prunella",
                          invariant=1)
    frame = Frame(MARGIN, 2.0 * cm, TEXT_WIDTH, PAGE[1] - 4.0 * cm, id="body",
                  leftPadding=0, rightPadding=0, topPadding=0, bottomPadding=0)
    doc.addPageTemplates([PageTemplate(id="page", frames=[frame])])

    class Canvas(_NumberedCanvas):
        def __init__(self, *args, **kwargs):
            super().__init__(*args, **kwargs)
            stamp_date(self, dated)

    Canvas.header, Canvas.footer_left = header, footer
    doc.build(story, canvasmaker=Canvas)
    return buffer.getvalue()


class ChartFigure(Flowable):
    """The one-page wall chart, drawn as vector graphics at a reduced scale."""

    def __init__(self, plan, max_width: float, max_height: float):
        super().__init__()
        self.plan = plan
        self.full = min(max_width / plan.width, max_height / plan.height)
        self.reduce(1.0)

    def reduce(self, share: float) -> None:
        """Draw at ``share`` of the full reduced size."""
        self.scale = self.full * share
        self.width, self.height = self.plan.width * self.scale, self.plan.height * self.scale

    def wrap(self, available_width, available_height):
        return self.width, self.height

    def draw(self):
        from ..chart.pdf import paint
        from ..chart.style import register_fonts as register_chart_fonts

        register_chart_fonts()
        canvas = self.canv
        canvas.saveState()
        canvas.setStrokeColor(RULE)
        canvas.setLineWidth(0.5)
        canvas.rect(0, 0, self.width, self.height)  # the sheet's edge
        canvas.scale(self.scale, self.scale)
        paint(canvas, self.plan)
        canvas.restoreState()


LEAST_CHART = 0.6  # a chart reduced below this share of its figure size moves to the next page


class _KeepChart(KeepTogether):
    """The chart, its caption (and the heading pulled in before them) on one page; when they
    would not fit the rest of the page, the chart is drawn smaller to fit it, rather than
    leave the page nearly empty, unless that takes it below LEAST_CHART of its size."""

    def __init__(self, flowables, chart: ChartFigure):
        super().__init__(flowables)
        self.chart = chart

    def wrap(self, available_width, available_height):
        self.chart.reduce(1.0)
        result = super().wrap(available_width, available_height)
        over = self._H - available_height
        if over > 0:
            share = (self.chart.height - over) / self.chart.height
            if share >= LEAST_CHART:
                self.chart.reduce(share)
                result = super().wrap(available_width, available_height)
        return result


def chart_figure(plan, caption: str, styles: Styles, height: float = 0.62 * PAGE[1]) -> KeepTogether:
    """The chart as printed, reduced to fit the text width and ``height``, with its caption."""
    drawing = ChartFigure(plan, TEXT_WIDTH, height)
    drawing.hAlign = "CENTER"
    return _KeepChart([drawing, Paragraph(caption, styles.caption)], drawing)
