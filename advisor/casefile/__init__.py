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

from ..lazy_names import lazy_names

__all__ = ["Case", "CaseError", "case_from_data", "case_from_toml", "load_case"]

__getattr__, __dir__ = lazy_names(__name__, dict.fromkeys(__all__, ".case"))
