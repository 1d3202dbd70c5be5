"""Reference trees on the papers they must print on: one page of the standard size, every
character at or above the legibility floor (read back from the PDF with pdfplumber), no
boxes overlapping, every question and the cautions extractable.

Reference trees (tests/chart_references.py): the Breast Cancer Wisconsin (Diagnostic) data
(Street, Wolberg & Mangasarian 1993) and the diabetes data (Efron et al. 2004, Annals of
Statistics 32:407–499), both shipped with scikit-learn; the invented demo cohort; seeded
random shapes. Paper sizes in points: ISO 216 (A4 210 × 297 mm, A3 297 × 420 mm) and
ANSI/ASME Y14.1 (Letter 8.5 × 11 in, Tabloid 11 × 17 in), as tests/test_chart_pdf.py holds
them; docs/references.md describes these sources.

A tree that the tree form cannot hold at the floor still prints, as numbered rules, on one
page (core/chart/rules.py); where each tree fits as a tree is measured by
tests/benchmarks/bench_chart_capacity.py.
"""

from __future__ import annotations

import datetime as dt
import io

import pdfplumber
import pytest

import _chart_demo as demo
import chart_references as refs
from core.cautions import CAUTIONS
from core.chart import ChartOptions, plan_chart
from core.chart.options import default_min_text
from core.chart.pdf import draw
from core.chart.text import Rect
from tests.test_chart_pdf import PAPER_POINTS, flat

DATE = dt.date(2025, 3, 14)

REFERENCES = {
    "wisconsin-30": lambda: refs.wisconsin(30).model,  # 1-SE tree, 6 boxes
    "wisconsin-10": lambda: refs.wisconsin(10).model,  # 1-SE tree, 8 boxes
    "diabetes-7": lambda: refs.diabetes_size(7).model,  # regression, 7 boxes
    "demo-1se": lambda: demo.admitted().model,  # invented cohort, the app's first chart, 7 boxes
    "demo-lowest": lambda: refs.demo_lowest_error().model,  # invented cohort, 7 boxes
    "random-8": lambda: refs.random_model(3, 8),  # a chain: every question has an outcome box
    "random-8b": lambda: refs.random_model(1, 8),
    "random-13": lambda: refs.random_model(4, 13),
    "random-13b": lambda: refs.random_model(1, 13),
}
# Issue 12: A4 and Letter hold these trees of up to 8 outcome boxes, A3 and Tabloid also
# those of 13, in whichever orientation the planner picks by trying both.
EIGHT = ("wisconsin-30", "wisconsin-10", "diabetes-7", "demo-1se", "demo-lowest", "random-8",
         "random-8b")
TREE_FITS = ([(name, paper) for paper in ("a4", "letter", "a3", "tabloid") for name in EIGHT]
             + [(name, paper) for paper in ("a3", "tabloid") for name in ("random-13",
                                                                          "random-13b")])


def _characters(pdf: bytes) -> tuple[list[dict], tuple[float, float]]:
    with pdfplumber.open(io.BytesIO(pdf)) as document:
        assert len(document.pages) == 1
        page = document.pages[0]
        return list(page.chars), (float(page.width), float(page.height))


def _check_page(model, plan, paper: str) -> None:
    pdf = draw(plan)[0]
    chars, size = _characters(pdf)
    assert sorted(size) == pytest.approx(sorted(PAPER_POINTS[paper]), abs=0.01)
    floor = default_min_text(paper)
    assert chars and min(c["size"] for c in chars) >= floor - 1e-6  # every character
    text = flat("".join(c["text"] for c in chars))
    for sentence in CAUTIONS:
        assert flat(sentence).replace(" ", "") in text.replace(" ", "")
    for node in model.nodes:
        if not node.leaf:
            assert node.text.replace(" ", "") in text.replace(" ", ""), node.text
    if plan.tree is not None:
        rects = plan.tree.rects()
        for i, a in enumerate(rects):
            for b in rects[i + 1:]:
                assert not a.overlaps(b)
        assert all(r.inside(plan.tree_area) for r in rects)
        # The panel's sections, wherever they went, keep clear of every arrow too.
        for block in plan.panel:
            for arrow in plan.tree.arrows:
                for (x0, y0), (x1, y1) in zip(arrow.points, arrow.points[1:]):
                    line = Rect(min(x0, x1), min(y0, y1), abs(x1 - x0), abs(y1 - y0))
                    assert not (line.x <= block.rect.right and block.rect.x <= line.right
                                and line.y <= block.rect.bottom and block.rect.y <= line.bottom)
    else:
        rows = [row.rect for row in plan.rules]
        assert len(rows) == len(model.leaves)
        for i, a in enumerate(rows):
            for b in rows[i + 1:]:
                assert not a.overlaps(b)
    panel = [b.rect for b in plan.panel]
    for k, rect in enumerate(panel):
        assert rect.inside(plan.printable)
        assert not any(rect.overlaps(r) for r in (plan.tree.rects() if plan.tree else []))
        assert not any(rect.overlaps(r) for r in panel[k + 1:] + [plan.qr])


@pytest.mark.slow
@pytest.mark.parametrize("name,paper", TREE_FITS)
def test_reference_trees_fit_as_trees(name: str, paper: str) -> None:
    model = REFERENCES[name]()
    plan = plan_chart(model, ChartOptions(paper=paper, printed=DATE))
    assert plan.tree is not None and plan.text_size >= default_min_text(paper)
    _check_page(model, plan, paper)


@pytest.mark.slow
@pytest.mark.parametrize("paper", ["a4", "letter", "a3", "tabloid"])
@pytest.mark.parametrize("name", ["wisconsin-10", "diabetes-7", "random-8"])
def test_the_chosen_size_prints_legibly_as_numbered_rules(name: str, paper: str) -> None:
    model = REFERENCES[name]()
    plan = plan_chart(model, ChartOptions(paper=paper, form="rules", printed=DATE))
    assert plan.tree is None and plan.text_size >= default_min_text(paper)
    _check_page(model, plan, paper)
    text = flat("".join(c["text"] for c in _characters(draw(plan)[0])[0]))
    assert "How to read: find the row" in text.replace("  ", " ")


def test_the_rules_rows_follow_every_route() -> None:
    """Each row names its box and lists, in order, the answers that lead to it."""
    from core.chart.rules import route_steps

    model = REFERENCES["random-8"]()
    plan = plan_chart(model, ChartOptions(paper="a4", form="rules", printed=DATE))
    assert [row.box.id for row in plan.rules] == [leaf.id for leaf in model.leaves]
    for row in plan.rules:
        said = flat(" ".join(line.text for line in row.route))
        steps = model.steps_to(row.box.id)
        assert [r[1][0] for r in route_steps(model, row.box.id)] == [s.answer for s in steps]
        position = 0
        for step in steps:
            found = said.find(step.question, position)
            assert found >= position, (step.question, said)
            position = found + len(step.question)
        assert row.box.lines[0].text == str(row.box.id)  # the number first
