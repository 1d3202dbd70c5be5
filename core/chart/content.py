"""What the chart says, in words: box texts, arrow labels, header, side panel and footer.

Everything here is plain text built from the model; the layout and the PDF only place it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .. import __version__
from ..cautions import CAUTION_TITLE, CAUTIONS, UNCHECKED_BANNER, UNCHECKED_DETAIL
from ..checking.intervals import as_percent
from ..checking.new_patients import record_summary
from ..messages.message import say
from ..precision import summary_number
from ..model.tree import ANSWERS, MEASURE_FIRST, Node, TreeModel, answer_verb
from ..phrases import in_sentence, plural, shared_patients, rows_and_patients, rows_count, short_fingerprint
from .bands import Band, Banding, banding, number, percent, rate_phrase
from .layout import BoxSpec, Para, TreeSpec
from .options import ChartOptions

HOW_TO_READ = ("How to read: start at box 1, answer each question and follow YES or NO to an "
               "outcome box.")
HOW_TO_READ_RULES = ("How to read: find the row whose answers all hold for the patient; its "
                     "outcome box is the tree's answer. Exactly one row fits each patient.")
NOT_RECORDED = "If not recorded"  # a question's own line: which answer a missing value takes


@dataclass(frozen=True)
class PanelItem:
    """A paragraph of the side panel; ``band`` draws its swatch, ``dashed`` a small-group one."""

    text: str
    bold: bool = False
    band: Band | None = None
    dashed: bool = False


@dataclass(frozen=True)
class PanelSection:
    title: str
    items: tuple[PanelItem, ...]
    kind: str = "plain"  # plain | key | caution | checked


@dataclass(frozen=True)
class ChartText:
    """All words of one chart."""

    title: str
    subtitle: str
    how_to_read: str
    banner: tuple[str, str] | None  # (headline, detail) when the tree was never checked
    tree: TreeSpec
    bands: dict[int, Band]  # outcome box → its band
    small: frozenset[int]  # outcome boxes resting on fewer patients than the threshold
    sections: tuple[PanelSection, ...]
    footer: tuple[str, ...]
    fingerprint: str  # the full model fingerprint (for the QR code)


def count_word(model: TreeModel) -> str:
    """Rows are visits; when patients came more than once, say visits, not patients."""
    return model.rows_word


def _count(n: int, model: TreeModel) -> str:
    """'1 patient', '412 visits': a count in the chart's word for a row."""
    return rows_count(n, model.rows_word)


def span(low: str, high: str) -> str:
    """An interval as clinicians print it: 77–83%, or '−2 to 3' when a sign would blur it."""
    return f"{low} to {high}" if low.startswith(("-", "−")) or high.startswith(("-", "−")) \
        else f"{low}–{high}"


def outcome_paras(model: TreeModel, node: Node, options: ChartOptions,
                  side: int = 0) -> tuple[Para, ...]:
    """What an outcome box says, in a few short lines: the expected outcome (or mean), the
    rate and how many it rests on ("74% of 241"), the 95% interval ("CI 68–79%"). The
    outcome itself is named once, in the title and the key, and the key says what the
    numbers are, so that a box stays narrow. Built here alone, so that what a box says
    changes in one place."""
    if model.task == "regression":
        low, high = model.mean_interval(node)
        places = model.outcome_decimals  # no more precise than the outcome was recorded
        paras = [Para(f"Mean {number(float(node.mean), model.outcome.unit, places)}", bold=True),
                 Para(f"CI {span(number(low, '', places), number(high, '', places))}",
                      keep=True)]
        if node.quartiles is not None:
            # The interval of the mean is not the range for one patient: the middle half of
            # the box's patients, with their count in the same short line.
            middle = span(number(node.quartiles[0], "", places),
                          number(node.quartiles[1], "", places))
            paras.append(Para(f"IQR {middle}", keep=True))
        if not options.hide_counts:
            paras.append(Para(_count(node.n, model), keep=True))
    else:
        share = model.box_share(node)
        rate = percent(share.value or 0.0)
        verb = answer_verb(node.counts, model.classes, node.prediction)
        answer = Para(f"{verb.capitalize()} {node.prediction}", bold=True)
        if _contradicts(model, node, side) and verb == "expect":
            # A box of the higher band that expects the negative answer (or the other way
            # round) reads as an error: its rate is said first, without an expectation.
            answer = Para(f"{rate} {model.positive}", bold=True)
        paras = [answer,
                 Para(f"Rate {rate}" if options.hide_counts else f"{rate} of {node.n:,}",
                      keep=True),
                 Para(f"CI {span(percent(share.low or 0.0)[:-1], percent(share.high or 1.0))}",
                      keep=True)]
    if node.n < options.small_cell:
        paras.append(Para("Small group", keep=True))
    return tuple(paras)


