"""Writing files so that a crash never leaves a half-written one, reading Prunella's own files
without trusting them, and keeping exports inert.

Every file Prunella writes goes through here: the bytes go to a temporary file in the same
folder, are flushed to disk, and only then replace the target in one rename, so a kill at any
moment leaves either the old file or the new one. The temporary file is private (readable by
its owner only) while it holds patient rows; the finished file gets the user's normal mode (the
umask's, or the mode of the file it replaces). A kill before the rename leaves the temporary
file (named ``.<name>.prunella-part-<process>-<random>.tmp``); the next save to that folder
removes such leftovers once no running save holds them, and says so. Prunella's own files (models, dictionaries,
projects) are JSON with a ``"format": "prunella-<kind>/<version>"`` key; they are parsed as
data only (no pickle, nothing is evaluated) and refused with a clear message when they are
damaged, of another kind, or from a newer version.
"""

from __future__ import annotations

import json
import math
import os
import re
import tempfile
import threading
import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path

try:  # POSIX: a save holds a lock on its temporary file, so a leftover is told from one in use
    import fcntl
except ImportError:  # pragma: no cover - Windows
    fcntl = None

import pandas as pd

from .errors import InputError
from .messages.message import say

# OWASP "CSV Injection": a cell starting with one of these is run as a formula by spreadsheets.
_FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")
MAX_JSON_BYTES = 200 * 1024 * 1024  # far above any real model or project file
_FORMAT = re.compile(r"^prunella-([a-z][a-z0-9-]*)/(\d+)$")


def is_whole_number(value) -> bool:
    """A JSON integer (JSON's true and false are not numbers here)."""
    return isinstance(value, int) and not isinstance(value, bool)


def is_finite_number(value) -> bool:
    """A JSON number that is neither NaN nor infinite (nor true or false)."""
    if not isinstance(value, (int, float)) or isinstance(value, bool):
        return False
    try:
        return math.isfinite(value)
    except OverflowError:  # a whole number too large for a float (10**400) is not usable
        return False


def write_bytes_atomic(path: str | Path, data: bytes) -> None:
    """Replace ``path`` with ``data`` atomically (temporary file, fsync, rename). A write the
    system refuses (no room on the disk, no permission, a folder in the way) is said in one
    sentence; the temporary file is removed and the previous file stays as it was. Our own
    temporary files left in the folder by a save that was killed are removed first, and a note
    says so (see :func:`save_notes`)."""
    path = Path(path)
    try:
        _write_atomic(path, data)
    except OSError as error:
        raise InputError(say("file.not_written", target=str(path),
                             reason=error.strerror or type(error).__name__)) from None


TEMP_MARK = ".prunella-part-"  # only our atomic saves name files so
_TEMP_NAME = re.compile(r"^\..+" + re.escape(TEMP_MARK) + r"(\d+)-[^./]+\.tmp$")
STALE_AFTER_SECONDS = 60.0  # a temporary file no save holds and this old is a leftover
# Listeners per thread: a note belongs to the save that made it, so the app's report written
# in the background and a project saved meanwhile each hear only their own.
_listening = threading.local()


@contextmanager
def save_notes(listener: Callable[[str], None]) -> Iterator[None]:
    """While inside, ``listener`` hears every note a save made in this thread makes (leftover
    temporary files removed); the command line prints them, the app shows them."""
    listeners = _listening.__dict__.setdefault("listeners", [])
    listeners.append(listener)
    try:
        yield
    finally:
        listeners.remove(listener)


def _tell(note: str) -> None:
    for listener in list(getattr(_listening, "listeners", ())):
        listener(note)


