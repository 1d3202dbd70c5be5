"""Step 6 in the app: the preview is the real PDF page, exported and printed as is; paper and
text size change it; a tree too big for the page is refused with the size that fits; the
sizes that fit are shaded on the pruning curve."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from pathlib import Path  # noqa: E402

import pytest  # noqa: E402
from pypdf import PdfReader  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402
from PySide6.QtGui import QPageSize  # noqa: E402
from PySide6.QtPrintSupport import QPrintDialog, QPrinter  # noqa: E402
from PySide6.QtWidgets import QDialog  # noqa: E402

from core.cautions import CAUTIONS  # noqa: E402
from core.chart import sizes_that_fit  # noqa: E402
from tests.helpers import DEMO_A4_LEAVES  # noqa: E402

A4 = (595.28, 841.89)  # ISO 216, in points (docs/references.md)
LETTER = (612.0, 792.0)  # ANSI/ASME Y14.1


def _page_size(path) -> tuple[float, float]:
    box = PdfReader(path).pages[0].mediabox
    return tuple(sorted((round(float(box.width), 2), round(float(box.height), 2))))


@pytest.fixture
def charted(demo, run, qtbot):
    window = demo
    window.panels["size"].folds.setValue(5)
    run(window)
    window.panels["size"].choose_size(DEMO_A4_LEAVES)  # the 1-SE tree needs A3
    window.go_to("chart")
    chart = window.panels["chart"]
    qtbot.waitUntil(lambda: not chart.preview_busy and chart.pdf_path is not None, timeout=30000)
    return window


def test_preview_is_the_pdf_that_is_exported(charted, qtbot, dialogs, tmp_path):
    window = charted
    chart = window.panels["chart"]
    assert chart.document.pageCount() == 1
    assert chart.preview_stack.currentWidget() is chart.pdf_view
    dialogs.save_name = str(tmp_path / "chart")
    qtbot.mouseClick(chart.export_button, Qt.LeftButton)
    exported = tmp_path / "chart.pdf"
    assert exported.read_bytes() == open(chart.pdf_path, "rb").read()  # exactly the preview
    reader = PdfReader(exported)
    assert len(reader.pages) == 1
    assert _page_size(exported) == tuple(sorted(A4))
    text = " ".join(reader.pages[0].extract_text().split())
    model = window.session.model
    assert model.fingerprint[:12] in text
    assert CAUTIONS[2] in text
    for node in model.nodes:
        if not node.leaf:
            assert node.text.split()[0] in text


def test_paper_and_title_change_the_preview(charted, qtbot):
    window = charted
    chart = window.panels["chart"]
    first = chart.pdf_path
    chart.paper_combo.setCurrentIndex(chart.paper_combo.findData("letter"))
    chart.title_edit.setText("Who is admitted? (invented demo)")
    chart.title_edit.textEdited.emit(chart.title_edit.text())
    assert window.session.chart.paper == "letter"
    qtbot.waitUntil(lambda: not chart.preview_busy and chart.pdf_path not in (None, first),
                    timeout=30000)
    assert _page_size(chart.pdf_path) == tuple(sorted(LETTER))
    assert "Who is admitted?" in PdfReader(chart.pdf_path).pages[0].extract_text()


def test_print_goes_through_the_dialog_as_vector_text(charted, qtbot, monkeypatch, tmp_path):
    """Printing paints the chart's own page plan with QPainter: the printout holds the text
    itself (pypdf finds every question) and is small, not a 1200-dpi picture."""
    window = charted
    chart = window.panels["chart"]
    target = tmp_path / "printed.pdf"
    offered = []

    def accept(dialog):
        printer = dialog.printer()
        offered.append(printer.pageLayout().pageSize().id())
        printer.setOutputFormat(QPrinter.PdfFormat)
        printer.setOutputFileName(str(target))
        return QDialog.Accepted

    monkeypatch.setattr(QPrintDialog, "exec", accept)
    window.print_action.trigger()
    assert window.current_step() == "chart"
    assert offered == [QPageSize.A4]  # the dialog starts on the chart's own paper
    reader = PdfReader(target)
    assert len(reader.pages) == 1
    assert all(abs(a - b) < 1 for a, b in zip(_page_size(target), sorted(A4)))  # Qt: whole points
    printed = " ".join(reader.pages[0].extract_text().split())
    exported = " ".join(PdfReader(chart.pdf_path).pages[0].extract_text().split())
    model = window.session.model
    for node in model.nodes:
        if not node.leaf:
            assert " ".join(node.text.split()) in printed, node.text
    assert model.fingerprint[:12] in printed and CAUTIONS[2] in printed
    assert len(printed) > 0.9 * len(exported)  # the same words as the exported PDF
    assert target.stat().st_size < 400_000  # vector text: a raster page was 11 MB
    assert "printer" in chart.message.text()


def test_preview_zooms_to_read_the_small_print(charted, qtbot):
    chart = charted.panels["chart"]
    view = chart.pdf_view
    fitted = view.page_rect()
    assert view.viewport().rect().contains(fitted.toRect())  # the whole page at first
    view.zoom_in()
    view.zoom_in()
    assert view.page_rect().width() > 1.5 * fitted.width()
    assert view.horizontalScrollBar().maximum() > 0  # scrolled around the enlarged page
    view.fit()
    assert abs(view.page_rect().width() - fitted.width()) < 1


def test_a_tree_too_big_for_the_page_is_refused_with_the_size_that_fits(charted, qtbot):
    window = charted
    chart = window.panels["chart"]
    size = window.panels["size"]
    size.choose_size(max(window.session.model.path["leaves"]))  # the whole grown tree
    qtbot.waitUntil(lambda: not chart.preview_busy, timeout=60000)
    assert chart.pdf_path is None
    assert "does not fit" in chart.preview_note.text()
    assert chart.fit_button.isVisible()
    fitting = chart._fitting
    qtbot.mouseClick(chart.fit_button, Qt.LeftButton)
    assert window.session.model.chosen["leaves"] == fitting
    qtbot.waitUntil(lambda: not chart.preview_busy and chart.pdf_path is not None, timeout=30000)
    assert chart.document.pageCount() == 1


def test_sizes_that_fit_are_shaded_on_the_curve(charted, qtbot):
    window = charted
    size = window.panels["size"]
    qtbot.waitUntil(lambda: size.fit_sizes is not None, timeout=60000)
    assert window.session.chart.paper == "a4"
    expected = sizes_that_fit(window.session.derivation, window.session.chart)
    assert size.fit_sizes == tuple(expected)
    assert any(t.startswith("Fits on A4") for t in size.curve.legend_texts())
    window.session.set_chart(paper="a3")
    assert size.fit_sizes is None  # the shading of A4 is not shown for A3
    qtbot.waitUntil(lambda: size.fit_sizes is not None, timeout=60000)
    assert set(size.fit_sizes) >= set(expected)  # bigger paper holds at least as much
    assert "A3" in size.fit_note.text()


def test_the_numbered_rules_form_prints_as_text_too(charted, qtbot, tmp_path):
    window = charted
    chart = window.panels["chart"]
    chart.form_combo.setCurrentIndex(chart.form_combo.findData("rules"))
    assert window.session.chart.form == "rules"
    qtbot.waitUntil(lambda: not chart.preview_busy and chart.pdf_path is not None, timeout=30000)
    printer = QPrinter(QPrinter.HighResolution)
    printer.setOutputFormat(QPrinter.PdfFormat)
    printer.setOutputFileName(str(tmp_path / "rules.pdf"))
    chart.print_to(printer)
    printed = " ".join(PdfReader(tmp_path / "rules.pdf").pages[0].extract_text().split())
    exported = " ".join(PdfReader(chart.pdf_path).pages[0].extract_text().split())
    assert CAUTIONS[2] in printed and window.session.model.fingerprint[:12] in printed
    assert len(printed) > 0.9 * len(exported)


def test_previews_share_one_temporary_folder_removed_on_closing(charted, qtbot):
    """Every preview is drawn into the panel's one temporary folder, only the shown file is
    kept, and closing the window removes the folder (no empty Prunella-XXXX folders left)."""
    window = charted
    chart = window.panels["chart"]
    folder = Path(chart.pdf_path).parent
    chart.render_preview()
    qtbot.waitUntil(lambda: not chart.preview_busy and chart.pdf_path is not None
                    and chart.pdf_path.endswith(f"preview-{chart._serial}.pdf"), timeout=30000)
    assert Path(chart.pdf_path).parent == folder
    assert [p.name for p in folder.iterdir()] == [Path(chart.pdf_path).name]
    assert window.close()
    assert not folder.exists()
