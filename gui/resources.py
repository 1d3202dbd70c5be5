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


def is_demo_file(path: str | Path) -> bool:
    """Whether ``path`` is one of the demo's files (the app's own, not a folder the user
    chose: the open dialog does not start there after the demo)."""
    try:
        return Path(path).resolve().parent == DEMO_DATA.resolve().parent
    except OSError:
        return False
