"""The tidy tree layout, checked as properties on many random trees.

Outside references for the properties (Reingold & Tilford 1981, IEEE TSE 7:223–228; Walker
1990, Software: Practice and Experience 20:685–705; Buchheim, Jünger & Leipert 2002; and, for
boxes of different lengths, the non-layered variant of van der Ploeg 2014, Software: Practice
and Experience 44:1467–1484) (from memory): no two boxes overlap, a parent is centred over its
children, no lines cross, and identical subtrees are drawn identically; see
docs/references.md. Prunella's variant, an outcome box beside its question, is checked too.
"""

from __future__ import annotations

import random
import subprocess
from dataclasses import replace
import sys
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from core.chart.layout import (
    BoxSpec, LayoutStyle, Para, TreeSpec, balanced_wrap, beside_parent, layout_tree,
    reportlab_measure, wrap,
)

ROOT = Path(__file__).resolve().parents[1]
WORDS = ("Breathing", "rate", "above", "24", "/min?", "Oxygen", "saturation", "(room air)",
         "How", "the", "patient", "arrived:", "ambulance", "or", "inter-hospital", "transfer",
         "C-reactive", "protein", "mg/L", "Age", "years", "Temperature", "38.5", "°C", "SpO₂")


def fake_measure(text: str, bold: bool, size: float) -> float:
    """A measurer that needs no font: every character 0.55 em (0.6 em bold)."""
    return len(text) * size * (0.6 if bold else 0.55)


def _words(rng: random.Random, low: int, high: int) -> str:
    return " ".join(rng.choice(WORDS) for _ in range(rng.randint(low, high)))


def _shape(rng: random.Random, leaves: int):
    """A random subtree with texts: ("outcome", body, heading) or ("question", body, kids),
    kids being ((YES label, subtree), (NO label, subtree))."""
    if leaves == 1:
        body = (Para(_words(rng, 1, 5), bold=True), Para(_words(rng, 1, 4)), Para(_words(rng, 1, 3)))
        heading = Para(rng.choice(("LOWER RATE", "AVERAGE RATE", "HIGHER RATE")), True)
        return ("outcome", body, heading)
    split = rng.randint(1, leaves - 1)
    labels = [(Para("YES", True),), (Para("NO", True),)]
    labels[rng.randint(0, 1)] += (Para("or not recorded"),)
    body = (Para(_words(rng, 2, 9) + "?", bold=True, scale=1.1),)
    return ("question", body, ((labels[0], _shape(rng, split)),
                               (labels[1], _shape(rng, leaves - split))))


