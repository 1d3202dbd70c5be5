"""The project file: everything needed to redo a piece of work exactly, as versioned JSON.

A project names its data file (with the SHA-256 of its bytes, so a changed file is noticed),
holds the data dictionary, the derivation request (outcome, predictors, growth and
cross-validation settings, seed), the chosen size and the chart options. It holds no patient
data and no fitted objects: reopening reads the data again and recomputes, and the saved model
fingerprint says whether the recomputed tree is the same one.

Files are written atomically through core.safe_files, carry ``"format": "prunella-project/N"``,
and older layouts are upgraded step by step (:func:`upgrade_project`).
"""

from __future__ import annotations

import json
import os
from dataclasses import dataclass, field, replace
from pathlib import Path

from .. import __version__
from ..chart.options import ChartOptions
from ..data.table import file_sha256
from ..dictionary.columns import DataDictionary
from ..errors import InputError
from ..messages.message import say
from ..safe_files import check_format, read_json_document, write_text_atomic
from ..sizing.request import DerivationRequest
from .file_checks import check_project_document

PROJECT_FORMAT = "prunella-project/1"
PROJECT_SUFFIX = ".prunella"
CURRENT_VERSION = 1


@dataclass(frozen=True)
class Project:
    """One piece of work: which data, described how, analysed with which settings."""

    data_path: str | None = None  # absolute path of the data file when saved
    data_sheet: str | None = None
    data_sha256: str | None = None
    dictionary: DataDictionary | None = None
    request: DerivationRequest | None = None
    size: str | int = "1se"  # "1se", "min" or a number of leaves
    chart: dict = field(default_factory=dict)  # title, subtitle, paper, orientation, min_text, form
    model_fingerprint: str | None = None  # of the tree chosen when saved

    @property
    def seed(self) -> int | None:
        return None if self.request is None else self.request.cv.seed

    def to_dict(self, project_path: str | Path | None = None) -> dict:
        """The JSON-ready form; the data path is also stored relative to the project file."""
        data: dict = {"format": PROJECT_FORMAT, "saved_by": f"Prunella {__version__}"}
        if self.data_path is not None:
            entry = {"path": str(self.data_path), "sheet": self.data_sheet,
                     "sha256": self.data_sha256}
            if project_path is not None:
                try:
                    entry["relative_path"] = os.path.relpath(
                        Path(self.data_path).resolve(), Path(project_path).resolve().parent)
                except ValueError:  # another drive on Windows: no relative path
                    pass
            data["data"] = entry
        else:
            data["data"] = None
        data["dictionary"] = None if self.dictionary is None else self.dictionary.to_dict()
        data["request"] = None if self.request is None else self.request.to_dict()
        data["seed"] = self.seed
        data["size"] = self.size
        data["chart"] = dict(self.chart)
        data["model_fingerprint"] = self.model_fingerprint
        return data

    @classmethod
    def from_dict(cls, data: dict, project_path: str | Path | None = None) -> "Project":
        """Read a project dict of any known version (older ones are upgraded first); fields
        of the wrong type or value are refused naming the field (core/project/file_checks.py)."""
        name = Path(project_path).name if project_path else "(not saved)"
        data = upgrade_project(data, name)
        check_project_document(data, name)
        try:
            entry = data.get("data")
            data_path = sheet = sha = None
            if entry is not None:
                data_path = _resolve_data_path(entry, project_path)
                sheet = entry.get("sheet")
                sha = entry.get("sha256")
            dictionary = (None if data.get("dictionary") is None
                          else DataDictionary.from_dict(data["dictionary"],
                                                        f"The data dictionary in {name}"))
            request = (None if data.get("request") is None
                       else DerivationRequest.from_dict(data["request"]))
            size = data.get("size", "1se")
            chart = data.get("chart") or {}
            seed = data.get("seed")
        except InputError as exc:
            raise InputError(say("project.damaged", file=name, where="its contents",
                                 problem=str(exc))) from None
        except (KeyError, TypeError, ValueError, AttributeError) as exc:
            raise InputError(say("project.damaged", file=name, where="its contents",
                                 problem=f"{type(exc).__name__}: {exc}")) from None
        if request is not None and seed is not None and seed != request.cv.seed:
            raise InputError(say("project.seed_mismatch", file=name, seed=seed,
                                 settings_seed=request.cv.seed))
        return cls(data_path=data_path, data_sheet=sheet, data_sha256=sha,
                   dictionary=dictionary, request=request, size=size, chart=dict(chart),
                   model_fingerprint=data.get("model_fingerprint"))

    def with_seed(self, seed: int) -> "Project":
        """The same project with one seed for growing and for the fold plan."""
        if self.request is None:
            return self
        request = replace(self.request, tree=replace(self.request.tree, seed=seed),
                          cv=replace(self.request.cv, seed=seed))
        return replace(self, request=request)


