"""Public names of a package loaded on first use, so importing the package (and the command
line's help) loads nothing heavy: a package's ``__getattr__`` and ``__dir__`` from its table
of name → module."""

from __future__ import annotations

import sys
from collections.abc import Callable, Mapping
from importlib import import_module


def lazy_names(package: str, where: Mapping[str, str]) -> tuple[Callable, Callable]:
    """``(__getattr__, __dir__)`` for ``package`` (its ``__name__``), whose public names live
    in the modules ``where`` maps them to (relative, such as ``".assessment"``). A name is
    imported once and kept in the package, so later look-ups do not come here."""

    def load(name: str):
        module = where.get(name)
        if module is None:
            raise AttributeError(f"module {package!r} has no attribute {name!r}")
        value = getattr(import_module(module, package), name)
        setattr(sys.modules[package], name, value)
        return value

    def names() -> list[str]:
        return sorted({*vars(sys.modules[package]), *where})

    return load, names
