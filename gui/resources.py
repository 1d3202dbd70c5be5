"""Files the app ships with: its icon and the invented demo cohort, found beside the code."""

from __future__ import annotations

from pathlib import Path

from core.errors import InputError
from core.messages import say

ROOT = Path(__file__).resolve().parents[1]
ICON = ROOT / "assets" / "prunella.svg"
DEMO_DATA = ROOT / "sample_data" / "breathless_ed.csv"
DEMO_DICTIONARY = ROOT / "sample_data" / "breathless_ed.dictionary.json"


def demo_files() -> tuple[Path, Path]:
    """The demo cohort and its data dictionary, or a message saying they are not installed."""
    if not (DEMO_DATA.is_file() and DEMO_DICTIONARY.is_file()):
        raise InputError(say("app.no_demo"))
    return DEMO_DATA, DEMO_DICTIONARY
