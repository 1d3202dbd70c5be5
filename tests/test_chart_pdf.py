"""The printed chart: one legible, searchable page that says exactly what the model says.

The demo cohort is invented; it is used only to exercise the chart, never as a reference.
"""

from __future__ import annotations

import dataclasses
import datetime as dt
import io
import re

import numpy as np
import pypdf
import pytest

import _chart_demo as demo
from core import __version__
from core.cautions import CAUTION_TITLE, CAUTIONS, UNCHECKED_BANNER
from core.chart import ChartOptions, plan_chart, render_chart
from core.chart.content import NOT_RECORDED
from core.chart.options import default_min_text
from core.chart.pdf import draw
from core.chart.style import contrast_ratio
from core.model.tree import column_values
from tests.helpers import DEMO_A4_LEAVES, demo_inputs

DATE = dt.date(2025, 3, 14)

# Page sizes in PostScript points: ISO 216 (A4 210 × 297 mm, A3 297 × 420 mm) and
# ANSI/ASME Y14.1 (US Letter 8.5 × 11 in, Tabloid 11 × 17 in); 1 in = 72 pt = 25.4 mm.
PAPER_POINTS = {"a4": (595.28, 841.89), "letter": (612.0, 792.0), "a3": (841.89, 1190.55),
                "tabloid": (792.0, 1224.0)}


def options(**changes) -> ChartOptions:
    return ChartOptions(**{"printed": DATE, **changes})


def fragments(pdf: bytes) -> list[tuple[str, float, float, float]]:
    """Every piece of text on the only page: (text, x, y from the top, font size)."""
    reader = pypdf.PdfReader(io.BytesIO(pdf))
    page = reader.pages[0]
    height = float(page.mediabox.height)
    out = []

    def visit(text, cm, tm, font, size):
        if text.strip():
            out.append((text.strip(), tm[4], height - tm[5], size))

    page.extract_text(visitor_text=visit)
    return out


def text_inside(rect, frags) -> str:
    return " ".join(t for t, x, y, _ in frags
                    if rect.x - 1 <= x <= rect.right + 1 and rect.y - 1 <= y <= rect.bottom + 1)


def flat(text: str) -> str:
    return " ".join(text.split())


def page_text(pdf: bytes) -> str:
    return flat(pypdf.PdfReader(io.BytesIO(pdf)).pages[0].extract_text())


@pytest.fixture(scope="module")
def chosen():
    """A demo tree that prints on every paper (A4 and Letter hold fewer boxes than A3)."""
    return demo.admitted_size(DEMO_A4_LEAVES).model


@pytest.fixture(scope="module")
def chosen_pdf(chosen):
    return render_chart(chosen, options())


# --- the page -----------------------------------------------------------------------------


@pytest.mark.parametrize("paper", ["a4", "letter", "a3", "tabloid"])
def test_one_page_of_the_standard_size(chosen, paper: str) -> None:
    pdf = render_chart(chosen, options(paper=paper))
    reader = pypdf.PdfReader(io.BytesIO(pdf))
    assert len(reader.pages) == 1
    box = reader.pages[0].mediabox
    size = sorted((float(box.width), float(box.height)))
    assert size == pytest.approx(sorted(PAPER_POINTS[paper]), abs=0.01)  # ISO 216 / ANSI Y14.1


@pytest.mark.parametrize("orientation", ["portrait", "landscape"])
def test_orientation_can_be_fixed(chosen, orientation: str) -> None:
    plan = plan_chart(chosen, options(paper="a3", orientation=orientation))
    assert plan.landscape == (orientation == "landscape")
    assert (plan.width > plan.height) == (orientation == "landscape")


def test_every_font_is_embedded_and_unicode(chosen_pdf) -> None:
    reader = pypdf.PdfReader(io.BytesIO(chosen_pdf))
    fonts = reader.pages[0]["/Resources"]["/Font"]
    assert fonts
    for ref in fonts.values():
        font = ref.get_object()
        assert "DejaVuSans" in str(font["/BaseFont"])
        descriptor = font.get("/FontDescriptor")
        if descriptor is None:
            descriptor = font["/DescendantFonts"][0].get_object()["/FontDescriptor"]
        descriptor = descriptor.get_object()
        assert any(k in descriptor for k in ("/FontFile2", "/FontFile", "/FontFile3"))