def random_tree(seed: int, max_leaves: int = 14, duplicate: bool = False) -> TreeSpec:
    """A random binary tree with random question and outcome texts. With ``duplicate``, the
    root's two subtrees are copies of one another (same shape, same texts)."""
    rng = random.Random(seed)
    leaves = rng.randint(1, max_leaves)
    if duplicate:
        half = _shape(rng, max(2, leaves // 2))
        shape = ("question", (Para("Copied subtrees below?", True, 1.1),),
                 (((Para("YES", True),), half), ((Para("NO", True),), half)))
    else:
        shape = _shape(rng, leaves)
    children: dict[int, tuple[int, int]] = {}
    boxes: dict[int, BoxSpec] = {}
    labels: dict[tuple[int, int], tuple[Para, ...]] = {}
    counter = [0]

    def build(node) -> int:
        counter[0] += 1
        me = counter[0]
        # Two-digit box numbers throughout, so copies have equal badges.
        if node[0] == "outcome":
            boxes[me] = BoxSpec("outcome", "88", node[1], heading=node[2])
            return me
        boxes[me] = BoxSpec("question", "88", node[1])
        kids = []
        for label, sub in node[2]:
            child = build(sub)
            labels[(me, child)] = label
            kids.append(child)
        children[me] = tuple(kids)
        return me

    root = build(shape)
    return TreeSpec(root, children, boxes, labels)


def _segments(layout):
    """Every straight stretch of every arrow: (arrow, (x0, y0), (x1, y1))."""
    return [(arrow, a, b) for arrow in layout.arrows for a, b in zip(arrow.points, arrow.points[1:])]


def _cuts_through(a, b, rect, tol: float) -> bool:
    """An axis-parallel stretch from a to b passes through the inside of ``rect``."""
    (x0, y0), (x1, y1) = a, b
    lo_x, hi_x, lo_y, hi_y = min(x0, x1), max(x0, x1), min(y0, y1), max(y0, y1)
    return (lo_x < rect.right - tol and hi_x > rect.x + tol and
            lo_y < rect.bottom - tol and hi_y > rect.y + tol) if lo_x < hi_x or lo_y < hi_y \
        else False


def _cross(first, second, tol: float) -> bool:
    """Two axis-parallel stretches meet anywhere but at an end of both."""
    (a0, a1), (b0, b1) = first, second
    ax, ay = sorted((a0[0], a1[0])), sorted((a0[1], a1[1]))
    bx, by = sorted((b0[0], b1[0])), sorted((b0[1], b1[1]))
    meet_x = ax[0] <= bx[1] + tol and bx[0] <= ax[1] + tol
    meet_y = ay[0] <= by[1] + tol and by[0] <= ay[1] + tol
    if not (meet_x and meet_y):
        return False
    ends = {(round(x, 6), round(y, 6)) for x, y in (a0, a1)} & {
        (round(x, 6), round(y, 6)) for x, y in (b0, b1)}
    return not ends


def check_tidy(spec: TreeSpec, layout, tol: float = 1e-6) -> None:
    rects = layout.rects()
    # No two boxes (or arrow labels) overlap (Reingold & Tilford 1981; Walker 1990).
    for i in range(len(rects)):
        for j in range(i + 1, len(rects)):
            assert not rects[i].overlaps(rects[j]), (rects[i], rects[j])
    down = layout.direction == "down"
    beside = {a.child for a in layout.arrows if a.beside}
    for parent, kids in spec.children.items():
        p = layout.boxes[parent].rect
        below = [k for k in kids if k not in beside]
        first, last = layout.boxes[below[0]].rect, layout.boxes[below[-1]].rect
        # A parent is centred over its first and last child (Reingold & Tilford 1981), or,
        # with an outcome box beside it, over its one child below.
        if down:
            assert p.cx == pytest.approx((first.cx + last.cx) / 2, abs=tol)
            assert all(layout.boxes[k].rect.y > p.bottom for k in below)
        else:
            assert p.cy == pytest.approx((first.cy + last.cy) / 2, abs=tol)
            assert all(layout.boxes[k].rect.x > p.right for k in below)
        # Siblings start level with each other, in YES-then-NO order.
        starts = [layout.boxes[k].rect.y if down else layout.boxes[k].rect.x for k in below]
        assert max(starts) - min(starts) < tol
        if len(below) > 1:
            assert (first.cx < last.cx) if down else (first.cy < last.cy)
        # The documented variant: an outcome box beside its question, level with its top,
        # YES to the left and NO to the right, reached by one level arrow.
        for k, kid in enumerate(kids):
            if kid in beside:
                c = layout.boxes[kid].rect
                assert down and spec.boxes[kid].kind == "outcome" and len(below) == 1
                assert c.y == pytest.approx(p.y, abs=tol) and c.y < p.cy < c.bottom
                assert (c.right < p.x) if k == 0 else (c.x > p.right)
    for arrow in layout.arrows:
        p, c = layout.boxes[arrow.parent].rect, layout.boxes[arrow.child].rect
        (x0, y0), (x1, y1) = arrow.points[0], arrow.points[-1]
        if arrow.beside:  # from the parent's pointed end, level, into the child's side
            assert y0 == pytest.approx(p.cy) and y1 == pytest.approx(p.cy)
            assert x0 == pytest.approx(p.x if arrow.branch == 0 else p.right)
            assert x1 == pytest.approx(c.right if arrow.branch == 0 else c.x)
            assert (arrow.label.bottom < y0 or arrow.label.y > y0)  # above or below the line
            assert min(x0, x1) < arrow.label.cx < max(x0, x1)
        elif down:  # leaves the parent's bottom edge, enters the child's top edge
            assert y0 == pytest.approx(p.bottom) and p.x < x0 < p.right
            assert y1 == pytest.approx(c.y) and x1 == pytest.approx(c.cx)
            assert p.bottom < arrow.label.y and arrow.label.bottom < c.y
            # beside the drop, on its outer side: YES to the left, NO to the right
            assert (arrow.label.right < x1) if arrow.branch == 0 else (arrow.label.x > x1)
        else:
            assert x0 == pytest.approx(p.right) and p.y < y0 < p.bottom
            assert x1 == pytest.approx(c.x) and y1 == pytest.approx(c.cy)
            assert p.right < arrow.label.x and arrow.label.right < c.x
        # Every segment is horizontal or vertical.
        for (ax, ay), (bx, by) in zip(arrow.points, arrow.points[1:]):
            assert ax == pytest.approx(bx) or ay == pytest.approx(by)
    # No arrow runs through a box or another arrow's label (left to right, a label sits on
    # its own arrow), and arrows from different questions never cross or run together
    # (Reingold & Tilford 1981: a planar drawing).
    segments = _segments(layout)
    for arrow, a, b in segments:
        for rect in rects:
            if rect is not arrow.label:
                assert not _cuts_through(a, b, rect, tol), (arrow.parent, arrow.child, rect)
    for i, (arrow, a, b) in enumerate(segments):
        for other, c, d in segments[i + 1:]:
            if other.parent != arrow.parent:
                assert not _cross((a, b), (c, d), tol), (arrow.parent, other.parent)


STYLES = [  # every drawing the page planner tries (core/chart/arrange.py)
    {}, {"leaves_beside": True}, {"questions": "one line"}, {"questions": "wrapped"},
    {"outcome_widths": "own"}, {"leaves_beside": True, "questions": "one line",
                                "outcome_widths": "own", "outcome_em": 0.0},
]


def subtree(spec: TreeSpec, node: int) -> list[int]:
    out, stack = [], [node]
    while stack:
        n = stack.pop()
        out.append(n)
        stack.extend(reversed(spec.children.get(n, ())))
    return out


@pytest.mark.parametrize("direction", ["down", "right"])
@pytest.mark.parametrize("seed", range(40))
def test_random_trees_are_tidy(seed: int, direction: str) -> None:
    spec = random_tree(seed)
    style = replace(LayoutStyle(9.0, direction, 12 + seed % 6, 11 + seed % 4),
                    **STYLES[seed % len(STYLES)])
    layout = layout_tree(spec, style, fake_measure)
    check_tidy(spec, layout)
    assert set(layout.boxes) == set(spec.boxes)
    assert len(layout.arrows) == 2 * len(spec.children)


@pytest.mark.parametrize("style", STYLES)
@pytest.mark.parametrize("seed", range(15))
def test_every_drawing_the_planner_tries_is_tidy(seed: int, style: dict) -> None:
    """With the real font's widths: outcome boxes beside their question, questions widened
    over their children or on one line, outcome boxes of their own width."""
    spec = random_tree(seed)
    layout = layout_tree(spec, LayoutStyle(9.0, "down", **style), reportlab_measure)
    check_tidy(spec, layout)
    if style.get("leaves_beside"):
        assert any(a.beside for a in layout.arrows) or not beside_parent(spec)


@settings(max_examples=40, deadline=None)
@given(seed=st.integers(0, 10_000), size=st.floats(6, 20), direction=st.sampled_from(["down", "right"]),
       breadth=st.floats(1.0, 1.6), depth=st.floats(1.0, 2.0), style=st.sampled_from(STYLES))
def test_tidy_properties_survive_any_size_and_stretch(seed, size, direction, breadth, depth,
                                                      style) -> None:
    spec = random_tree(seed, max_leaves=10)
    layout = layout_tree(spec, LayoutStyle(size, direction, **style), fake_measure, breadth, depth)
    check_tidy(spec, layout)


@pytest.mark.parametrize("direction", ["down", "right"])
@pytest.mark.parametrize("seed", range(25))
def test_identical_subtrees_are_drawn_identically(seed: int, direction: str) -> None:
    """Reingold & Tilford (1981): a subtree is drawn the same wherever it occurs."""
    spec = random_tree(seed, max_leaves=12, duplicate=True)
    layout = layout_tree(spec, LayoutStyle(10.0, direction, **STYLES[seed % len(STYLES)]),
                         fake_measure)
    check_tidy(spec, layout)
    yes, no = spec.children[spec.root]
    a, b = subtree(spec, yes), subtree(spec, no)
    assert len(a) == len(b)
    ra, rb = layout.boxes[yes].rect, layout.boxes[no].rect
    for i, j in zip(a, b):
        bi, bj = layout.boxes[i], layout.boxes[j]
        assert spec.boxes[i].body == spec.boxes[j].body
        assert (bi.rect.x - ra.x, bi.rect.y - ra.y, bi.rect.w, bi.rect.h) == pytest.approx(
            (bj.rect.x - rb.x, bj.rect.y - rb.y, bj.rect.w, bj.rect.h), abs=1e-6)
        for li, lj in zip(bi.lines, bj.lines):
            assert li.text == lj.text
            assert (li.x - ra.x, li.baseline - ra.y) == pytest.approx(
                (lj.x - rb.x, lj.baseline - rb.y), abs=1e-6)


@pytest.mark.parametrize("seed", range(10))
def test_layout_is_proportional_to_the_text_size(seed: int) -> None:
    """The page planner relies on it: every length is a multiple of the text size."""
    spec = random_tree(seed)
    style = STYLES[seed % len(STYLES)]
    small = layout_tree(spec, replace(LayoutStyle(9.0, "down", 14, 12), **style), fake_measure)
    large = layout_tree(spec, replace(LayoutStyle(13.5, "down", 14, 12), **style), fake_measure)
    assert large.width == pytest.approx(small.width * 1.5, rel=1e-9)
    assert large.height == pytest.approx(small.height * 1.5, rel=1e-9)
    for k, box in small.boxes.items():
        assert large.boxes[k].rect.x == pytest.approx(box.rect.x * 1.5, abs=1e-6)
        assert [ln.text for ln in large.boxes[k].lines] == [ln.text for ln in box.lines]


@pytest.mark.parametrize("seed", range(10))
def test_every_line_lies_inside_its_box(seed: int) -> None:
    spec = random_tree(seed)
    for direction in ("down", "right"):
        layout = layout_tree(spec, LayoutStyle(9.0, direction, 12, 11), reportlab_measure)
        for box in layout.boxes.values():
            r = box.rect
            for line in box.lines:
                width = reportlab_measure(line.text, line.bold, line.size)
                left = line.x - width / 2 if line.centred else line.x
                inset = box.point * 0.5  # the pointed ends of a question box
                assert r.x + inset - 1e-6 <= left and left + width <= r.right - inset + 1e-6, line
                assert r.y < line.baseline - 0.7 * line.size and line.baseline < r.bottom
        for arrow in layout.arrows:
            for line in arrow.label_lines:
                width = reportlab_measure(line.text, line.bold, line.size)
                left = line.x - width / 2 if line.centred else line.x
                assert arrow.label.x - 1e-6 <= left and left + width <= arrow.label.right + 1e-6


def test_wrapping_keeps_every_word_and_balances_lines() -> None:
    text = "How the patient arrived: inter-hospital transfer or ambulance?"
    for width in (40, 80, 120, 400):
        lines = wrap(text, width, True, 9, reportlab_measure)
        assert " ".join(lines) == text
        assert all(reportlab_measure(t, True, 9) <= width or " " not in t for t in lines)
        balanced = balanced_wrap(text, width, True, 9, reportlab_measure)
        assert " ".join(balanced) == text and len(balanced) == len(lines)
        widths = [reportlab_measure(t, True, 9) for t in balanced]
        assert max(widths) <= max(reportlab_measure(t, True, 9) for t in lines) + 1e-9


def test_a_lone_outcome_box_lays_out() -> None:
    spec = TreeSpec(1, {}, {1: BoxSpec("outcome", "1", (Para("Everyone: no expected", True),),
                                       Para("AVERAGE RATE", True))}, {})
    layout = layout_tree(spec, LayoutStyle(9.0), fake_measure)
    assert layout.arrows == () and layout.boxes[1].rect.x == 0 and layout.width > 0


def test_layout_imports_no_drawing_and_no_qt() -> None:
    """The app's tree view reuses the layout: it must not pull in reportlab's drawing or Qt
    (with its own measurer it needs no reportlab at all)."""
    code = ("import sys\n"
            "from core.chart.layout import layout_tree, LayoutStyle, TreeSpec, BoxSpec, Para\n"
            "spec = TreeSpec(1, {}, {1: BoxSpec('outcome', '1', (Para('x'),))}, {})\n"
            "layout_tree(spec, LayoutStyle(9.0), lambda t, b, s: len(t) * s / 2)\n"
            "bad = [m for m in sys.modules if m.startswith(('reportlab', 'PySide6', 'PyQt'))]\n"
            "print(bad)\n")
    done = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True,
                          env={"PYTHONPATH": str(ROOT), "PATH": ""})
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == "[]"
