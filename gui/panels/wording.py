"""How the app words what core computed, once for every step: the size rules, the
cross-validated error with the training error beside it, and core's messages with the
catalogue's advice."""

from __future__ import annotations

from html import escape

from core.messages import app_advice, app_wording
from core.model import error_text, path_rows, root_text

# How each size rule is said (the codes are core.sizing's).
SIZE_RULES = {"1se": "the smallest tree within one standard error (SE) of the lowest error",
              "min": "the lowest cross-validated error", "user": "your choice",
              "goal": "the smallest tree that meets the clinical goal"}


def errors_beside(model, sentence: bool = False) -> str:
    """The chosen size's cross-validated error ± SE (and, for a measured outcome, its root in
    the outcome's unit) with its training error after it, as core prints them
    (core/model/path_table.py): the one wording, so training error is never shown alone."""
    chosen = model.chosen

    def error(value: float) -> str:
        return error_text(model, value, class_decimals=3)

    root = (f" (root {root_text(model, chosen['cv_risk'])})" if model.task == "regression"
            else "")
    text = (f"cross-validated error {error(chosen['cv_risk'])} ± {error(chosen['cv_se'])} "
            f"(one SE){root}; training error {error(chosen['train_risk'])} beside it, which "
            "always looks better (it is measured on the patients the tree was grown on)")
    return text[0].upper() + text[1:] if sentence else text


def size_choice(model, index: int) -> str:
    """One size of the pruning path as the size list offers it: its outcome boxes, its
    cross-validated error ± SE (its root in the outcome's unit for a measured outcome) with
    the training error after it, and its mark."""
    path = model.path
    row = path_rows(model, class_decimals=3)[index]
    leaves = row.leaves
    unit = f" {model.outcome.unit}" if model.outcome.unit else ""
    root = f" (root {row.cv_root}{unit})" if row.cv_root is not None else ""
    words = (f"{leaves} outcome box{'' if leaves == 1 else 'es'}: cross-validated error "
             f"{row.cv} ± {row.se}{root}, training {row.train}")
    marks = [mark for mark, at in (("smallest within 1 SE", path["one_se_leaves"]),
                                   ("lowest error", path["min_leaves"])) if leaves == at]
    return words + ("".join(f" — {m}" for m in marks))


def with_advice(text: str) -> str:
    """A message from core as the app shows it, with the catalogue's "what to do" under it
    (core.messages.app_advice) when there is any."""
    advice = app_advice(text)
    shown = app_wording(text) or text
    return shown if advice is None else f"{shown}\n\nWhat to do: {advice}"


def warning_html(text: str) -> str:
    """A warning from core as a paragraph: ⚠, the message, and what to do (in italics)."""
    advice = app_advice(text)
    shown = escape(app_wording(text) or text)
    more = "" if advice is None else f"<br><i>What to do: {escape(advice)}</i>"
    return f"<p>⚠ {shown}{more}</p>"


def whose_check(session) -> tuple[str, bool]:
    """Which tree the chart is of and which tree its check was made on, in one sentence, and
    whether that is a warning (the check on screen belongs to an earlier tree). One
    fingerprint names the tree everywhere: checking a tree does not change it."""
    from core.messages import say
    from core.phrases import short_fingerprint

    model = session.model
    tree = model.short_fingerprint
    earlier = session.check_of_earlier_tree
    if earlier is not None:
        return say("app.check_of_earlier_tree", source=earlier.source_and_file,
                   earlier=short_fingerprint(earlier.model_fingerprint), tree=tree), True
    record = session.chart_derivation().model.recorded_check
    if record is None:
        return say("app.chart_of_unchecked_tree", tree=tree), False
    source = record.get("source", "separate patients")
    if record.get("file"):
        source = f"{source} ({record['file']})"
    return say("app.chart_of_checked_tree", tree=tree, source=source), False