def _contradicts(model: TreeModel, node: Node, side: int) -> bool:
    """Whether a yes/no box's answer points the other way from its band (side +1: the
    highest band, -1: the lowest)."""
    if model.positive is None or len(model.classes) != 2 or side == 0:
        return False
    says_positive = str(node.prediction) == str(model.positive)
    return (side > 0 and not says_positive) or (side < 0 and says_positive)


def tree_spec(model: TreeModel, options: ChartOptions,
              bands: Banding) -> tuple[TreeSpec, dict[int, Band]]:
    """The boxes and arrows of ``model``."""
    children: dict[int, tuple[int, ...]] = {}
    boxes: dict[int, BoxSpec] = {}
    labels: dict[tuple[int, int], tuple[Para, ...]] = {}
    band_of: dict[int, Band] = {}
    stack = [model.root.id]
    while stack:
        node = model.node(stack.pop())
        if node.leaf:
            band = bands.band_of(model, node)
            band_of[node.id] = band
            side = 0 if bands.kind == "class" or len(bands.bands) < 2 else (
                1 if band is bands.bands[-1] else -1 if band is bands.bands[0] else 0)
            boxes[node.id] = BoxSpec("outcome", str(node.id),
                                     outcome_paras(model, node, options, side),
                                     heading=Para(band.word, bold=True))
            continue
        question = node.question
        body = [Para(node.text, bold=True, scale=1.1)]
        # Where a value that is not recorded goes, said in the question box itself, so that
        # the arrows carry one short word each.
        missing = [ANSWERS[k] for k in range(2) if question.takes_missing(k)]
        if missing:
            body.append(Para(f"{NOT_RECORDED}: {missing[0]}"))
        boxes[node.id] = BoxSpec("question", str(node.id), tuple(body))
        children[node.id] = node.children
        for k, child in enumerate(node.children):
            labels[(node.id, child)] = (Para(ANSWERS[k], bold=True),)
        stack.extend(reversed(node.children))
    return TreeSpec(model.root.id, children, boxes, labels), band_of


# --- header, panel, footer -----------------------------------------------------------


def default_title(model: TreeModel) -> str:
    return f"{model.outcome.display}: decision chart"


def default_subtitle(model: TreeModel) -> str:
    if model.task == "regression":
        unit = f" ({model.outcome.unit})" if model.outcome.unit else ""
        outcome = f"Outcome: {model.outcome.display}{unit}, mean per box"
    elif model.positive is not None:
        outcome = f"Outcome: {model.outcome.display} ({model.positive} or {model.classes[0]})"
    else:
        outcome = f"Outcome: {model.outcome.display} ({', '.join(model.classes)})"
    return f"{outcome}."  # who it was derived from: the panel's first section


def _cohort_size(model: TreeModel) -> str:
    return model.rows_counted


def _is_error_rate(model: TreeModel) -> bool:
    """Unit costs and observed priors: the misclassification cost is the error rate."""
    costs = model.extra.get("costs")
    if model.task != "classification" or not costs:
        return model.task == "classification"
    loss, priors = costs["loss"], costs["priors"]
    k = len(loss)
    unit = all(loss[i][j] == (0.0 if i == j else 1.0) for i in range(k) for j in range(k))
    counts = model.extra.get("cohort", {}).get("outcome_counts", {})
    total = sum(counts.values()) or 1
    observed = counts and all(abs(priors[i] - counts.get(c, 0) / total) < 1e-9
                              for i, c in enumerate(model.classes))
    return unit and bool(observed)


def _risk(model: TreeModel, value: float) -> str:
    if model.task == "regression":  # in the unit squared, to the squares' precision
        return summary_number(value, model.outcome_decimals, power=2)
    return f"{100 * value:.1f}%" if _is_error_rate(model) else f"{value:.3f}"


