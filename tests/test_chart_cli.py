"""``prunella chart`` and ``prunella fit --chart`` from the command line.

The demo cohort is invented; it is used only to exercise the commands.
"""

from __future__ import annotations

import io
import subprocess
from pathlib import Path

import pypdf
import pytest

from core.cli import SUBCOMMANDS
from tests.helpers import DEMO_CSV, DEMO_DICTIONARY, run_prunella


def page(path: Path) -> pypdf.PageObject:
    reader = pypdf.PdfReader(io.BytesIO(path.read_bytes()))
    assert len(reader.pages) == 1
    return reader.pages[0]


@pytest.fixture(scope="module")
def fitted(tmp_path_factory) -> tuple[Path, Path, subprocess.CompletedProcess]:
    """One fit of the demo cohort (3-fold CV to stay quick) with --chart on Tabloid: its 1-SE
    tree (7 outcome boxes) is too large for US Letter at 9 pt with the present layout."""
    folder = tmp_path_factory.mktemp("fit")
    model, chart = folder / "admitted.json", folder / "admitted.pdf"
    done = run_prunella("fit", DEMO_CSV, "--outcome", "admitted", "--dictionary", DEMO_DICTIONARY,
                        "--folds", "3", "--model", model, "--chart", chart, "--paper", "tabloid",
                        "--title", "Who is admitted?")
    return model, chart, done


def test_chart_is_a_subcommand(capsys) -> None:
    from core.cli import main

    assert "chart" in SUBCOMMANDS
    with pytest.raises(SystemExit) as done:
        main(["chart", "--help"])
    assert done.value.code == 0
    out = capsys.readouterr().out
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
    from core.cli import main  # the second run in-process: same bytes either way

    assert main(["chart", str(model), "--out", str(second), *args]) == 0
    assert first.read_bytes() == second.read_bytes()
    sheet = page(first)
    assert float(sheet.mediabox.width) == pytest.approx(1190.55, abs=0.01)  # A3, ISO 216
    text = " ".join(sheet.extract_text().split())
    assert "Adults with acute breathlessness at the emergency department" in text
    assert "Printed 2025-06-30" in text


def test_hide_counts_and_small_cells(fitted, tmp_path) -> None:
    model, _, _ = fitted
    out = tmp_path / "hidden.pdf"
    done = run_prunella("chart", model, "--out", out, "--paper", "a3", "--hide-counts",
                        "--small-cell", "100000", "--bands", "20,50")
    assert done.returncode == 0, done.stderr
    text = " ".join(page(out).extract_text().split())
    assert "Small group" in text and " of " not in text.split("Derived from")[0]
    assert "HIGH RATE" in text or "LOW RATE" in text or "MODERATE RATE" in text


def test_too_large_a_tree_is_refused_with_advice(tmp_path) -> None:
    model, chart = tmp_path / "big.json", tmp_path / "big.pdf"
    done = run_prunella("fit", DEMO_CSV, "--outcome", "admitted", "--dictionary", DEMO_DICTIONARY,
                        "--folds", "3", "--size", "30", "--model", model, "--chart", chart)
    assert done.returncode == 2
    assert "does not fit on one A4 page" in done.stderr
    assert "The largest tree of its pruning sequence that fits has" in done.stderr
    assert "A3" in done.stderr and "--size" in done.stderr
    assert model.exists() and not chart.exists()
    again = run_prunella("chart", model, "--out", chart)
    assert again.returncode == 2 and "does not fit" in again.stderr and not chart.exists()


@pytest.mark.parametrize("args,words", [
    (("--bands", "ten"), "--bands"),
    (("--bands", "30,10"), "increasing"),
    (("--date", "30/06/2025"), "YYYY-MM-DD"),
    (("--min-text", "3"), "minimum text size"),
    (("--paper", "b5"), "invalid choice"),
])
def test_bad_options_get_one_clear_message(fitted, tmp_path, capsys, args, words) -> None:
    """In-process (the same main() the entry point calls), to keep the suite quick."""
    from core.cli import main

    model, _, _ = fitted
    try:
        status = main(["chart", str(model), "--out", str(tmp_path / "x.pdf"), *args])
    except SystemExit as exit_:  # argparse's own refusals
        status = exit_.code
    assert status == 2
    err = capsys.readouterr().err
    assert words in err and "Traceback" not in err
    assert not (tmp_path / "x.pdf").exists()


def test_the_model_file_is_never_overwritten(fitted, capsys) -> None:
    from core.cli import main

    model, _, _ = fitted
    before = model.read_bytes()
    assert main(["chart", str(model), "--out", str(model)]) == 2
    assert "input file" in capsys.readouterr().err
    assert model.read_bytes() == before


def test_a_file_that_is_no_model_is_refused(tmp_path, capsys) -> None:
    from core.cli import main

    bogus = tmp_path / "bogus.json"
    bogus.write_text("{}", encoding="utf-8")
    assert main(["chart", str(bogus), "--out", str(tmp_path / "x.pdf")]) == 2
    assert "not a Prunella model" in capsys.readouterr().err
