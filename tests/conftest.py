"""Set-up for the whole suite: this computer's identifier key (core/checking/identifier_key.py)
is kept in a temporary folder, never the user's own ~/.config; child processes inherit it."""

from __future__ import annotations

import os
import shutil
import tempfile

_KEY_FOLDER = tempfile.mkdtemp(prefix="prunella-key-")
os.environ["PRUNELLA_IDENTIFIER_KEY_FILE"] = os.path.join(_KEY_FOLDER, "identifier_key")


def pytest_unconfigure(config) -> None:
    shutil.rmtree(_KEY_FOLDER, ignore_errors=True)