def _rule(model: TreeModel) -> str:
    chosen = model.chosen
    rule = chosen.get("rule")
    boxes = plural(int(chosen["leaves"]), "outcome box", "outcome boxes")
    if rule == "1se":
        return f"Size: {boxes} (1-SE rule: the smallest tree within one SE of the lowest error)."
    if rule == "min":
        return f"Size: {boxes} (the lowest cross-validated error)."
    if rule == "goal" and isinstance(chosen.get("goal"), dict):
        # Which goal the tree was built for, and what cross-validation says it reached.
        goal, measure = chosen["goal"], chosen["goal"].get("measure")
        reached = chosen.get(f"cv_{measure}")
        low_high = chosen.get(f"cv_{measure}_interval") or (None, None)
        words = (f"Size: {boxes}, the smallest tree built to reach a {measure} of at least "
                 f"{as_percent(float(goal['at_least']))}")
        if isinstance(reached, (int, float)) and None not in low_high:
            words += (f" (cross-validated {as_percent(reached)}, 95% CI "
                      f"{as_percent(low_high[0], sign=False)}–{as_percent(low_high[1])})")
        return words + "."
    return f"Size: {boxes}, chosen by the user."


def _performance(model: TreeModel) -> PanelSection:
    chosen, path = model.chosen, model.path
    measure = model.error_measure  # "per visit" where the rows are visits
    if model.task == "regression":
        name = "mean squared error"
        unit = f" {model.outcome.unit}" if model.outcome.unit else ""
        root = math.sqrt(max(chosen['cv_risk'], 0))
        extra = f" (root {number(root, '', model.outcome_decimals)}{unit})"
        about = ""
    elif _is_error_rate(model):
        name, extra, about = "error rate", "", ""
    else:
        name, extra = "misclassification cost", ""
        about = f"; error = {measure}, with the costs set at derivation"
    items = (
        PanelItem(f"Cross-validated {name}: {_risk(model, chosen['cv_risk'])} "
                  f"(SE {_risk(model, chosen['cv_se'])}){extra}", bold=True),
        PanelItem(f"Training {name}: {_risk(model, chosen['train_risk'])} (optimistic: "
                  "same patients)"),
        PanelItem(f"{path.get('cv', 'Cross-validation').capitalize()}{about}."),
        PanelItem(_rule(model)),
    )
    if model.coarsening():
        items += (PanelItem(model.coarsening()),)
    return PanelSection("How well it predicts", items)


def _cohort(model: TreeModel, options: ChartOptions) -> PanelSection:
    cohort = model.extra.get("cohort", {})
    size = _cohort_size(model)
    if cohort.get("first_date"):
        label = cohort.get("date_column", "dates").lower()
        size += f"; {label} {cohort['first_date']} to {cohort['last_date']}"
    items = [PanelItem(size[0].upper() + size[1:] + ".")]
    sites = cohort.get("sites")
    if sites:
        items.append(PanelItem("Sites: " + ", ".join(f"{k} ({v:,})" for k, v in sites.items()) + "."))
    counts = cohort.get("outcome_counts")
    if counts:
        total = sum(counts.values()) or 1
        items.append(PanelItem(f"{model.outcome.display}: " + ", ".join(
            f"{c} {percent(k / total)}" for c, k in counts.items()) + "."))
    elif cohort.get("outcome_mean") is not None:
        items.append(PanelItem(f"Mean {in_sentence(model.outcome.display)}: "
                               f"{number(cohort['outcome_mean'], model.outcome.unit, model.outcome_decimals)}."))
    data = model.extra.get("data", {})
    if data.get("file") and options.show_file_name:
        items.append(PanelItem(f"Data file: {data['file']}."))
    return PanelSection("Derived from", tuple(items))


def _validation(model: TreeModel, options: ChartOptions, check: dict | None
                ) -> PanelSection | None:
    if not check:
        return None
    # Built from the numbers the check records, never from the words stored beside them.
    summary = record_summary(check, model) or check.get("summary")
    if not summary:
        summary = "; ".join(f"{k.replace('_', ' ')} {v:.3f}" for k, v in check.items()
                            if isinstance(v, float))
    source = check.get("source", "separate data")
    if check.get("file") and options.show_file_name:
        source = f"{source} ({check['file']})"
    checked = check.get("n")
    # Counted in the check's own word: its file may hold one row per patient where the
    # derivation file held visits, or the other way round.
    counted = rows_and_patients(checked, check.get("patients")) \
        if isinstance(checked, int) else f"? {count_word(model)}"
    items = (PanelItem(f"On {counted} from {source}:"),
             PanelItem(summary, bold=True))
    if check.get("separate") is False:  # some were derivation patients: not a separate check
        shared = check.get("overlap_patients", 0)
        items = items + (PanelItem(f"{shared_patients(shared)}: not a check on separate "
                                   "patients.", bold=True),)
        return PanelSection("Checked on patients who include derivation patients", items,
                            kind="checked")
    if check.get("overlap_known") is False:  # checked where the overlap cannot be told
        items = items + (PanelItem(say("check.overlap_not_known"), bold=True),)
        return PanelSection("Checked on other patients", items, kind="checked")
    return PanelSection("Checked on separate patients", items, kind="checked")


