"""Issue 10, items 8 and 11, in the app: the method spelled out (Breiman, Friedman, Olshen
& Stone 1984), plain words in every step."""

from __future__ import annotations

import os
import re

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from core.phrases import METHOD_NAME  # noqa: E402


def test_about_names_the_method_in_full_never_its_acronym(window, dialogs):
    window.show_about()
    (text,) = dialogs.texts("about")
    assert METHOD_NAME in text
    assert not re.search(r"\bCART\b", text, re.IGNORECASE)
