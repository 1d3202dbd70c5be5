"""The checking and report figures, each drawn into its own matplotlib Figure.

No pyplot and no GUI backend: the app puts a Figure on a canvas of its own, the report turns
it into a high-resolution PNG (:func:`figure_png`, no dates in the metadata, so reruns give the
same bytes). Colours are the Okabe & Ito (2008) colour-blind-safe set, and every distinction
is also carried by marker shape or line style, so grey-scale prints read the same.
"""

from __future__ import annotations

import io

import numpy as np
from matplotlib.figure import Figure

from ..chart.style import CURVE, OKABE_ITO
from ..checking.metrics import ClassificationMeasures, Measures
from ..checking.stability import Stability

BLUE, ORANGE, GREEN, VERMILION, SKY, PURPLE = (OKABE_ITO[name] for name in (
    "blue", "orange", "bluish green", "vermillion", "sky blue", "reddish purple"))
_CLASS_STYLES = [(BLUE, "o", "-"), (VERMILION, "s", "--"), (GREEN, "^", "-."),
                 (PURPLE, "D", ":"), (ORANGE, "v", (0, (5, 1, 1, 1)))]
WIDTH = 6.3  # inches: the text width of an A4 page with 2.2 cm margins


def _figure(height: float = 3.4, width: float = WIDTH) -> Figure:
    fig = Figure(figsize=(width, height), layout="constrained")
    fig.set_layout_engine("constrained")
    return fig


def _style(ax) -> None:
    ax.spines[["top", "right"]].set_visible(False)
    ax.tick_params(labelsize=8)
    ax.grid(True, color="#dddddd", linewidth=0.6)
    ax.set_axisbelow(True)


def pruning_curve_figure(path: dict, measure: str | None = None) -> Figure:
    """Cross-validated error ±1 SE beside training error over the pruning path, in the colours
    and markers of the app's curve (core.chart.style.CURVE).

    ``path`` is ``TreeModel.path`` (lists ``leaves``, ``train_risk``, ``cv_risk``, ``cv_se``,
    ``min_leaves``, ``one_se_leaves``, ``risk_measure``); the minimum and the 1-SE choice are
    marked, and the 1-SE limit is drawn as a dotted line.
    """
    leaves = np.asarray(path["leaves"], dtype=float)
    cv, se = np.asarray(path["cv_risk"]), np.asarray(path["cv_se"])
    train = np.asarray(path["train_risk"])
    fig = _figure(3.9)
    ax = fig.add_subplot()
    _style(ax)
    cross, training = CURVE["cross-validated"], CURVE["training"]
    ax.errorbar(leaves, cv, yerr=se, color=cross, marker="o", markersize=3.5, linewidth=1.2,
                elinewidth=0.8, capsize=2, label="cross-validated error ± 1 SE")
    ax.plot(leaves, train, color=training, linestyle="--", marker="s", markersize=2.5,
            linewidth=1.0, label="training error (same patients; optimistic)")
    k_min = int(np.flatnonzero(leaves == path["min_leaves"])[0])
    k_one = int(np.flatnonzero(leaves == path["one_se_leaves"])[0])
    ax.axhline(cv[k_min] + se[k_min], color=CURVE["limit"], linestyle=":", linewidth=0.8,
               label="minimum + 1 SE")
    ax.plot([leaves[k_min]], [cv[k_min]], linestyle="none", marker="v", markersize=9,
            markerfacecolor="white", markeredgecolor=cross, markeredgewidth=1.5,
            label=f"lowest error: {int(leaves[k_min])} boxes")
    ax.plot([leaves[k_one]], [cv[k_one]], linestyle="none", marker="D", markersize=8,
            markerfacecolor="white", markeredgecolor=cross, markeredgewidth=1.5,
            label=f"1-SE choice: {int(leaves[k_one])} boxes")
    if leaves.max() > 12:
        ax.set_xscale("log")
        ticks = [t for t in (1, 2, 3, 5, 10, 20, 50, 100, 200, 500, 1000) if t <= leaves.max()]
        ax.set_xticks(ticks, [str(t) for t in ticks])
    ax.set_xlabel("Size of the tree (number of outcome boxes)", fontsize=9)
    ax.set_ylabel((measure or path.get("risk_measure", "error")).capitalize(), fontsize=8)
    # Below the axes, so the legend never hides a point whatever the curve's shape.
    fig.legend(loc="outside lower center", ncols=3, fontsize=7.5, frameon=False)
    return fig


