"""The one-page decision chart: words (content), tidy layout, page plan, PDF.

Public entry points: :func:`render_chart`, :func:`write_chart`, :func:`plan_chart`,
:func:`sizes_that_fit`, :class:`ChartOptions`; the app's tree view uses
:func:`core.chart.layout.layout_tree` directly. Names are imported on first use, so that
``import core.chart.layout`` loads neither reportlab's drawing nor anything else.
"""

from __future__ import annotations

import importlib

_WHERE = {
    "ChartOptions": "options", "PAPER_SIZES": "options", "default_min_text": "options",
    "ChartTooLarge": "fitting", "plan_chart": "fitting", "sizes_that_fit": "fitting",
    "smaller_trees": "fitting", "tree_fits": "fitting",
    "render_chart": "pdf", "write_chart": "pdf",
}

__all__ = sorted(_WHERE)


def __getattr__(name: str):
    if name in _WHERE:
        return getattr(importlib.import_module(f".{_WHERE[name]}", __name__), name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