CHART_FIELDS = ("title", "subtitle", "paper", "orientation", "min_text", "form",
                "show_file_name")  # kept in a project


def chart_options(chart: dict) -> ChartOptions:
    """A project's chart settings as the chart's own options (absent: the chart's default)."""
    return ChartOptions(**{k: chart[k] for k in CHART_FIELDS if chart.get(k) is not None})


def chart_settings(options: ChartOptions) -> dict:
    """The chart options a project keeps, as its file stores them."""
    return {k: getattr(options, k) for k in CHART_FIELDS}


def _resolve_data_path(entry: dict, project_path: str | Path | None) -> str:
    """The data file: beside the project (relative path) if it is there, else the saved path."""
    saved = entry["path"]
    relative = entry.get("relative_path")
    if relative and project_path is not None:
        candidate = (Path(project_path).resolve().parent / relative).resolve()
        if candidate.exists():
            return str(candidate)
    return saved


def save_project(project: Project, path: str | Path) -> None:
    """Write the project as UTF-8 JSON, atomically (the old file survives a crash mid-save)."""
    text = json.dumps(project.to_dict(path), indent=2, ensure_ascii=False, allow_nan=False)
    write_text_atomic(path, text + "\n")


def load_project(path: str | Path) -> Project:
    """Read a project file; anything that is not a readable Prunella project is refused.

    The file is read as data only (core.safe_files.read_json_document): a missing file, a
    folder, text that is not JSON, NaN or Infinity, nesting too deep, another kind of file or
    an unknown version each get one message saying what to do."""
    path = Path(path)
    data = read_json_document(path, "project", READABLE_VERSIONS)
    return Project.from_dict(data, project_path=path)


# --- versions -------------------------------------------------------------------------------


def project_version(data: dict, name: str = "This file") -> int:
    """The layout version of a project dict; refuses anything that is not a Prunella project
    of a layout this version reads (``name`` names the file in the message)."""
    return check_format(data, "project", READABLE_VERSIONS, name)


def upgrade_project(data: dict, name: str = "This file") -> dict:
    """Bring a project dict of any known layout up to the current one, step by step."""
    version = project_version(data, name)
    while version < CURRENT_VERSION:
        data = _UPGRADES[version](data)
        version = project_version(data, name)
    return data


def _upgrade_0_to_1(data: dict) -> dict:
    """Layout 0 (the pre-release draft) kept everything flat: data_file, data_sha256,
    dictionary, settings (a DerivationRequest dict), leaves and chart_title. Layout 1 groups
    the data entry, names the size and keeps all chart options together."""
    try:
        settings = data.get("settings")
        leaves = data.get("leaves", "1se")
        upgraded = {
            "format": "prunella-project/1",
            "saved_by": data.get("saved_by", "Prunella (draft layout)"),
            "data": None if data.get("data_file") is None else {
                "path": data["data_file"], "sheet": data.get("sheet"),
                "sha256": data.get("data_sha256"),
                # The draft wrote paths as given; a relative one meant "beside the project".
                **({} if os.path.isabs(data["data_file"])
                   else {"relative_path": data["data_file"]})},
            "dictionary": data.get("dictionary"),
            "request": settings,
            "seed": None if settings is None else settings.get("cv", {}).get("seed", 0),
            "size": leaves,
            "chart": {"title": data["chart_title"]} if data.get("chart_title") else {},
            "model_fingerprint": None,
        }
    except (AttributeError, TypeError, KeyError) as exc:
        raise InputError(say("project.draft_damaged", problem=f"{type(exc).__name__}: {exc}")
                         ) from None
    return upgraded


_UPGRADES = {0: _upgrade_0_to_1}
READABLE_VERSIONS = tuple(sorted(_UPGRADES)) + (CURRENT_VERSION,)


# --- the data file --------------------------------------------------------------------------


@dataclass(frozen=True)
class DataCheck:
    """Whether the project's data file is still there and still the same bytes."""

    path: str
    exists: bool
    same: bool
    saved_sha256: str | None
    current_sha256: str | None

    @property
    def message(self) -> str:
        name = Path(self.path).name
        if not self.exists:
            return say("project.data_missing", file=name, path=self.path)
        if self.saved_sha256 is None:
            return say("project.no_fingerprint", file=name)
        if not self.same:
            return say("project.data_changed", file=name, saved=self.saved_sha256[:12],
                       now=self.current_sha256[:12])
        return say("project.data_same", file=name)


def check_data_file(project: Project, path: str | Path | None = None) -> DataCheck:
    """Compare the data file's SHA-256 with the one saved in the project."""
    path = str(path or project.data_path)
    if not Path(path).is_file():
        return DataCheck(path, False, False, project.data_sha256, None)
    current = file_sha256(path)
    return DataCheck(path, True, current == project.data_sha256, project.data_sha256, current)
