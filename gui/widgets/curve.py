"""The pruning curve: cross-validated error (±1 SE) and training error against tree size.

Drawn with matplotlib on the QtAgg backend. Every number plotted comes from core's pruning
path; the widget only draws it and turns a click into the nearest size on the path.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from matplotlib.backends.backend_qtagg import FigureCanvasQTAgg
from matplotlib.figure import Figure
from matplotlib.ticker import FuncFormatter, LogLocator, NullFormatter
from PySide6.QtCore import Signal
from PySide6.QtWidgets import QSizePolicy

from core.chart.style import CURVE
from core.phrases import plural
from core.sizing import one_se_limit


# The report's colours (core.chart.style.CURVE); every series also differs by marker/line.
CV_COLOUR, TRAIN_COLOUR, LIMIT_COLOUR, CHOSEN_COLOUR, FIT_SHADE = (CURVE[role] for role in (
    "cross-validated", "training", "limit", "chosen", "fits"))


@dataclass(frozen=True)
class CurveData:
    """The pruning path as the curve shows it (taken from a model's ``path``)."""

    leaves: np.ndarray
    cv_risk: np.ndarray
    cv_se: np.ndarray
    train_risk: np.ndarray
    min_leaves: int
    one_se_leaves: int
    risk_measure: str
    # Two classes: core's pooled CV sensitivity and specificity per size, with their Wilson
    # intervals (measures_by_size), and the goal the tree was built for, if any.
    measures: dict | None = None
    goal: dict | None = None

    @classmethod
    def from_path(cls, path: dict, measures: dict | None = None,
                  goal: dict | None = None, measure: str | None = None) -> "CurveData":
        return cls(np.asarray(path["leaves"]), np.asarray(path["cv_risk"]),
                   np.asarray(path["cv_se"]), np.asarray(path["train_risk"]),
                   int(path["min_leaves"]), int(path["one_se_leaves"]),
                   measure or str(path.get("risk_measure", "error")), measures, goal)


def _size_axis(ax, sizes: np.ndarray) -> None:
    """The tree-size axis both views share: log scale, ticks at 1, 2, 5, 10…, labelled."""
    ax.set_xscale("log")
    ax.xaxis.set_major_locator(LogLocator(base=10, subs=(1.0, 2.0, 5.0)))
    ax.xaxis.set_major_formatter(FuncFormatter(lambda v, _pos: f"{v:g}"))
    ax.xaxis.set_minor_formatter(NullFormatter())
    ax.set_xlim(0.8, max(2.0, float(sizes.max()) * 1.25))
    ax.set_xlabel("Size of the tree (number of outcome boxes)")


class CurveCanvas(FigureCanvasQTAgg):
    size_clicked = Signal(int)  # number of leaves nearest the click

    def __init__(self, parent=None) -> None:
        self.figure = Figure(figsize=(6, 4), layout="constrained")
        super().__init__(self.figure)
        self.setParent(parent)
        self.setSizePolicy(QSizePolicy.Expanding, QSizePolicy.Expanding)
        self.setMinimumSize(320, 210)  # room for step 3's view row on small screens
        self.setToolTip("Click a point to choose that size of tree.")
        self._data: CurveData | None = None
        self._chosen: int | None = None
        self._fits: tuple[int, ...] | None = None
        self._fit_label = ""
        self.view = "error"  # or "measures": CV sensitivity and specificity by size
        self.axes = self.figure.add_subplot(111)
        self.mpl_connect("button_press_event", self._clicked)
        self._draw_empty()

    def show_curve(self, data: CurveData | None, chosen: int | None,
                   fits: tuple[int, ...] | None = None, fit_label: str = "") -> None:
        self._data, self._chosen, self._fits, self._fit_label = data, chosen, fits, fit_label
        self._redraw()

    def set_view(self, view: str) -> None:
        """Show the error by size ("error") or the CV sensitivity and specificity ("measures",
        two-class outcomes only)."""
        self.view = view
        self._redraw()

    def set_chosen(self, chosen: int | None) -> None:
        self._chosen = chosen
        self._redraw()

    def legend_texts(self) -> list[str]:
        return [t.get_text() for legend in self.figure.legends for t in legend.get_texts()]

    def _draw_empty(self) -> None:
        for legend in self.figure.legends:
            legend.remove()
        ax = self.axes
        ax.clear()
        ax.set_axis_off()
        ax.text(0.5, 0.5, "The pruning curve appears here after Run.", ha="center",
                va="center", transform=ax.transAxes, color="#444444")
        self.draw_idle()

    def _redraw(self) -> None:
        data = self._data
        if data is None:
            self._draw_empty()
            return
        ax = self.axes
        ax.clear()
        ax.set_axis_on()
        x = data.leaves
        if self.view == "measures" and data.measures is not None:
            self._draw_measures(data)
            return
        if self._fits:
            # Shade runs of neighbouring sizes that fit the paper legibly.
            fits = set(self._fits)
            order = np.sort(x)
            first = True
            for value in order:
                if value in fits:
                    ax.axvspan(value * 0.93, value * 1.07, color=FIT_SHADE, alpha=0.18, lw=0,
                               label=self._fit_label if first else None)
                    first = False
        limit = one_se_limit(data.cv_risk, data.cv_se,
                             int(np.flatnonzero(data.leaves == data.min_leaves)[0]))
        ax.axhline(limit, color=LIMIT_COLOUR, lw=0.8, ls=":", label="Lowest error + 1 SE")
        ax.errorbar(x, data.cv_risk, yerr=data.cv_se, fmt="o-", color=CV_COLOUR, ms=4, lw=1.2,
                    capsize=2, elinewidth=0.8, label="Cross-validated error (±1 SE)")
        ax.plot(x, data.train_risk, "s--", color=TRAIN_COLOUR, ms=3, lw=1.0,
                label="Training error (patients it was grown on)")
        lowest = data.leaves == data.min_leaves
        ax.plot(x[lowest], data.cv_risk[lowest], "v", color=CV_COLOUR, ms=11, mfc="white",
                mew=1.6, label=f"Lowest error ({plural(data.min_leaves, 'outcome box', 'outcome boxes')})")
        one_se = data.leaves == data.one_se_leaves
        ax.plot(x[one_se], data.cv_risk[one_se], "D", color=CV_COLOUR, ms=10, mfc="white",
                mew=1.6, label=f"Smallest within 1 SE ({plural(data.one_se_leaves, 'box', 'boxes')})")
        if self._chosen is not None and (data.leaves == self._chosen).any():
            at = data.leaves == self._chosen
            ax.axvline(self._chosen, color=CHOSEN_COLOUR, lw=1.0, alpha=0.6)
            ax.plot(x[at], data.cv_risk[at], "o", ms=16, mfc="none", mec=CHOSEN_COLOUR, mew=2,
                    label=f"Chosen ({plural(self._chosen, 'box', 'boxes')})")
        _size_axis(ax, x)
        ax.set_ylabel(f"Error ({data.risk_measure})", wrap=True)
        ax.grid(True, which="major", color="#dddddd", lw=0.6)
        self._legend_below()

    def _legend_below(self) -> None:
        """The legend below the axes, outside them, so it never hides a point of the curve."""
        for old in self.figure.legends:
            old.remove()
        handles, labels = self.axes.get_legend_handles_labels()
        self.figure.legend(handles, labels, loc="outside lower center", ncols=2,
                           fontsize="small", frameon=False, markerscale=0.7)
        self.draw_idle()

    def _draw_measures(self, data: CurveData) -> None:
        """CV sensitivity and specificity by size with 95% Wilson intervals, the goal as a
        line and the chosen size marked."""
        ax, x, m = self.axes, data.leaves, data.measures
        series = (("cv_sensitivity", "Sensitivity: share with the outcome caught", "o-",
                   CV_COLOUR), ("cv_specificity", "Specificity: share without it spared",
                                "s--", TRAIN_COLOUR))
        for name, label, style, colour in series:
            value, interval = m[name] * 100, m[name + "_interval"] * 100
            ax.errorbar(x, value, yerr=[value - interval[:, 0], interval[:, 1] - value],
                        fmt=style, color=colour, ms=4, lw=1.1, capsize=2, elinewidth=0.8,
                        label=f"{label} (95% CI)")
        if data.goal:
            ax.axhline(data.goal["at_least"] * 100, color=LIMIT_COLOUR, lw=1.2, ls="-.",
                       label=f"Goal: {data.goal['measure']} at least "
                             f"{data.goal['at_least']:.0%}")
        if self._chosen is not None and (x == self._chosen).any():
            ax.axvline(self._chosen, color=CHOSEN_COLOUR, lw=1.6, alpha=0.8,
                       label=f"Chosen ({plural(self._chosen, 'box', 'boxes')})")
        _size_axis(ax, x)
        ax.set_ylim(-2, 102)
        ax.set_ylabel("Cross-validated share (%)")
        ax.grid(True, which="major", color="#dddddd", lw=0.6)
        self._legend_below()

    def _clicked(self, event) -> None:
        if self._data is None or event.inaxes is not self.axes or event.x is None:
            return
        points = self.axes.transData.transform(
            np.column_stack([self._data.leaves, self._data.cv_risk]))
        nearest = int(np.argmin(np.abs(points[:, 0] - event.x)))
        self.size_clicked.emit(int(self._data.leaves[nearest]))

    def position_of(self, leaves: int):
        """Where the point of a size is drawn, in widget coordinates (for tests and tips)."""
        from PySide6.QtCore import QPoint

        self.draw()
        at = self._data.leaves == leaves
        x, y = self.axes.transData.transform((leaves, float(self._data.cv_risk[at][0])))
        ratio = self.device_pixel_ratio or 1.0
        return QPoint(round(x / ratio), round(self.height() - y / ratio))