def test_special_characters_print_as_text(chosen) -> None:
    pdf = render_chart(chosen, options(title="SpO₂ ≤ 91% at 38.5 °C — Lévy’s pathway",
                                       subtitle="≥ 18 years"))
    text = page_text(pdf)
    assert "SpO₂ ≤ 91% at 38.5 °C — Lévy’s pathway" in text and "≥ 18 years" in text


def test_same_model_same_date_gives_identical_bytes(chosen, chosen_pdf) -> None:
    """reportlab's invariant mode: the file is a function of model, options and date."""
    assert render_chart(chosen, options()) == chosen_pdf
    other = render_chart(chosen, options(printed=dt.date(2026, 1, 2)))
    assert other != chosen_pdf
    assert "Printed 2026-01-02" in page_text(other)
    # The file's own date is the printed date, not reportlab's fixed 2000-01-01.
    assert pypdf.PdfReader(io.BytesIO(other)).metadata.creation_date.date() == dt.date(2026, 1, 2)


# --- what it says ---------------------------------------------------------------------------


def test_every_question_answer_and_outcome_can_be_extracted(chosen, chosen_pdf) -> None:
    text = page_text(chosen_pdf)
    plan = plan_chart(chosen, options())
    frags = fragments(chosen_pdf)
    for node in chosen.nodes:
        box = plan.tree.boxes[node.id]
        inside = flat(text_inside(box.rect, frags))
        # Numbered boxes, the number first: Society for Medical Decision Making, Committee on
        # Standardization of Clinical Algorithms 1992, Medical Decision Making 12:149–154
        # (from memory).
        assert inside.startswith(str(node.id))
        if node.leaf:
            # The outcome is named in the title and key, not in every box.
            assert f"Expect {node.prediction}" in inside
            assert chosen.outcome.display not in inside
            assert f"of {node.n:,}" in inside and "visits" not in inside  # named in the key
            assert "CI " in inside
        else:
            assert node.text in inside
            branch = [k for k in range(2) if node.question.takes_missing(k)]
            assert (f"{NOT_RECORDED}: {'YES' if branch == [0] else 'NO'}" in inside) == bool(branch)
    for arrow in plan.tree.arrows:
        label = flat(text_inside(arrow.label, frags))
        assert label == ("YES" if arrow.branch == 0 else "NO")
    assert text.count("YES") >= len(plan.tree.arrows) // 2
    for sentence in CAUTIONS:
        assert sentence in text
    assert CAUTION_TITLE in text
    assert UNCHECKED_BANNER in text
    assert "How to read: start at box 1" in text


def test_observed_rates_and_wilson_intervals_are_the_model_counts(chosen, chosen_pdf) -> None:
    """Wilson (1927) score interval, as core.intervals computes it; checked here against the
    counts the model holds, so the printed numbers are the model's."""
    from core.checking.intervals import wilson_interval

    plan = plan_chart(chosen, options())
    frags = fragments(chosen_pdf)
    for leaf in chosen.leaves:
        inside = flat(text_inside(plan.tree.boxes[leaf.id].rect, frags))
        low, high = wilson_interval(leaf.counts[1], leaf.n)
        share = leaf.counts[1] / leaf.n
        assert f"{100 * share:.0f}% of {leaf.n:,}" in inside
        assert f"CI {100 * low:.0f}–{100 * high:.0f}%" in inside


def test_side_panel_shows_cross_validated_error_beside_training_error() -> None:
    chosen = demo.admitted().model  # the 1-SE tree, on the paper it fits
    text = page_text(render_chart(chosen, options(paper="a3")))
    chosen_risk = chosen.chosen
    cv = f"Cross-validated error rate: {100 * chosen_risk['cv_risk']:.1f}% " \
         f"(SE {100 * chosen_risk['cv_se']:.1f}%)"
    assert cv in text
    assert f"Training error rate: {100 * chosen_risk['train_risk']:.1f}%" in text
    assert text.index("Cross-validated error rate") < text.index("Training error rate")
    assert chosen.path["cv"].capitalize() in text
    assert "1-SE rule" in text
    # What the numbers in a box are, said once in the key (rows are visits: patients came back).
    assert "“P% of N”: share admitted to hospital among the N visits in the box" in text
    assert "95% confidence interval (Wilson)" in text
    cohort = chosen.extra["cohort"]
    assert f"{cohort['visits']:,} visits of {cohort['patients']:,} patients" in text
    assert f"{cohort['first_date']} to {cohort['last_date']}" in text