def roc_figure(measures: ClassificationMeasures, title: str | None = None) -> Figure:
    """ROC curve(s) of the leaf probabilities (one per class against the rest for several
    classes), with the area and its 95% interval in the legend."""
    fig = _figure(3.6, 3.9)
    ax = fig.add_subplot()
    _style(ax)
    ax.plot([0, 1], [0, 1], color="#999999", linewidth=0.8, linestyle=":", label="chance")
    for i, result in enumerate(measures.per_class):
        if result.roc is None:
            continue
        colour, marker, line = _CLASS_STYLES[i % len(_CLASS_STYLES)]
        name = "" if measures.positive is not None else f"{result.label}: "
        ax.plot(result.roc.fpr, result.roc.tpr, color=colour, linestyle=line, marker=marker,
                markersize=3.5, linewidth=1.3,
                label=f"{name}AUC {result.roc.text()}")
    ax.set_xlim(-0.02, 1.02)
    ax.set_ylim(-0.02, 1.02)
    ax.set_aspect("equal")
    ax.set_xlabel("1 − specificity", fontsize=9)
    ax.set_ylabel("Sensitivity", fontsize=9)
    if title:
        ax.set_title(title, fontsize=9)
    ax.legend(fontsize=7.5, frameon=False, loc="lower right")
    return fig


# How to read the decision curve, worded once for the report and the app.
DECISION_CURVE_READING = (
    "Net benefit counts, per patient, those with the outcome whom the tree treats (sends for "
    "the test, admits) less those without it whom it treats needlessly, weighted by the odds of "
    "the threshold probability: the chance of the outcome at which a clinician would treat. "
    "Read it at the "
    "threshold you would use: the tree is worth using where its curve lies above both "
    "'treat all' and 'treat none' (Vickers & Elkin 2006).")


def decision_curve_figure(points, title: str | None = None) -> Figure:
    """Net benefit of the tree, of treating all and of treating none at threshold
    probabilities 1%–50% (decision curve analysis, Vickers & Elkin 2006), in the curve
    palette (core.chart.style.CURVE). ``points`` are NetBenefitPoint records or their dicts."""
    def get(p, name):
        return p[name] if isinstance(p, dict) else getattr(p, name)

    pt = np.array([get(p, "threshold") for p in points], dtype=float)
    tree = np.array([get(p, "tree") for p in points], dtype=float)
    everyone = np.array([get(p, "treat_all") for p in points], dtype=float)
    fig = _figure(3.4, 4.6)
    ax = fig.add_subplot()
    _style(ax)
    ax.plot(pt * 100, tree, color=CURVE["cross-validated"], marker="o", markersize=2.5,
            linewidth=1.4, label="the tree")
    ax.plot(pt * 100, everyone, color=CURVE["training"], linestyle="--", linewidth=1.1,
            label="treat all")
    ax.axhline(0, color=CURVE["limit"], linestyle=":", linewidth=1.0, label="treat none")
    if len(tree):
        top = max(float(tree.max()), float(everyone.max()), 0.0)
        ax.set_ylim(-max(0.05, 0.15 * top), top * 1.1 + 0.01)
    ax.set_xlim(0, 51)
    ax.set_xlabel("Threshold probability (%)", fontsize=9)
    ax.set_ylabel("Net benefit", fontsize=9)
    if title:
        ax.set_title(title, fontsize=9)
    ax.legend(fontsize=7.5, frameon=False, loc="upper right")
    return fig


