"""What runs on a worker: one study case, from its :class:`Case` to its scalar answers.

A worker process keeps the meshes it has made (a few, keyed by the section and the mesh
options), so the cases of one geometry are meshed once per process, and the last system
assembled on each, so cases that differ only in coefficients are assembled once too; the
study sends cases of the same geometry together. Nothing but the case goes in and plain
answers come out: no factorisation or field crosses between processes.
"""

from __future__ import annotations

import hashlib
import pickle
import time
import traceback
from collections import OrderedDict
from dataclasses import dataclass, replace
from pathlib import Path

MESHES_KEPT = 8
_meshes: OrderedDict[str, object] = OrderedDict()
_systems: OrderedDict[int, object] = OrderedDict()  # by the id of a kept mesh's section


@dataclass(frozen=True)
class CaseTask:
    """One case of a study, as sent to a worker.

    Attributes
    ----------
    case_id : int
        The case's place in the study.
    case : advisor.casefile.Case
        The loaded case (it pickles).
    folder : str or None
        Write the case's results folder here (only when asked for).
    """

    case_id: int
    case: object
    folder: str | None = None


def run_study_case(task: CaseTask) -> dict:
    """Run one case; return ``{"case_id", "answers", "error", "wall_seconds"}``.

    A failure of the case (bad input found at solve time, a solver failure) is returned as
    its message, with the last line of the traceback's location, so the study goes on.
    """
    from ..pipeline import run_case, write_results
    from .answers import answers

    started = time.perf_counter()
    try:
        results = run_case(with_shared_mesh(task.case), system_for=shared_system)
        found = answers(results)
        if task.folder is not None:
            write_results(results, Path(task.folder), force=True)
        error = None
    except Exception as failure:  # the study records any failure of one case and goes on
        found = None
        where = traceback.extract_tb(failure.__traceback__)[-1]
        error = (
            f"{type(failure).__name__}: {failure} (at {Path(where.filename).name}:{where.lineno})"
        )
    return {
        "case_id": task.case_id,
        "answers": found,
        "error": error,
        "wall_seconds": time.perf_counter() - started,
    }


def warm_up() -> None:
    """Import what a case needs (the solver, the mesher), so the first case does not wait."""
    import skfem  # noqa: F401

    import geometries.meshing  # noqa: F401 - gmsh

    from .. import pipeline  # noqa: F401
    from ..analysis import assessment  # noqa: F401


def with_shared_mesh(case):
    """``case`` with its section's mesh taken from this process's meshes, or made and kept."""
    if case.imported is not None or case.section is None:
        return case
    try:
        key = hashlib.sha256(pickle.dumps((case.section, case.mesh_options))).hexdigest()
    except Exception:  # a section that does not pickle is meshed as usual
        return case
    mesh = _meshes.get(key)
    if mesh is None:
        options = dict(case.mesh_options)
        mesh = case.section.mesh(options.pop("size"), **options)
        _meshes[key] = mesh
        while len(_meshes) > MESHES_KEPT:
            _meshes.popitem(last=False)
    else:
        _meshes.move_to_end(key)
    return replace(case, imported=mesh)


def shared_system(model):
    """An assembled system for ``model``: this process's last one for the same mesh when its
    matrices apply (cases that differ only in coefficients, ambients, sources or the initial
    state), else a new one, kept for the next case."""
    from fem import ModelError, assemble

    key = id(model.section)
    kept = _systems.get(key)
    if kept is not None:
        try:
            return kept.for_model(model)
        except ModelError:  # another material, order or pattern of conditions
            pass
    system = assemble(model)
    _systems[key] = system
    _systems.move_to_end(key)
    while len(_systems) > MESHES_KEPT:
        _systems.popitem(last=False)
    return system