def test_footer_names_model_data_date_and_version(chosen, chosen_pdf) -> None:
    text = page_text(chosen_pdf)
    assert f"Model {chosen.fingerprint[:12]}" in text
    assert f"Data {chosen.extra['data']['sha256'][:12]}" in text
    assert f"Printed {DATE.isoformat()}" in text
    assert f"Prunella {__version__}" in text


def test_validation_results_replace_the_unchecked_banner(chosen) -> None:
    extra = dict(chosen.extra)
    extra["validation"] = {"source": "the Riverside campus, 2025", "n": 1817,
                           "summary": "error rate 21.0% (95% CI 19.2–22.9%); AUC 0.78",
                           "model_fingerprint": chosen.fingerprint}
    checked = dataclasses.replace(chosen, extra=extra)
    text = page_text(render_chart(checked, options()))
    assert UNCHECKED_BANNER not in text
    assert "error rate 21.0% (95% CI 19.2–22.9%); AUC 0.78" in text
    assert "the Riverside campus, 2025" in text and "1,817" in text
    # The same record without the tree's fingerprint (as Prunella 0.1 wrote it) is no check.
    del extra["validation"]["model_fingerprint"]
    text = page_text(render_chart(dataclasses.replace(chosen, extra=extra), options()))
    assert UNCHECKED_BANNER in text and "the Riverside campus, 2025" not in text


def test_a_held_out_check_from_derive_is_printed() -> None:
    """core.sizing.derive's own held-out check (no 'summary' key) still prints its measures."""
    table, dictionary, predictors = demo_inputs()
    from core.design import DesignSpec
    from core.sizing import CVSettings, DerivationRequest, derive

    run = derive(table, dictionary, DerivationRequest(
        DesignSpec("admitted", predictors, patient_id="patient_id"), cv=CVSettings(folds=3),
        holdout=0.25))
    text = page_text(render_chart(run.model, options(paper="a3")))  # its 1-SE tree: 7 boxes
    check = run.model.extra["validation"]
    assert UNCHECKED_BANNER not in text
    assert flat(check["summary"]) in text
    assert f"{check['n']:,}" in text


# --- legibility and colour ------------------------------------------------------------------


@pytest.mark.parametrize("paper", ["a4", "a3"])
def test_no_text_is_smaller_than_the_minimum(chosen, paper: str) -> None:
    pdf = render_chart(chosen, options(paper=paper))
    floor = default_min_text(paper)
    sizes = [size for *_, size in fragments(pdf)]
    assert sizes and min(sizes) >= floor - 1e-6
    # Independently of the text extractor: every Tf operator in the content stream.
    content = pypdf.PdfReader(io.BytesIO(pdf)).pages[0].get_contents().get_data().decode("latin-1")
    tf = [float(v) for v in re.findall(r"/F\S+ ([\d.]+) Tf", content)]
    assert tf and min(tf) >= floor - 1e-6


def test_a_larger_minimum_is_honoured(chosen) -> None:
    plan = plan_chart(chosen, options(paper="a3", min_text=12))
    assert plan.tree.size >= 12 and plan.scale.body == 12
    assert min(size for *_, size in fragments(draw(plan)[0])) >= 12 - 1e-6


def test_every_text_colour_drawn_meets_wcag_aa_on_its_fill(chosen) -> None:
    """W3C WCAG 2.1 success criterion 1.4.3 (contrast minimum, level AA): 4.5:1 for text,
    with the contrast ratio computed from the relative-luminance definition."""
    models = [chosen, demo.admitted_size(7).model, demo.length_of_stay().model,
              demo.three_classes_size(5).model]
    pairs = set()
    for model in models:
        pairs |= draw(plan_chart(model, options(paper="a3", small_cell=100)))[1]
    assert len(pairs) >= 6
    for ink, fill in pairs:
        assert contrast_ratio(ink, fill) >= 4.5, (ink, fill)


