"""Studies: many runs of one case file with some keys varied — sweeps, grids and samples of
uncertain inputs — on local worker processes or a dask.distributed cluster, kept in an SQLite
store that is also the record for resuming.

Rooms: :mod:`.spec` (the ``[study]`` table and ``--vary``), :mod:`.sampling` (distributions,
random and Latin-hypercube draws), :mod:`.values` (quantities with units), :mod:`.cases` (the
overrides applied and every case checked), :mod:`.worker` (one case on a worker, meshes shared
within a process), :mod:`.engines` (where cases run), :mod:`.store` (the database),
:mod:`.answers` (the scalar answers of a run), :mod:`.tables` (the table: CSV, Parquet,
pandas; ``read_study``) and :mod:`.study` (``sweep`` and the running of a study).

The names below load on first use, so ``import advisor`` stays light.
"""

from __future__ import annotations

from ..lazy_names import lazy_names

__all__ = [
    "ANSWER_COLUMNS",
    "StudyError",
    "StudyProgress",
    "StudyStore",
    "plan_study",
    "read_spec",
    "run_study",
    "read_study",
    "sweep",
]

_WHERE = {
    "ANSWER_COLUMNS": "answers",
    "StudyError": "store",
    "StudyStore": "store",
    "StudyProgress": "study",
    "plan_study": "study",
    "read_spec": "study",
    "run_study": "study",
    "sweep": "study",
    "read_study": "tables",
}

__getattr__, __dir__ = lazy_names(__name__, {k: f".{v}" for k, v in _WHERE.items()})
