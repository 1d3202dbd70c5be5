"""How the app words what core computed, once for every step: the size rules, the
cross-validated error with the training error beside it, and core's messages with the
catalogue's advice."""

from __future__ import annotations

from html import escape

from core.messages import app_advice, app_wording

# How each size rule is said (the codes are core.sizing's).
SIZE_RULES = {"1se": "the smallest tree within one standard error (SE) of the lowest error",
              "min": "the lowest cross-validated error", "user": "your choice",
              "goal": "the smallest tree that meets the clinical goal"}


def errors_beside(chosen: dict, sentence: bool = False) -> str:
    """A size's cross-validated error ± SE with its training error beside it (from a model's
    ``chosen`` record): the one wording, so training error is never shown alone."""
    text = (f"cross-validated error {chosen['cv_risk']:.3f} ± {chosen['cv_se']:.3f} (one SE); "
            f"training error {chosen['train_risk']:.3f} beside it, which always looks better "
            "(it is measured on the patients the tree was grown on)")
    return text[0].upper() + text[1:] if sentence else text


def size_choice(path: dict, index: int) -> str:
    """One size of a pruning path as the size list offers it: its outcome boxes, its
    cross-validated error ± SE with the training error after it, and its mark."""
    leaves = path["leaves"][index]
    words = (f"{leaves} outcome box{'' if leaves == 1 else 'es'}: cross-validated error "
             f"{path['cv_risk'][index]:.3f} ± {path['cv_se'][index]:.3f}, training "
             f"{path['train_risk'][index]:.3f}")
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
