"""Tidy layout of a decision tree: box sizes from wrapped text, positions without overlaps.

Shared by the PDF chart and the app's tree view, so it draws nothing and imports neither
reportlab's drawing nor Qt: it takes a text-measuring function ``measure(text, bold, size)``
(the default uses reportlab's font metrics for the embedded DejaVu fonts; the app can pass
its own). Coordinates are points, origin top-left, y downwards.

Placement along the breadth axis (x when the tree grows down, y when it grows right) follows
the tidy drawing of Reingold & Tilford (1981) and Walker (1990), in its non-layered form for
boxes of any size (van der Ploeg 2014): each subtree is laid out on its own, siblings are
pushed together until their outlines are one gap apart, a parent is centred over its first
and last child, and children start one connector length past their parent. A subtree's
drawing depends only on the subtree, so identical subtrees are drawn identically.

Prunella's variants, each a style the page planner may choose (core/chart/arrange.py): an
outcome box may stand beside its question when the question's other answer asks on, the
question then centred over that other child, straight above it, with one short drop and no
bus; and a question over children spread wide may take their width (fewer lines), which is
worked out from its own subtree, so identical subtrees still come out identical.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Mapping

from .boxes import (
    QUESTION_STRETCH, WIDEST_QUESTION_EM, BoxSpec, LayoutStyle, Para, SizedBox, TreeSpec,
    question_frame, size_boxes, size_label,
)
from .text import Line, Measure, Rect, balanced_wrap, reportlab_measure, wrap

__all__ = ["BoxSpec", "LayoutStyle", "Line", "Measure", "Para", "PlacedArrow", "PlacedBox",
           "Rect", "TreeLayout", "TreeSpec", "balanced_wrap", "layout_tree", "reportlab_measure",
           "wrap"]


@dataclass(frozen=True)
class PlacedBox:
    id: int
    kind: str
    rect: Rect
    lines: tuple[Line, ...]  # text, including the badge number (first) and the band word
    badge: tuple[float, float, float]  # centre x, centre y, radius of the number's circle
    strip: float  # height of the outcome box's band strip (0 for questions)
    point: float  # depth of a question box's pointed ends (hexagon), 0 for outcomes

    def moved(self, dx: float, dy: float) -> "PlacedBox":
        bx, by, r = self.badge
        return PlacedBox(self.id, self.kind, self.rect.moved(dx, dy),
                         tuple(ln.moved(dx, dy) for ln in self.lines), (bx + dx, by + dy, r),
                         self.strip, self.point)


@dataclass(frozen=True)
class PlacedArrow:
    parent: int
    child: int
    branch: int  # 0 = YES, 1 = NO
    points: tuple[tuple[float, float], ...]  # polyline, the last point touches the child
    label: Rect
    label_lines: tuple[Line, ...]

    @property
    def beside(self) -> bool:
        """The child is drawn level with its parent, beside it (one level arrow)."""
        return len(self.points) == 2 and self.points[0][1] == self.points[1][1]

    def moved(self, dx: float, dy: float) -> "PlacedArrow":
        return PlacedArrow(self.parent, self.child, self.branch,
                           tuple((x + dx, y + dy) for x, y in self.points),
                           self.label.moved(dx, dy),
                           tuple(ln.moved(dx, dy) for ln in self.label_lines))


@dataclass(frozen=True)
class TreeLayout:
    boxes: Mapping[int, PlacedBox]
    arrows: tuple[PlacedArrow, ...]
    width: float
    height: float
    style: LayoutStyle
    breadth_stretch: float = 1.0
    depth_stretch: float = 1.0

    @property
    def direction(self) -> str:
        return self.style.direction

    @property
    def size(self) -> float:
        return self.style.size

    def moved(self, dx: float, dy: float) -> "TreeLayout":
        return replace(self, boxes={k: b.moved(dx, dy) for k, b in self.boxes.items()},
                       arrows=tuple(a.moved(dx, dy) for a in self.arrows))

    def rects(self) -> list[Rect]:
        """Every box and every arrow label: nothing of these may overlap."""
        return [b.rect for b in self.boxes.values()] + [a.label for a in self.arrows]


# --- tidy placement ----------------------------------------------------------------------

# A profile is one side of a subtree's outline: (start, end, edge) pieces along the depth
# axis, sorted and disjoint, where ``edge`` is the outermost breadth coordinate there.
Profile = list[tuple[float, float, float]]


def _combine(a: Profile, b: Profile, outer) -> Profile:
    """The outline of two profiles together: ``outer`` (min or max) wherever both are; a
    sweep over both sorted piece lists."""
    if not a or not b:
        return list(a or b)
    if a[-1][1] <= b[0][0] or b[-1][1] <= a[0][0]:  # one wholly before the other
        first, second = (a, b) if a[-1][1] <= b[0][0] else (b, a)
        out = list(first)
        if out[-1][1] == second[0][0] and out[-1][2] == second[0][2]:
            out[-1] = (out[-1][0], second[0][1], out[-1][2])
            return out + second[1:]
        return out + second
    smaller = outer is min
    cuts = sorted({t for piece in a for t in piece[:2]} | {t for piece in b for t in piece[:2]})
    out: Profile = []
    i = j = 0
    na, nb = len(a), len(b)
    for t0, t1 in zip(cuts, cuts[1:]):
        while i < na and a[i][1] <= t0:
            i += 1
        while j < nb and b[j][1] <= t0:
            j += 1
        in_a = i < na and a[i][0] <= t0
        in_b = j < nb and b[j][0] <= t0
        if in_a and in_b:
            ea, eb = a[i][2], b[j][2]
            edge = (ea if ea < eb else eb) if smaller else (ea if ea > eb else eb)
        elif in_a:
            edge = a[i][2]
        elif in_b:
            edge = b[j][2]
        else:
            continue
        if out and out[-1][1] == t0 and out[-1][2] == edge:
            out[-1] = (out[-1][0], t1, edge)
        else:
            out.append((t0, t1, edge))
    return out


def _shifted(profile: Profile, along: float, across: float) -> Profile:
    return [(lo + along, hi + along, e + across) for lo, hi, e in profile]


def _separation(right: Profile, left: Profile, gap: float) -> float:
    """How far the subtree with ``left`` outline must move across to keep ``gap`` from
    everything on the ``right`` outline wherever their depth ranges meet."""
    need = -float("inf")
    i = j = 0
    while i < len(right) and j < len(left):
        lo, hi, edge = right[i]
        lo2, hi2, edge2 = left[j]
        if lo < hi2 and lo2 < hi:
            need = max(need, edge - edge2 + gap)
        if hi <= hi2:
            i += 1
        else:
            j += 1
    return need


def _tidy(spec: TreeSpec, across: Mapping[int, float], along: Mapping[int, float],
          connector: float, gap: float, margin: float,
          beside: Mapping[int, tuple[float, float, float]] | None = None,
          straight: float | None = None) -> tuple[dict[int, float], dict[int, float]]:
    """Breadth centre and depth start of every box, relative to the root.

    Non-layered tidy drawing (van der Ploeg 2014, after Reingold & Tilford 1981 and Walker
    1990): children start one connector length beyond their parent's far side, so a long box
    only pushes aside what lies beside it; outlines are compared along the depth axis.

    ``beside`` names outcome boxes drawn level with their parent, to its side (YES to the
    left, NO to the right), each with (the least length of its side arrow, and the depth
    range its arrow label takes, from the parent's start); the parent is then centred over
    its other child alone, whose subtree may run on below the outcome box, ``straight`` (the
    connector of one straight arrow, no bus) below it."""
    beside = beside or {}

    def place(node: int):
        half, size = across[node] / 2, along[node]
        own_left: Profile = [(-margin, size + margin, -half)]
        own_right: Profile = [(-margin, size + margin, half)]
        kids = spec.children.get(node, ())
        if not kids:
            return {node: 0.0}, {node: 0.0}, own_left, own_right
        below = [k for k in kids if k not in beside]
        start = size + (connector if len(below) > 1 or straight is None else straight)
        centres: dict[int, float] = {}
        depths: dict[int, float] = {}
        left: Profile = []
        right: Profile = []
        offsets = []
        for child in below:
            c, d, cl, cr = place(child)
            shift = _separation(right, _shifted(cl, start, 0.0), gap) if right else 0.0
            offsets.append(shift)
            centres.update({k: v + shift for k, v in c.items()})
            depths.update({k: v + start for k, v in d.items()})
            left = _combine(left, _shifted(cl, start, shift), min)
            right = _combine(right, _shifted(cr, start, shift), max)
        mid = (offsets[0] + offsets[-1]) / 2
        centres = {k: v - mid for k, v in centres.items()}
        centres[node], depths[node] = 0.0, 0.0
        # The arrows between the parent and its children below: nothing else may come into them.
        reach_lo = min(centres[k] - across[k] / 2 for k in below)
        reach_hi = max(centres[k] + across[k] / 2 for k in below)
        zone = (size, start)
        left = _combine(_combine(own_left, [(zone[0], zone[1], reach_lo)], min),
                        _shifted(left, 0.0, -mid), min)
        right = _combine(_combine(own_right, [(zone[0], zone[1], reach_hi)], max),
                         _shifted(right, 0.0, -mid), max)
        for k in kids:
            if k not in beside:
                continue
            arrow, label_lo, label_hi = beside[k]
            depth_range = (min(-margin, label_lo), along[k] + margin)
            width = across[k]
            if k == kids[0]:  # YES: to the left, clear of everything on that side
                clear = -_separation([(*depth_range, 0.0)], left, gap)
                inner = min(-half - arrow, clear)
                centres[k] = inner - width / 2
                left = _combine(_combine(left, [(label_lo, label_hi, inner)], min),
                                [(*depth_range, inner - width)], min)
            else:  # NO: to the right
                clear = _separation(right, [(*depth_range, 0.0)], gap)
                inner = max(half + arrow, clear)
                centres[k] = inner + width / 2
                right = _combine(_combine(right, [(label_lo, label_hi, inner)], max),
                                 [(*depth_range, inner + width)], max)
            depths[k] = 0.0
        return centres, depths, left, right

    centres, depths, _, _ = place(spec.root)
    return centres, depths


def beside_parent(spec: TreeSpec) -> set[int]:
    """Outcome boxes that may be drawn beside their parent: the one outcome box of a question
    whose other answer leads to a further question."""
    boxes = set()
    for kids in spec.children.values():
        leaves = [k for k in kids if k not in spec.children]
        if len(leaves) == 1 and len(kids) == 2:
            boxes.add(leaves[0])
    return boxes


def layout_tree(spec: TreeSpec, style: LayoutStyle, measure: Measure = reportlab_measure,
                breadth_stretch: float = 1.0, depth_stretch: float = 1.0) -> TreeLayout:
    """Lay out ``spec``: every box sized to its wrapped text, positions tidy, origin (0, 0).

    ``breadth_stretch`` ≥ 1 spreads the box centres along the breadth axis and
    ``depth_stretch`` ≥ 1 lengthens the arrows between a box and its children, to use spare
    page space without changing any of the tidy properties."""
    if style.direction not in ("down", "right"):
        raise ValueError("direction must be 'down' or 'right'")
    s, down = style.size, style.direction == "down"
    labels = {key: size_label(paras, s, measure, down and not style.stacked_labels)
              for key, paras in spec.labels.items()}
    parent_of = {c: p for p, kids in spec.children.items() for c in kids}
    stem, arrow, label_pad = 0.6 * s, 0.9 * s, 0.2 * s
    side = beside_parent(spec) if style.leaves_beside and down else set()
    label_depth = max(((lh if down else lw) for key, (lw, lh, _) in labels.items()
                       if key[1] not in side), default=0.0)
    # Top-down, a label stands beside the arrow's drop, between the bus and the child, so the
    # drop is as long as the label is high; left to right it lies along the last stretch.
    if down:
        connector = (stem + label_depth + 2 * label_pad) * depth_stretch
    else:
        connector = (stem + label_depth + 2 * label_pad + arrow) * depth_stretch
    # A question whose one child below is straight under it (its outcome box beside it)
    # needs no bus: the drop is as long as its label is high.
    straight = (label_depth + 2 * label_pad) * depth_stretch if down else None

    def tidy(sized: Mapping[int, SizedBox]):
        across, along = {}, {}
        for i, box in sized.items():
            own = box.w if down else box.h
            if i in parent_of and i not in side:  # the label lies in its breadth, just before it
                lw, lh, _ = labels[(parent_of[i], i)]
                # top-down, beside the arrow's drop: on the outer side of the child's centre
                own = max(own, 2 * (lw + label_pad) if down else lh)
            across[i], along[i] = own, (box.h if down else box.w)
        # A box beside its parent: its arrow runs level from the parent's point, its label
        # along the arrow, so the arrow is at least as long as the label.
        placed_beside = {}
        for i in side:
            lw, lh, _ = labels[(parent_of[i], i)]
            level = along[parent_of[i]] / 2
            # above the arrow, or below it when a short question leaves no room above: it
            # stays level with the question, clear of the label of the arrow into it
            top = level - label_pad - lh if level - label_pad - lh >= 0 else level + label_pad
            placed_beside[i] = (lw + 2 * label_pad + arrow, top, top + lh)
        centres, depths = _tidy(spec, across, along, connector, 1.0 * s, 0.4 * s, placed_beside,
                                straight)
        return across, centres, depths

    sized = size_boxes(spec, style, measure)
    across, centres, depths = tidy(sized)
    if down and style.questions != "wrapped":
        # A question above children spread wide may take their width and so fewer lines: the
        # tree grows less deep, and no wider. The widths follow from each subtree alone, so
        # identical subtrees stay identical.
        wider = {}
        for parent, kids in spec.children.items():
            below = [k for k in kids if k not in side]
            if len(below) < len(kids) or not below:
                continue  # an outcome box beside it would be pushed out
            room = 2 * min(centres[parent] - min(centres[k] - across[k] / 2 for k in below),
                           max(centres[k] + across[k] / 2 for k in below) - centres[parent])
            em = (room - question_frame(spec.boxes[parent], s, measure)) / s
            if em > style.question_em * QUESTION_STRETCH:
                wider[parent] = min(em, WIDEST_QUESTION_EM)
        if wider:
            sized = size_boxes(spec, style, measure, wider)
            across, centres, depths = tidy(sized)
    centres = {k: v * breadth_stretch for k, v in centres.items()}

    rects: dict[int, Rect] = {}
    for i, box in sized.items():
        if down:
            rects[i] = Rect(centres[i] - box.w / 2, depths[i], box.w, box.h)
        else:
            rects[i] = Rect(depths[i], centres[i] - box.h / 2, box.w, box.h)

    routes = []  # (parent, child, branch, points, label rect)
    for parent, kids in spec.children.items():
        pb = rects[parent]
        bus = (pb.bottom if down else pb.right) + stem
        for k, child in enumerate(kids):
            cb = rects[child]
            lw, lh, _ = labels[(parent, child)]
            if child in side:  # level with the parent, from its pointed end
                y = pb.cy
                start, end = (pb.x, cb.right) if k == 0 else (pb.right, cb.x)
                points = ((start, y), (end, y))
                head = arrow if end > start else -arrow  # the label keeps clear of the head
                lx = (start + end - head) / 2 - lw / 2
                ly = y - label_pad - lh if y - label_pad - lh >= pb.y else y + label_pad
            elif down and any(kid in side for kid in kids):  # one straight drop
                points = ((pb.cx, pb.bottom), (cb.cx, cb.y))
                lx = cb.cx - label_pad - lw if k == 0 else cb.cx + label_pad
                ly = (pb.bottom + cb.y) / 2 - lh / 2
            elif down:
                points = ((pb.cx, pb.bottom), (pb.cx, bus), (cb.cx, bus), (cb.cx, cb.y))
                # YES to the left of its drop, NO to the right: outward, away from the stem
                lx = cb.cx - label_pad - lw if k == 0 else cb.cx + label_pad
                ly = (bus + cb.y) / 2 - lh / 2
            else:
                points = ((pb.right, pb.cy), (bus, pb.cy), (bus, cb.cy), (cb.x, cb.cy))
                zone = (bus + cb.x - arrow) / 2
                lx, ly = zone - lw / 2, cb.cy - lh / 2
            routes.append((parent, child, k, points, Rect(lx, ly, lw, lh)))

    # Everything moved once, so that the drawing starts at (0, 0).
    every = list(rects.values()) + [route[4] for route in routes]
    x0, y0 = min(r.x for r in every), min(r.y for r in every)
    boxes: dict[int, PlacedBox] = {}
    for i, box in sized.items():
        r = rects[i].moved(-x0, -y0)
        boxes[i] = PlacedBox(i, box.kind, r, tuple(ln.moved(r.x, r.y) for ln in box.lines),
                             (box.badge[0] + r.x, box.badge[1] + r.y, box.badge[2]),
                             box.strip, box.point)
    arrows = []
    for parent, child, k, points, label in routes:
        label = label.moved(-x0, -y0)
        arrows.append(PlacedArrow(parent, child, k, tuple((x - x0, y - y0) for x, y in points),
                                  label, tuple(ln.moved(label.x, label.y)
                                               for ln in labels[(parent, child)][2])))
    return TreeLayout(boxes, tuple(arrows), max(r.right for r in every) - x0,
                      max(r.bottom for r in every) - y0, style, breadth_stretch, depth_stretch)
