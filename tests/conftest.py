"""Set-up for the whole suite: this computer's identifier key (core/checking/identifier_key.py)
is kept in a temporary folder, never the user's own ~/.config, and made before any test runs;
child processes inherit it."""

from __future__ import annotations

import os
import shutil
import tempfile

_KEY_FOLDER = tempfile.mkdtemp(prefix="prunella-key-")
os.environ["PRUNELLA_IDENTIFIER_KEY_FILE"] = os.path.join(_KEY_FOLDER, "identifier_key")

# Made before any test, so "a new identifier key was made" is said by the tests that ask for
# it (tests/test_identifier_key.py), never by whichever test happens to grow first.
from core.checking.identifier_key import identifier_key  # noqa: E402

identifier_key(create=True)


def pytest_unconfigure(config) -> None:
    shutil.rmtree(_KEY_FOLDER, ignore_errors=True)