def _write_atomic(path: Path, data: bytes) -> None:
    if path.is_dir():
        raise IsADirectoryError(21, "it is a folder", str(path))
    path.parent.mkdir(parents=True, exist_ok=True)
    removed = remove_stale_temporaries(path.parent)
    if removed:
        _tell(say("file.leftovers_removed", count=len(removed),
                  files="file" if len(removed) == 1 else "files", folder=str(path.parent),
                  names=", ".join(removed)))
    # mkstemp makes the file readable by its owner only (0600): it holds patient rows.
    handle, temp = tempfile.mkstemp(prefix=f".{path.name}{TEMP_MARK}{os.getpid()}-",
                                    suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(handle, "wb") as out:
            if fcntl is not None:
                fcntl.flock(out.fileno(), fcntl.LOCK_EX)  # in use: no other save removes it
            out.write(data)
            out.flush()
            os.fsync(out.fileno())
            if hasattr(os, "fchmod"):
                os.fchmod(out.fileno(), _final_mode(path))
        os.replace(temp, path)
    except BaseException:
        try:
            os.unlink(temp)
        except FileNotFoundError:
            pass
        raise
    _sync_folder(path.parent)


def _final_mode(path: Path) -> int:
    """The finished file's permissions: those of the file it replaces, else the user's normal
    mode for a new file (0666 less the umask, e.g. 0644 under umask 022)."""
    try:
        return path.stat().st_mode & 0o7777
    except OSError:
        return 0o666 & ~current_umask()


_umask_lock = threading.Lock()


def current_umask() -> int:
    """The process's umask (read without changing it where the system tells it)."""
    try:
        with open("/proc/self/status", encoding="ascii") as status:
            for line in status:
                if line.startswith("Umask:"):
                    return int(line.split()[1], 8)
    except (OSError, ValueError):
        pass
    with _umask_lock:  # elsewhere the only way to read it is to set it and put it back
        mask = os.umask(0o077)
        os.umask(mask)
    return mask


def remove_stale_temporaries(folder: str | Path) -> list[str]:
    """Remove the temporary files an earlier save of ours left in ``folder`` when it was
    killed before its rename; returns their names. Only our own naming pattern, only ordinary
    files of this user, and only when no running save holds one (its lock is free and its
    writer has ended, or it is older than a minute)."""
    removed = []
    try:
        entries = list(os.scandir(folder))
    except OSError:
        return removed
    for entry in entries:
        match = _TEMP_NAME.match(entry.name)
        if match and _is_stale(entry, int(match.group(1))):
            try:
                os.unlink(entry.path)
            except OSError:
                continue
            removed.append(entry.name)
    return sorted(removed)


def _is_stale(entry: os.DirEntry, writer: int) -> bool:
    try:
        info = entry.stat(follow_symlinks=False)
    except OSError:
        return False
    if not entry.is_file(follow_symlinks=False) or \
            (hasattr(os, "getuid") and info.st_uid != os.getuid()):
        return False
    old = time.time() - info.st_mtime > STALE_AFTER_SECONDS
    if fcntl is None:  # no locks to ask: only leftovers well past any save's length
        return time.time() - info.st_mtime > 24 * 3600
    try:
        descriptor = os.open(entry.path, os.O_RDONLY | getattr(os, "O_NOFOLLOW", 0))
    except OSError:
        return False
    try:
        fcntl.flock(descriptor, fcntl.LOCK_EX | fcntl.LOCK_NB)
    except OSError:
        return False  # a save is writing it right now
    finally:
        os.close(descriptor)  # (closing lets go of the lock just taken)
    return old or not _process_running(writer)


def _process_running(pid: int) -> bool:
    if pid == os.getpid():
        return True  # one of our own saves may be between creating its file and locking it
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except OSError:
        return True  # running, as another user
    return True


def _sync_folder(folder: Path) -> None:
    """Make the rename itself durable (POSIX); harmless where folders cannot be opened."""
    try:
        descriptor = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(descriptor)
    except OSError:
        pass
    finally:
        os.close(descriptor)


def write_text_atomic(path: str | Path, text: str) -> None:
    """Replace ``path`` with UTF-8 ``text`` atomically."""
    write_bytes_atomic(path, text.encode("utf-8"))


def neutralise_cell(value):
    """Prefix a text cell that a spreadsheet would run as a formula with an apostrophe."""
    if isinstance(value, str) and value.startswith(_FORMULA_STARTS):
        return "'" + value
    return value


def _export_cell(value):
    value = neutralise_cell(value)
    if isinstance(value, str) and "\r" in value:
        value = value.replace("\r\n", "\n").replace("\r", "\n")
    return value


def write_csv_safely(frame: pd.DataFrame, path: str | Path) -> None:
    """Write a table as UTF-8 CSV with formula-like text cells neutralised, atomically.

    Header cells and every text cell are checked (OWASP, "CSV Injection"); numbers stay
    numbers, so a negative value is written as a number, not as text. A carriage return inside
    a cell becomes a line feed: the cell is then quoted, so no reader can take what follows
    for the start of a new (formula) cell.
    """
    safe = frame.copy()
    safe.columns = [_export_cell(str(c)) for c in safe.columns]
    for position in range(safe.shape[1]):
        column = safe.iloc[:, position]
        dtype = column.dtype
        if dtype == object or pd.api.types.is_string_dtype(dtype) or \
                isinstance(dtype, pd.CategoricalDtype):
            safe.isetitem(position, column.astype(object).map(_export_cell))
    write_text_atomic(path, safe.to_csv(index=False, lineterminator="\n"))


# --- reading Prunella's own JSON files ------------------------------------------------------


def _refuse_constant(name: str):
    raise ValueError(f"{name} is not allowed")


def _finite_float(text: str) -> float:
    # A number too large for a float (1e999) would be read as infinity: refused as NaN is.
    value = float(text)
    if not math.isfinite(value):
        raise ValueError(f"the number {text[:20]} is too large (infinity is not allowed)")
    return value


def parse_format(value) -> tuple[str, int] | None:
    """('model', 1) from 'prunella-model/1'; None if the value is not a Prunella format."""
    if not isinstance(value, str):
        return None
    match = _FORMAT.match(value)
    return (match.group(1), int(match.group(2))) if match else None


def check_format(data, kind: str, versions: tuple[int, ...], name: str) -> int:
    """The format version of a parsed Prunella file of ``kind``; refuses anything else."""
    what = {"model": "model", "dictionary": "data dictionary", "project": "project"}.get(kind, kind)
    if not isinstance(data, dict):
        raise InputError(say("file.not_object", file=name, what=what))
    if "format" not in data:
        raise InputError(say("file.no_format", file=name, what=what))
    parsed = parse_format(data["format"])
    if parsed is None:
        raise InputError(say("file.bad_format", file=name, what=what,
                             found=str(data["format"])[:60]))
    found_kind, version = parsed
    if found_kind != kind:
        raise InputError(say("file.wrong_kind", file=name, what=what, found=found_kind))
    if version not in versions:
        newest = max(versions)
        key = "file.newer_version" if version > newest else "file.old_version"
        raise InputError(say(key, file=name, what=what, version=version,
                             readable=", ".join(f"prunella-{kind}/{v}" for v in versions)))
    return version


def read_json_document(path: str | Path, kind: str, versions: tuple[int, ...] = (1,)) -> dict:
    """Read one of Prunella's JSON files (``kind`` e.g. 'model', 'project') as plain data.

    Refuses, with a message saying what to do: a missing file, a folder, a file too large to be
    one of ours, text that is not UTF-8 or not JSON (with line and column), NaN/Infinity,
    nesting too deep to parse, anything that is not a JSON object, and unknown kinds or
    versions. Nothing in the file is ever executed.
    """
    path = Path(path)
    what = {"model": "model", "dictionary": "data dictionary", "project": "project"}.get(kind, kind)
    if not path.exists():
        raise InputError(say("file.missing", path=str(path), what=what))
    if path.is_dir():
        raise InputError(say("file.folder", path=str(path), what=what))
    if not path.is_file():  # a pipe or device never ends: refused before it is opened
        raise InputError(say("read.not_regular", file=path.name))
    size = path.stat().st_size
    if size > MAX_JSON_BYTES:
        raise InputError(say("file.too_big", file=path.name, what=what, mb=size // 2**20))
    raw = path.read_bytes()
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise InputError(say("file.not_json", file=path.name, what=what,
                             detail="it is not UTF-8 text")) from None
    try:
        data = json.loads(text, parse_constant=_refuse_constant, parse_float=_finite_float)
    except json.JSONDecodeError as exc:
        detail = f"line {exc.lineno}, column {exc.colno}: {exc.msg}"
        raise InputError(say("file.not_json", file=path.name, what=what, detail=detail)) from None
    except (ValueError, RecursionError) as exc:
        detail = str(exc) if isinstance(exc, ValueError) else "it is nested too deeply"
        raise InputError(say("file.not_json", file=path.name, what=what, detail=detail)) from None
    check_format(data, kind, versions, path.name)
    return data


# --- never writing over an input ----------------------------------------------------------


def _same_file(a: Path, b: Path) -> bool:
    """The same file by resolved path, or by identity (a hard link, a link to it)."""
    if a.resolve() == b.resolve():
        return True
    try:
        return a.exists() and b.exists() and os.path.samefile(a, b)
    except OSError:
        return False


def names_an_input(target: str | Path, *sources: str | Path | None) -> bool:
    """True if ``target`` is one of the existing input files (the same file by any path,
    a hard link or a symbolic link to it)."""
    return any(source and Path(source).exists() and _same_file(Path(target), Path(source))
               for source in sources)


def refuse_overwrite(target: str | None, *sources: str) -> None:
    """Refuse an output path that names one of the inputs."""
    if target is not None and names_an_input(target, *sources):
        raise InputError(say("cli.output_is_input", target=target))


def check_outputs(outputs: dict[str, str | None], inputs: list[str | None]) -> None:
    """Before any work: every output path (option name → path; None = not asked for) is a
    writable file name that is none of the inputs (data, dictionary, model, project, by any
    path) and none of the other outputs, so no input is ever written over and no output
    silently replaces another."""
    seen: dict[str, Path] = {}
    for option, target in outputs.items():
        if target is None:
            continue
        text = str(target)
        if not text.strip():
            raise InputError(say("file.output_empty", option=option))
        path = Path(text)
        if text.endswith(("/", os.sep)) or path.is_dir():
            raise InputError(say("file.output_is_folder", option=option, target=text))
        if path.is_symlink():
            raise InputError(say("file.output_is_link", option=option, target=text))
        if path.exists() and not path.is_file():
            raise InputError(say("file.output_not_regular", option=option, target=text))
        folder = path.parent if str(path.parent) else Path(".")
        if folder.exists() and not (folder.is_dir() and os.access(folder, os.W_OK | os.X_OK)):
            raise InputError(say("file.output_folder_closed", option=option, target=text,
                                 folder=str(folder)))
        if path.exists() and not os.access(path, os.W_OK):
            raise InputError(say("file.output_read_only", option=option, target=text))
        refuse_overwrite(text, *inputs)
        for other, earlier in seen.items():
            if _same_file(path, earlier):
                raise InputError(say("file.outputs_collide", first=other, second=option,
                                     target=text))
        seen[option] = path
