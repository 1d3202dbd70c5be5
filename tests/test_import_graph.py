"""core imports in one direction: no module of core imports, however indirectly, itself.

The graph is built from the modules' own import statements with ``ast``: imports at the top,
imports inside functions (deferred), and imports under ``if TYPE_CHECKING:`` all count, and
relative imports are resolved against the module's package. Importing ``a.b.c`` also runs
``a/__init__.py`` and ``a/b/__init__.py``, so those count too.
"""

from __future__ import annotations

import ast
import importlib
from pathlib import Path

import pytest

CORE = Path(__file__).resolve().parents[1] / "core"
PACKAGES = sorted(p.parent.name for p in CORE.glob("*/__init__.py"))


def _module_name(path: Path) -> str:
    parts = list(path.relative_to(CORE.parent).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def _modules() -> dict[str, Path]:
    return {_module_name(p): p for p in sorted(CORE.rglob("*.py"))}


def _imports(name: str, path: Path, known: set[str]) -> set[str]:
    """The core modules that importing ``name`` runs, from its own import statements."""
    package = name if path.name == "__init__.py" else name.rsplit(".", 1)[0]
    targets: set[str] = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.Import):
            targets |= {alias.name for alias in node.names}
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")[: len(package.split(".")) - node.level + 1]
                module = ".".join(base + ([node.module] if node.module else []))
            else:
                module = node.module or ""
            targets.add(module)
            # "from package import module" imports that module as well.
            targets |= {f"{module}.{alias.name}" for alias in node.names
                        if f"{module}.{alias.name}" in known}
    found = set()
    for target in targets:
        parts = target.split(".")
        found |= {".".join(parts[:k]) for k in range(1, len(parts) + 1)} & known
    # A module's own packages are already being imported when it runs.
    own = {".".join(name.split(".")[:k]) for k in range(1, name.count(".") + 1)}
    return found - {name} - own


def import_graph() -> dict[str, set[str]]:
    modules = _modules()
    known = set(modules)
    return {name: _imports(name, path, known) for name, path in modules.items()}


def find_cycle(graph: dict[str, set[str]]) -> list[str] | None:
    """One import loop as [a, b, ..., a], or None."""
    state: dict[str, int] = {}  # 1 on the current path, 2 finished
    path: list[str] = []

    def visit(node: str) -> list[str] | None:
        state[node] = 1
        path.append(node)
        for nxt in sorted(graph.get(node, ())):
            if state.get(nxt) == 1:
                return path[path.index(nxt):] + [nxt]
            if nxt not in state:
                found = visit(nxt)
                if found:
                    return found
        path.pop()
        state[node] = 2
        return None

    for node in sorted(graph):
        if node not in state:
            found = visit(node)
            if found:
                return found
    return None


def test_the_graph_sees_every_kind_of_import():
    graph = import_graph()
    # deferred (inside a function), TYPE_CHECKING-only and relative imports are all edges
    assert "core.sizing.folds" in graph["core.design.guards"]  # deferred
    assert "core.report.contents" in graph["core.report.sections"]  # TYPE_CHECKING
    assert "core.data.reading_rules" in graph["core.data.xlsx"]  # relative
    assert "core.data" in graph["core.sizing.derivation"]  # core/data/__init__ runs first
    assert find_cycle({"a": {"b"}, "b": {"c"}, "c": {"a"}}) == ["a", "b", "c", "a"]
    assert find_cycle({"a": {"b"}, "b": set()}) is None


def test_core_has_no_import_loop():
    cycle = find_cycle(import_graph())
    assert cycle is None, "import loop in core: " + " -> ".join(cycle)


@pytest.mark.parametrize("package", PACKAGES)
def test_every_name_of_a_package_face_is_where_the_face_says(package):
    module = importlib.import_module(f"core.{package}")
    names = getattr(module, "__all__", ())
    assert names, f"core/{package}/__init__.py names no public face"
    modules = {p.stem for p in (CORE / package).iterdir() if p.suffix == ".py" or p.is_dir()}
    assert not set(names) & modules, "a face name that is also a module's name is hidden by it"
    for name in names:
        assert getattr(module, name) is not None, name
    first_line = (module.__doc__ or "").strip().split("\n")[0]
    assert first_line.endswith("."), f"core/{package}/__init__.py: say in a line what it is for"


def test_every_library_core_imports_is_declared_in_pyproject():
    """A library core imports itself is a dependency of its own, not one that another
    dependency happens to bring along."""
    import re
    import sys
    from importlib.metadata import packages_distributions

    pyproject = (CORE.parent / "pyproject.toml").read_text(encoding="utf-8")
    block = re.search(r"^dependencies = \[(.*?)^\]", pyproject, re.S | re.M).group(1)
    # An optional extra declares what core imports only when it is asked for (a cluster).
    block += re.search(r"^cluster = \[(.*?)^\]", pyproject, re.S | re.M).group(1)
    declared = {re.split(r"[<>=!~ ;\[]", line.strip().strip('",'))[0].lower()
                for line in block.splitlines() if line.strip().startswith('"')}
    imported = set()
    for path in CORE.rglob("*.py"):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.Import):
                imported |= {alias.name.split(".")[0] for alias in node.names}
            elif isinstance(node, ast.ImportFrom) and node.level == 0 and node.module:
                imported.add(node.module.split(".")[0])
    third_party = imported - set(sys.stdlib_module_names) - {"core", "__future__"}
    distributions = packages_distributions()
    missing = {name: distributions.get(name) for name in third_party
               if not {d.lower() for d in distributions.get(name, [name])} & declared}
    assert not missing, f"declare these in pyproject.toml's dependencies: {missing}"