# --- thresholds --------------------------------------------------------------------------------


def _printed_tree(model, pdf: bytes, paper: str):
    """Read every question box back from the page: column, kind, threshold or levels, and
    which branch the page says takes a value that was not recorded.

    Each decision box must parse as one numbered yes/no question (Society for Medical Decision
    Making, Committee on Standardization of Clinical Algorithms 1992, Medical Decision Making
    12:149–154 (from memory)); a box that does not parse fails the caller's test."""
    plan = plan_chart(model, options(paper=paper))
    frags = fragments(pdf)
    by_label = {spec.display: spec for spec in model.predictors}
    printed = {}
    for node in model.nodes:
        if node.leaf:
            continue
        inside = flat(text_inside(plan.tree.boxes[node.id].rect, frags))
        assert inside.startswith(f"{node.id} ")
        question = inside[len(str(node.id)) + 1:]
        missing = "no"  # the box's own line says where a value not recorded goes
        note = re.search(rf" {NOT_RECORDED}: (YES|NO)$", question)
        if note:
            missing, question = note.group(1).lower(), question[:note.start()]
        above = re.fullmatch(r"(.+) above (-?[\d.]+)\s*(\S*)\?", question)
        if above and above.group(1) in by_label:
            printed[node.id] = (by_label[above.group(1)].name, "above", float(above.group(2)),
                                missing)
            continue
        label, levels = question[:-1].split(": ", 1)
        yes = re.split(r", | or ", levels)
        printed[node.id] = (by_label[label].name, "in", tuple(yes), missing)
    return plan, printed


def _route_as_printed(model, printed, data) -> np.ndarray:
    values = {t.spec.name: column_values(t.numbers, t.codes, t.spec) for t in data.predictors}
    at = np.ones(data.n, dtype=int)
    for node in model.nodes:  # parents before children
        if node.leaf:
            continue
        column, kind, rule, missing = printed[node.id]
        here = at == node.id
        v = values[column][here]
        if kind == "above":
            v = v.astype(float)
            gone = np.isnan(v)
            with np.errstate(invalid="ignore"):
                yes = v > rule
        else:
            gone = np.array([x is None for x in v])
            yes = np.isin(v.astype(object), list(rule))
        yes = np.where(gone, missing == "yes", yes)
        at[here] = np.where(yes, node.children[0], node.children[1])
    return at


def _grown_tree_cells(derivation) -> np.ndarray:
    """Where scikit-learn's grown tree, pruned to the chosen size, sends each derivation row:
    the first node on its decision path that the chosen subtree does not split."""
    path = derivation.path
    grown = path.grown
    index = int(np.flatnonzero(np.asarray(path.leaves) == derivation.model.chosen["leaves"])[0])
    internal = grown.sequence.internal_at(path.grid[index])
    X = grown.encoding.matrix(derivation.data)
    paths = grown.tree.estimator.decision_path(X).tocsr()
    cells = np.empty(X.shape[0], dtype=int)
    for row in range(X.shape[0]):
        nodes = paths.indices[paths.indptr[row]:paths.indptr[row + 1]]
        # scikit-learn numbers nodes in preorder, so a path sorted by id runs root to leaf.
        cells[row] = next(int(n) for n in sorted(nodes) if not internal[n])
    return cells


@pytest.mark.parametrize("size", [None, 8])
def test_printed_thresholds_route_every_derivation_patient_like_the_grown_tree(size) -> None:
    """The numbers printed on the page, read back from the PDF, send every derivation row to
    the same group of rows as scikit-learn's grown tree cut back to the chosen size; and each
    box's printed count and rate are those of the rows the page sends to it."""
    derivation = demo.admitted() if size is None else demo.admitted_size(size)
    model = derivation.model
    pdf = render_chart(model, options(paper="a3"))
    _, printed = _printed_tree(model, pdf, "a3")
    assert any(kind == "above" for _, kind, _, _ in printed.values())
    by_page = _route_as_printed(model, printed, derivation.data)
    by_tree = _grown_tree_cells(derivation)
    # Same partition of the rows: each printed box is exactly one cell of the pruned tree.
    pairs = set(zip(by_page.tolist(), by_tree.tolist()))
    assert len(pairs) == len(set(by_page.tolist())) == len(set(by_tree.tolist())) == len(model.leaves)
    plan = plan_chart(model, options(paper="a3"))
    frags = fragments(pdf)
    for leaf in model.leaves:
        rows = by_page == leaf.id
        inside = flat(text_inside(plan.tree.boxes[leaf.id].rect, frags))
        share = float(np.mean(derivation.data.y[rows] == 1))
        assert f"{100 * share:.0f}% of {int(rows.sum()):,}" in inside
    # The printed thresholds are round numbers (core/thresholds.py), not float32 midpoints.
    for _, kind, rule, _ in printed.values():
        if kind == "above":
            assert rule == round(rule, 1)


