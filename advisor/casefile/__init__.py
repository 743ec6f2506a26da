"""Case files: TOML tables read into a :class:`Case`, with key paths, lines and suggestions in
every error; quantities with units; the starting cases of ``soakwise new``.

Rooms: :mod:`.reader` (tables with key paths and lines), :mod:`.schema` (the kinds of shape,
condition and schedule as tables), :mod:`.validation` (the library's errors mapped to key
paths), :mod:`.sections`, :mod:`.shapes`, :mod:`.materials`, :mod:`.conditions`,
:mod:`.options` (run, advisor, outputs), :mod:`.case` (the Case and ``load_case``),
:mod:`.units` and :mod:`.starters`.

The names below are loaded on first use, so that ``advisor.casefile.starters`` (read by the
command line to list its choices) does not load pint, numpy or the solver.
"""

from __future__ import annotations

__all__ = ["Case", "CaseError", "case_from_data", "case_from_toml", "load_case"]


def __getattr__(name: str):
    if name in __all__:
        from . import case

        return getattr(case, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
