"""Where each box of the tree view goes (geometry only, no statistics).

A simple tidy layout: each subtree gets its own band of width, children are centred under
their parent, rows by depth. It stands in until the chart's shared layout
(core/chart/layout.py) is on main; then the view draws from that instead.
"""

from __future__ import annotations

from typing import Callable

from core.model import TreeModel

Box = tuple[float, float, float, float]  # x, y (top left), width, height


def simple_layout(model: TreeModel, size_of: Callable[[int], tuple[float, float]],
                  h_gap: float = 28.0, v_gap: float = 56.0) -> dict[int, Box]:
    """Top-down positions for every box; ``size_of(box)`` gives its width and height."""
    sizes = {n.id: size_of(n.id) for n in model.nodes}
    band: dict[int, float] = {}
    for node in reversed(model.nodes):  # children come after their parents
        own = sizes[node.id][0]
        if node.leaf:
            band[node.id] = own
        else:
            kids = sum(band[c] for c in node.children) + h_gap * (len(node.children) - 1)
            band[node.id] = max(own, kids)
    row_height: dict[int, float] = {}
    for node in model.nodes:
        row_height[node.depth] = max(row_height.get(node.depth, 0.0), sizes[node.id][1])
    row_top = {0: 0.0}
    for depth in range(1, max(row_height) + 1):
        row_top[depth] = row_top[depth - 1] + row_height[depth - 1] + v_gap
    boxes: dict[int, Box] = {}

    def place(box: int, left: float) -> float:
        """Place a subtree in [left, left + band]; returns the box's centre x."""
        node = model.node(box)
        width, height = sizes[box]
        if node.leaf:
            centre = left + band[box] / 2
        else:
            kids = sum(band[c] for c in node.children) + h_gap * (len(node.children) - 1)
            x = left + (band[box] - kids) / 2
            centres = []
            for child in node.children:
                centres.append(place(child, x))
                x += band[child] + h_gap
            centre = (centres[0] + centres[-1]) / 2
        boxes[box] = (centre - width / 2, row_top[node.depth], width, height)
        return centre

    place(1, 0.0)
    return boxes