# --- small cells ---------------------------------------------------------------------------------


def test_small_groups_are_flagged_and_counts_can_be_hidden(chosen) -> None:
    """Small-cell disclosure: leaves on fewer patients than the threshold are flagged (common
    practice in health statistics; thresholds of 5 or 10 by jurisdiction)."""
    small = min(leaf.n for leaf in chosen.leaves) + 1
    plan = plan_chart(chosen, options(small_cell=small))
    flagged = {leaf.id for leaf in chosen.leaves if leaf.n < small}
    assert plan.text.small == flagged and flagged
    pdf = draw(plan)[0]
    frags = fragments(pdf)
    for leaf in chosen.leaves:
        inside = flat(text_inside(plan.tree.boxes[leaf.id].rect, frags))
        assert ("Small group" in inside) == (leaf.id in flagged)
    hidden = plan_chart(chosen, options(hide_counts=True))
    frags = fragments(draw(hidden)[0])
    for leaf in chosen.leaves:
        inside = flat(text_inside(hidden.tree.boxes[leaf.id].rect, frags))
        assert f"{leaf.n:,}" not in inside and "visits" not in inside
        assert f"Rate {100 * leaf.counts[1] / leaf.n:.0f}%" in inside and "CI " in inside


# --- other outcomes -----------------------------------------------------------------------------


def test_a_regression_chart_shows_means_with_intervals() -> None:
    model = demo.length_of_stay_size(5).model
    pdf = render_chart(model, options())
    text = page_text(pdf)
    for leaf in model.leaves:
        low, high = model.mean_interval(leaf)
        assert f"Mean {leaf.mean:.3g}" in text
    assert "Cross-validated mean squared error" in text and "Training mean squared error" in text
    assert "CI " in text and "95% confidence interval (t)" in text and "hours" in text
    assert any(word in text for word in ("LOWER", "HIGHER"))


def test_a_regression_box_shows_the_spread_of_its_patients() -> None:
    """Issue 10.9: beside the interval of the mean, each box gives the middle half of its
    derivation patients (25th to 75th percentile, computed when the tree is built and kept in
    the model file) and their number; the key says which is which."""
    import numpy as np

    from core.chart.bands import number

    derivation = demo.length_of_stay_size(5)
    model = derivation.model
    text = page_text(render_chart(model, options()))
    data = derivation.path.grown.data
    routes = model.route(model.asked_values(data.predictors), data.n)
    for leaf in model.leaves:
        mine = np.asarray(data.y, float)[routes == leaf.id]
        assert leaf.quartiles == pytest.approx(tuple(np.percentile(mine, [25, 75])))
        low, high = leaf.quartiles
        assert f"IQR {number(low)}–{number(high)}" in text
        assert f"{leaf.n:,} visits" in text
    assert "not the range for one patient" in text
    assert "IQR: where the middle half of the box's visits lay (25th to 75th percentile)" in text
    again = type(model).from_dict(model.to_dict())
    assert [n.quartiles for n in again.leaves] == [n.quartiles for n in model.leaves]


def test_a_three_class_chart_bands_by_the_expected_class() -> None:
    model = demo.three_classes_size(9).model
    assert len(model.classes) == 3 and len({leaf.prediction for leaf in model.leaves}) == 3
    plan = plan_chart(model, options(paper="a3", min_text=9))
    frags = fragments(draw(plan)[0])
    for leaf in model.leaves:
        inside = flat(text_inside(plan.tree.boxes[leaf.id].rect, frags))
        assert inside.split()[1:4] == str(leaf.prediction).split()[:3]  # the band word
        assert f"Expect {leaf.prediction}" in inside


