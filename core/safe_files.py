"""Writing files so that a crash never leaves a half-written one, reading Prunella's own files
without trusting them, and keeping exports inert.

Every file Prunella writes goes through here: the bytes go to a temporary file in the same
folder, are flushed to disk, and only then replace the target in one rename, so a kill at any
moment leaves either the old file or the new one. Prunella's own files (models, dictionaries,
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
from pathlib import Path

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
    return isinstance(value, (int, float)) and not isinstance(value, bool) and \
        math.isfinite(value)


def write_bytes_atomic(path: str | Path, data: bytes) -> None:
    """Replace ``path`` with ``data`` atomically (temporary file, fsync, rename). A write the
    system refuses (no room on the disk, no permission, a folder in the way) is said in one
    sentence; the temporary file is removed and the previous file stays as it was."""
    path = Path(path)
    try:
        _write_atomic(path, data)
    except OSError as error:
        raise InputError(say("file.not_written", target=str(path),
                             reason=error.strerror or type(error).__name__)) from None


def _write_atomic(path: Path, data: bytes) -> None:
    if path.is_dir():
        raise IsADirectoryError(21, "it is a folder", str(path))
    path.parent.mkdir(parents=True, exist_ok=True)
    handle, temp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(handle, "wb") as out:
            out.write(data)
            out.flush()
            os.fsync(out.fileno())
        os.replace(temp, path)
    except BaseException:
        try:
            os.unlink(temp)
        except FileNotFoundError:
            pass
        raise
    _sync_folder(path.parent)


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
        data = json.loads(text, parse_constant=_refuse_constant)
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
