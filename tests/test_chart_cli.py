"""``prunella chart`` and ``prunella fit --chart`` from the command line.

``prunella chart`` runs once as a child process, as a user runs it; the other runs go through
core.cli.main in this process (tests/helpers.py). The demo cohort is invented; it is used only
to exercise the commands.
"""

from __future__ import annotations

import io
import re
from pathlib import Path

import pypdf
import pytest

from core.cli import SUBCOMMANDS
from tests.helpers import DEMO_CSV, DEMO_DICTIONARY, Ran, prunella, run_prunella


def page(path: Path) -> pypdf.PageObject:
    reader = pypdf.PdfReader(io.BytesIO(path.read_bytes()))
    assert len(reader.pages) == 1
    return reader.pages[0]


@pytest.fixture(scope="module")
def fitted(tmp_path_factory) -> tuple[Path, Path, Ran]:
    """One fit of the demo cohort (3-fold CV to stay quick) with --chart on Tabloid: its 1-SE
    tree (7 outcome boxes) is too large for US Letter at 9 pt with the present layout."""
    folder = tmp_path_factory.mktemp("fit")
    model, chart = folder / "admitted.json", folder / "admitted.pdf"
    done = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--dictionary", DEMO_DICTIONARY,
                    "--folds", "3", "--model", model, "--chart", chart, "--paper", "tabloid",
                    "--title", "Who is admitted?")
    return model, chart, done


def test_chart_is_a_subcommand() -> None:
    assert "chart" in SUBCOMMANDS
    done = prunella("chart", "--help")
    assert done.returncode == 0
    out = done.stdout
    for option in ("--out", "--paper", "--orientation", "--title", "--subtitle", "--min-text",
                   "--small-cell", "--hide-counts"):
        assert option in out


def test_fit_writes_the_chart_beside_the_model(fitted) -> None:
    model, chart, done = fitted
    assert done.returncode == 0, done.stderr
    assert model.exists() and chart.exists()
    sheet = page(chart)
    # Tabloid, 11 × 17 in = 792 × 1224 pt (ANSI/ASME Y14.1).
    assert sorted((float(sheet.mediabox.width), float(sheet.mediabox.height))) == \
        pytest.approx([792.0, 1224.0], abs=0.01)
    text = " ".join(sheet.extract_text().split())
    assert "Who is admitted?" in text
    assert "Decision support only" in text


def test_chart_from_a_saved_model_is_reproducible(fitted, tmp_path) -> None:
    model, _, _ = fitted
    first, second = tmp_path / "one.pdf", tmp_path / "two.pdf"
    args = ("--paper", "a3", "--orientation", "landscape", "--subtitle",
            "Adults with acute breathlessness at the emergency department", "--date", "2025-06-30")
    done = run_prunella("chart", model, "--out", first, *args)
    assert done.returncode == 0, done.stderr
    assert "Wrote the chart" in done.stdout and "A3 landscape" in done.stdout
    assert prunella("chart", model, "--out", second, *args).returncode == 0  # in-process
    assert first.read_bytes() == second.read_bytes()
    sheet = page(first)
    assert float(sheet.mediabox.width) == pytest.approx(1190.55, abs=0.01)  # A3, ISO 216
    text = " ".join(sheet.extract_text().split())
    assert "Adults with acute breathlessness at the emergency department" in text
    assert "Printed 2025-06-30" in text


def test_hide_counts_and_small_cells(fitted, tmp_path) -> None:
    model, _, _ = fitted
    out = tmp_path / "hidden.pdf"
    done = prunella("chart", model, "--out", out, "--paper", "a3", "--hide-counts",
                    "--small-cell", "100000", "--bands", "20,50")
    assert done.returncode == 0, done.stderr
    text = " ".join(page(out).extract_text().split())
    assert "Small group" in text and not re.search(r"\d% of \d", text)  # no counts
    assert re.search(r"\b(LOW|MODERATE|HIGH)\b", text)  # the absolute bands' words


def test_too_large_a_tree_is_refused_with_advice(tmp_path) -> None:
    model, chart = tmp_path / "big.json", tmp_path / "big.pdf"
    done = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--dictionary", DEMO_DICTIONARY,
                    "--folds", "3", "--size", "30", "--model", model, "--chart", chart)
    assert done.returncode == 2
    assert "does not fit on one A4 page" in done.stderr
    assert "The largest tree of its pruning sequence that fits has" in done.stderr
    assert "A3" in done.stderr and "--size" in done.stderr
    assert model.exists() and not chart.exists()
    again = prunella("chart", model, "--out", chart)
    assert again.returncode == 2 and "does not fit" in again.stderr and not chart.exists()


@pytest.mark.parametrize("args,words", [
    (("--bands", "ten"), "--bands"),
    (("--bands", "30,10"), "increasing"),
    (("--date", "30/06/2025"), "YYYY-MM-DD"),
    (("--min-text", "3"), "minimum text size"),
    (("--paper", "b5"), "invalid choice"),
])
def test_bad_options_get_one_clear_message(fitted, tmp_path, args, words) -> None:
    model, _, _ = fitted
    done = prunella("chart", model, "--out", tmp_path / "x.pdf", *args)
    assert done.returncode == 2
    assert words in done.stderr
    assert not (tmp_path / "x.pdf").exists()


def test_the_model_file_is_never_overwritten(fitted) -> None:
    model, _, _ = fitted
    before = model.read_bytes()
    done = prunella("chart", model, "--out", model)
    assert done.returncode == 2 and "input file" in done.stderr
    assert model.read_bytes() == before


def test_a_file_that_is_no_model_is_refused(tmp_path) -> None:
    bogus = tmp_path / "bogus.json"
    bogus.write_text("{}", encoding="utf-8")
    done = prunella("chart", bogus, "--out", tmp_path / "x.pdf")
    assert done.returncode == 2 and "not a Prunella model" in done.stderr