def test_absolute_band_cut_points(chosen) -> None:
    plan = plan_chart(chosen, options(band_cuts=(20.0, 50.0)))
    for leaf in chosen.leaves:
        rate = leaf.counts[1] / leaf.n
        word = plan.text.bands[leaf.id].word
        assert word == ("LOW" if rate < 0.2 else "MODERATE" if rate < 0.5 else "HIGH")


def test_relative_bands_follow_the_cohort_rate(chosen) -> None:
    plan = plan_chart(chosen, options())
    overall = chosen.root.counts[1] / chosen.root.n
    for leaf in chosen.leaves:
        rate = leaf.counts[1] / leaf.n
        word = plan.text.bands[leaf.id].word
        expected = ("HIGHER" if rate >= 1.25 * overall else
                    "LOWER" if rate <= overall / 1.25 else "AVERAGE")
        assert word == expected


# --- geometry of the whole page -------------------------------------------------------------------


@pytest.mark.parametrize("paper,size", [("a4", DEMO_A4_LEAVES), ("letter", DEMO_A4_LEAVES),
                                        ("a3", None), ("a4", 2)])
def test_nothing_leaves_the_printable_area_or_overlaps(paper: str, size) -> None:
    # (A one-box tree is never printed: tests/test_no_better_than_no_tree.py.)
    model = demo.admitted().model if size is None else demo.admitted_size(size).model
    plan = plan_chart(model, options(paper=paper))
    printable = plan.printable
    tree = plan.tree.rects()
    panel = [block.rect for block in plan.panel]
    others = panel + ([plan.banner] if plan.banner else []) + [plan.qr]
    for rect in tree + others:
        assert rect.inside(printable), rect
    for rect in tree:
        assert rect.inside(plan.tree_area)
        for other in others:
            assert not rect.overlaps(other)
    for i, a in enumerate(panel):
        for b in panel[i + 1:]:
            assert not a.overlaps(b)
    lines = list(plan.header) + list(plan.footer)
    for line in lines:
        assert printable.y <= line.baseline <= printable.bottom


def test_the_qr_code_reads_back_as_the_model_fingerprint(chosen, chosen_pdf, tmp_path) -> None:
    """Decoded by an independent reader (zbar), when the machine has it."""
    import shutil
    import subprocess

    if not (shutil.which("pdftoppm") and shutil.which("zbarimg")):
        pytest.skip("needs poppler-utils and zbar-tools")
    pdf = tmp_path / "chart.pdf"
    pdf.write_bytes(chosen_pdf)
    subprocess.run(["pdftoppm", "-r", "200", "-png", "-singlefile", str(pdf),
                    str(tmp_path / "chart")], check=True)
    read = subprocess.run(["zbarimg", "-q", "--raw", str(tmp_path / "chart.png")],
                          capture_output=True, text=True)
    assert read.stdout.strip() == f"sha256:{chosen.fingerprint}"


def test_a_bare_model_and_a_recorded_or_not_question_still_print(chosen) -> None:
    """A model file without cohort, data or costs (hand-made or old) prints; a question that
    asks whether a value was recorded gets plain YES and NO."""
    from core.model import TreeModel

    data = chosen.to_dict()
    for key in ("cohort", "data", "costs", "settings", "validation"):
        data.pop(key, None)
    root = data["nodes"][0]
    root["split"] = {"column": "crp", "kind": "missing", "threshold": None, "yes_levels": [],
                     "no_levels": [], "missing_goes": "yes"}
    root["question"] = "C-reactive protein (CRP) not recorded?"
    bare = TreeModel.from_dict(data)
    plan = plan_chart(bare, options())
    pdf = draw(plan)[0]
    frags = fragments(pdf)
    labels = {a.branch: flat(text_inside(a.label, frags)) for a in plan.tree.arrows if a.parent == 1}
    assert labels == {0: "YES", 1: "NO"}
    assert NOT_RECORDED not in flat(text_inside(plan.tree.boxes[1].rect, frags))
    text = page_text(pdf)
    assert "C-reactive protein (CRP) not recorded?" in text
    assert "Data unknown" in text and UNCHECKED_BANNER in text
