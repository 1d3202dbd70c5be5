"""The one-page decision chart: words (content), tidy layout, page plan, PDF.

Public entry points: :func:`render_chart`, :func:`write_chart`, :func:`plan_chart`,
:func:`sizes_that_fit`, :class:`ChartOptions`; the app's tree view uses
:func:`core.chart.layout.layout_tree` directly.
"""

from .fitting import ChartTooLarge, plan_chart, sizes_that_fit, smaller_trees, tree_fits
from .options import PAPER_SIZES, ChartOptions, default_min_text
from .pdf import render_chart, write_chart

__all__ = ["ChartOptions", "ChartTooLarge", "PAPER_SIZES", "default_min_text", "plan_chart",
           "render_chart", "sizes_that_fit", "smaller_trees", "tree_fits", "write_chart"]