def _key(model: TreeModel, bands: Banding, options: ChartOptions) -> PanelSection:
    items = [PanelItem(f"{band.word}: {band.meaning}", band=band) for band in bands.bands]
    if options.small_cell > 0:
        items.append(PanelItem(f"Dashed: under {options.small_cell} {count_word(model)}, "
                               "uncertain", dashed=True))
    if model.task == "regression":
        what = (f"Mean: average {in_sentence(model.outcome.display)} in the box; CI: its 95% "
                "confidence interval (t), not the range for one patient")
        if any(n.quartiles is not None for n in model.leaves):
            what += (f"; IQR: where the middle half of the box's {count_word(model)} lay "
                     "(25th to 75th percentile).")
        else:
            what += "."
    else:
        who = rate_phrase(model) if model.positive is not None else "with the expected outcome"
        rows = count_word(model)
        share = (f"Rate: share {who} among the box's {rows}" if options.hide_counts
                 else f"“P% of N”: share {who} among the N {rows} in the box")
        what = f"{share}; CI: its 95% confidence interval (Wilson)."
        if any(answer_verb(n.counts, model.classes, n.prediction) == "treat as"
               for n in model.leaves):
            what += (" “Treat as”: the tree's answer under the costs or goal it was built "
                     f"for, although fewer than half of the box's {rows} had it.")
    if any(n.question is not None and n.question.kind != "missing" and n.question.routes_missing
           for n in model.nodes):
        missing = "(or not recorded)" if options.form == "rules" else NOT_RECORDED
        what += f" “{missing}”: where a missing value goes."
    items.append(PanelItem(what))
    return PanelSection("Key", tuple(items), kind="key")


def _how_to_read(model: TreeModel, options: ChartOptions) -> str:
    """How to read the chart (or, for a tree no better than no tree, that it is not); where a
    question has no branch for a missing value, that such a value is measured first (said
    once, here)."""
    how = HOW_TO_READ_RULES if options.form == "rules" else HOW_TO_READ
    # A tree no better than no tree says so in the place where the chart says how to use it.
    how = model.no_better_statement or how
    return f"{how} {MEASURE_FIRST}" if model.asks_unroutable() else how


def chart_text(model: TreeModel, options: ChartOptions) -> ChartText:
    """Every word of the chart for ``model`` (``options`` already checked)."""
    bands = banding(model, options.band_cuts, options.band_ratio)
    spec, band_of = tree_spec(model, options, bands)
    small = frozenset(i for i in band_of if model.node(i).n < options.small_cell)
    check = model.recorded_check  # only a check that names this tree by its fingerprint
    banner = None if check else (UNCHECKED_BANNER, UNCHECKED_DETAIL)
    sections = [_cohort(model, options), _performance(model)]
    checked = _validation(model, options, check)
    if checked:
        sections.append(checked)
    sections.append(_key(model, bands, options))
    sections.append(PanelSection(CAUTION_TITLE, tuple(PanelItem(c) for c in CAUTIONS),
                                 kind="caution"))
    data = model.extra.get("data", {})
    footer = (f"Model {model.short_fingerprint}  ·  Data {short_fingerprint(data.get('sha256', '')) or 'unknown'}"
              f"  ·  Printed {options.printed.isoformat()}  ·  Prunella {__version__}",
              "The model fingerprint (SHA-256 of the model's canonical JSON: keys sorted, no "
              "spaces; also in the QR code) names the exact tree on this chart.")
    return ChartText(title=options.title or default_title(model),
                     subtitle=options.subtitle if options.subtitle is not None
                     else default_subtitle(model),
                     how_to_read=_how_to_read(model, options),
                     banner=banner, tree=spec, bands=band_of,
                     small=small, sections=tuple(sections), footer=footer,
                     fingerprint=model.fingerprint)