def calibration_figure(measures: Measures, title: str | None = None) -> Figure:
    """Per outcome box: the derivation rate (or mean) against the new patients' observed rate
    (or mean) with its 95% interval. Filled markers: the derivation value lies inside the
    interval; open markers: outside. Box numbers label the points."""
    rows = [r for r in measures.calibration if r.observed is not None]
    percent = isinstance(measures, ClassificationMeasures)
    fig = _figure(3.6, 4.2)
    ax = fig.add_subplot()
    _style(ax)
    if rows:
        x = np.array([r.derivation_value for r in rows])
        y = np.array([r.observed for r in rows])
        low = np.array([r.low if r.low is not None else r.observed for r in rows])
        high = np.array([r.high if r.high is not None else r.observed for r in rows])
        labels = sorted({r.label for r in rows})
        for i, label in enumerate(labels):
            colour, marker, _ = _CLASS_STYLES[i % len(_CLASS_STYLES)]
            for inside in (True, False):
                pick = np.array([r.label == label and (r.agrees is not False) == inside
                                 for r in rows])
                if not pick.any():
                    continue
                name = (f"{label}: " if len(labels) > 1 else "") + (
                    "derivation value inside the interval" if inside else "outside the interval")
                ax.errorbar(x[pick], y[pick], yerr=[y[pick] - low[pick], high[pick] - y[pick]],
                            linestyle="none", marker=marker, markersize=6, color=colour,
                            markerfacecolor=colour if inside else "white", capsize=2,
                            elinewidth=0.9, label=name)
        for r, xi, yi in zip(rows, x, y):
            ax.annotate(str(r.box), (xi, yi), xytext=(5, 3), textcoords="offset points",
                        fontsize=7.5, color="#222222")
        top = max(high.max(), x.max())
        bottom = min(low.min(), x.min())
    else:
        top, bottom = 1.0, 0.0
    if percent:
        top, bottom = max(top, 0.05), 0.0
    span = top - bottom or 1.0
    lo, hi = bottom - 0.05 * span, top + 0.08 * span
    ax.plot([lo, hi], [lo, hi], color="#999999", linewidth=0.8, linestyle=":",
            label="perfect agreement")
    ax.set_xlim(lo, hi)
    ax.set_ylim(lo, hi)
    ax.set_aspect("equal")
    what = "rate" if percent else "mean"
    subject = f" of {rows[0].label}" if rows and percent and len({r.label for r in rows}) == 1 else ""
    ax.set_xlabel(f"Derivation {what}{subject} in the box", fontsize=9)
    ax.set_ylabel(f"Observed {what} in the new patients (95% interval)", fontsize=8)
    if percent:
        ax.xaxis.set_major_formatter(lambda v, _: f"{v:.0%}")
        ax.yaxis.set_major_formatter(lambda v, _: f"{v:.0%}")
    if title:
        ax.set_title(title, fontsize=9)
    # Below the axes, never inside them: a box far off the diagonal (the one that matters)
    # can sit in any corner, and a key drawn over it would hide its interval.
    many = rows and len({r.label for r in rows}) > 1
    fig.legend(loc="outside lower center", ncols=2, fontsize=6.5 if many else 7, frameon=False)
    return fig


def stability_figure(stability: Stability, top: int = 10) -> Figure:
    """Share of bootstrap resamples in which each predictor is the first question (solid bar)
    and asked anywhere (hatched bar); the most often asked ``top`` predictors."""
    uses = [u for u in stability.predictors if u.anywhere][:top]
    fig = _figure(0.95 + 0.32 * max(len(uses), 1))  # room for the key above the bars
    ax = fig.add_subplot()
    _style(ax)
    ax.grid(True, axis="x", color="#dddddd", linewidth=0.6)
    ax.grid(False, axis="y")
    n = stability.resamples
    ypos = np.arange(len(uses))[::-1]
    ax.barh(ypos + 0.18, [u.anywhere / n for u in uses], height=0.36, color=SKY,
            edgecolor="#1a4f6e", hatch="///", label="asked anywhere in the tree")
    ax.barh(ypos - 0.18, [u.first / n for u in uses], height=0.36, color=BLUE,
            edgecolor="#0a2a44", label="first question")
    ax.set_yticks(ypos, [u.label for u in uses], fontsize=8)
    ax.set_xlim(0, 1)
    ax.xaxis.set_major_formatter(lambda v, _: f"{v:.0%}")
    ax.set_xlabel(f"Share of {n} bootstrap resamples", fontsize=9)
    # Above the axes, never over a bar (a question asked in every resample fills the row).
    fig.legend(*ax.get_legend_handles_labels(), loc="outside upper center", ncols=2,
               fontsize=7.5, frameon=False)
    return fig


def figure_png(fig: Figure, dpi: int = 220) -> bytes:
    """The figure as PNG bytes, without any date or software stamp (reproducible)."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    FigureCanvasAgg(fig)
    buffer = io.BytesIO()
    fig.savefig(buffer, format="png", dpi=dpi, metadata={"Software": None})
    return buffer.getvalue()
