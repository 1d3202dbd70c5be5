"""The secret key this computer uses to digest patient identifiers.

Record numbers are a small space (RX100000 to RX999999 is under a million), so any digest a
model file could recompute by itself (plain or salted with a value stored in the file) gives
every identifier back to whoever tries them all. The digests are therefore keyed (HMAC-SHA256)
with a key that never goes into any output file: it is kept in a private file on this computer
(``$XDG_CONFIG_HOME/prunella/identifier_key``, or ``~/.config/prunella/identifier_key``;
``PRUNELLA_IDENTIFIER_KEY_FILE`` names another path). A model records only the key's
identifier, which reveals nothing about the key, so a check on another computer knows that it
cannot tell which patients the file shares with the derivation patients.
"""

from __future__ import annotations

import hashlib
import hmac
import os
import secrets
import stat
from pathlib import Path

from ..errors import InputError
from ..messages.message import say

KEY_FILE_VARIABLE = "PRUNELLA_IDENTIFIER_KEY_FILE"
KEY_BYTES = 32
KEY_ID_CHARS = 12


def key_file_path() -> Path:
    """Where this computer's identifier key is kept."""
    named = os.environ.get(KEY_FILE_VARIABLE)
    if named:
        return Path(named).expanduser()
    config = os.environ.get("XDG_CONFIG_HOME") or str(Path.home() / ".config")
    return Path(config) / "prunella" / "identifier_key"


def key_id(key: bytes) -> str:
    """The name of a key as a model records it: a keyed digest of a fixed text, which tells
    two keys apart and gives nothing of the key (nor of any identifier) away."""
    return hmac.new(key, b"prunella key id", hashlib.sha256).hexdigest()[:KEY_ID_CHARS]


def identifier_key(create: bool = False) -> bytes | None:
    """This computer's key: read from its private file, made on first use when ``create``
    (growing a tree), else None when there is none (checking never makes one). A key file
    that is not a private regular file of the right size is refused (InputError)."""
    return _key(create)[0]


def first_identifier_key() -> Path | None:
    """Make this computer's key if it has none yet (growing with a patient number): the key
    file's path when it was made just now, so the user can be told to back it up, else None.
    A key file that is there but unsafe is refused (InputError), as by :func:`identifier_key`."""
    return key_file_path() if _key(create=True)[1] else None


def _key(create: bool) -> tuple[bytes | None, bool]:
    """The key (None: none, and not ``create``) and whether this call made it."""
    path = key_file_path()
    try:
        return _read_key(path), False
    except FileNotFoundError:
        if not create:
            return None, False
    made = _make_key(path)
    return _read_key(path), made


def _refuse(path: Path, what: str) -> InputError:
    return InputError(say("check.key_file_unsafe", path=str(path), what=what))


def _read_key(path: Path) -> bytes:
    info = path.lstat()  # FileNotFoundError: no key yet
    if stat.S_ISLNK(info.st_mode):
        raise _refuse(path, "a link")
    if not stat.S_ISREG(info.st_mode):
        raise _refuse(path, "not a regular file")
    if info.st_mode & 0o077:
        raise _refuse(path, f"readable or writable by others (mode {info.st_mode & 0o777:o})")
    # O_NOFOLLOW and O_NONBLOCK: a file swapped for a link or a pipe since lstat is not
    # followed nor waited on; fstat then judges the file actually opened.
    flags = os.O_RDONLY | getattr(os, "O_NOFOLLOW", 0) | getattr(os, "O_NONBLOCK", 0)
    try:
        handle = os.open(path, flags)
    except OSError as error:
        raise _refuse(path, f"unreadable ({error.strerror})") from None
    try:
        opened = os.fstat(handle)
        if not stat.S_ISREG(opened.st_mode) or opened.st_mode & 0o077:
            raise _refuse(path, "not a private regular file")
        key = os.read(handle, KEY_BYTES + 1)
    finally:
        os.close(handle)
    if len(key) != KEY_BYTES:
        raise InputError(say("check.key_file_damaged", path=str(path), n=KEY_BYTES))
    return key


def _make_key(path: Path) -> bool:
    """A new key, written whole or not at all: into a private temporary file beside it, then
    linked to its name, which fails if another process made the key meanwhile (its key is
    kept, and False is returned)."""
    try:
        path.parent.mkdir(mode=0o700, parents=True, exist_ok=True)
        temporary = path.with_name(f".{path.name}.{os.getpid()}.{secrets.token_hex(4)}")
        handle = os.open(temporary, os.O_WRONLY | os.O_CREAT | os.O_EXCL
                         | getattr(os, "O_NOFOLLOW", 0), 0o600)
    except OSError as error:
        raise InputError(say("check.key_file_unwritable", path=str(path),
                             reason=error.strerror or str(error))) from None
    try:
        try:
            os.write(handle, secrets.token_bytes(KEY_BYTES))
            os.fsync(handle)
        finally:
            os.close(handle)
        try:
            os.link(temporary, path)
        except FileExistsError:
            return False
        return True
    except OSError as error:
        raise InputError(say("check.key_file_unwritable", path=str(path),
                             reason=error.strerror or str(error))) from None
    finally:
        temporary.unlink(missing_ok=True)
