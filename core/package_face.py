"""A package's public face, loaded on first use.

Each package's ``__init__`` names what other packages and the app use from it, and the module
that defines each name. Nothing is imported until a name is asked for, so importing a package
(or any module inside it) loads nothing else: a command starts without the statistics
libraries it does not need, and a face can never close an import loop. Inside core, modules
import from the module that defines a name, never through a face.
"""

from __future__ import annotations

import importlib
import sys
from typing import Callable


def lazy_face(package: str, homes: dict[str, tuple[str, ...]],
              ) -> tuple[Callable[[str], object], Callable[[], list[str]], list[str]]:
    """``__getattr__``, ``__dir__`` and ``__all__`` for ``package`` whose public names live
    in the modules given (module name relative to the package → names defined there)."""
    where = {name: module for module, names in homes.items() for name in names}

    def __getattr__(name: str):
        if name not in where:
            raise AttributeError(f"module {package!r} has no attribute {name!r}")
        value = getattr(importlib.import_module(f"{package}.{where[name]}"), name)
        setattr(sys.modules[package], name, value)  # asked for once
        return value

    def __dir__() -> list[str]:
        return sorted(set(where) | set(vars(sys.modules[package])))

    return __getattr__, __dir__, sorted(where)
