"""The guard around gmsh's global state.

gmsh keeps one global state per process. All access goes through :func:`gmsh_session`, which
holds a lock, starts gmsh quietly and always finalises it, so repeated meshing in one process is
safe and parallel meshing runs in separate processes.
"""

from __future__ import annotations

import threading
from collections.abc import Iterator
from contextlib import contextmanager

import gmsh
import pygmsh

from ..errors import GeometryError

_GMSH_LOCK = threading.Lock()


@contextmanager
def gmsh_session() -> Iterator[None]:
    """Hold gmsh for the block: started quietly, finalised on leaving; gmsh's own failures
    become :class:`GeometryError`."""
    with _GMSH_LOCK, pygmsh.occ.Geometry():
        gmsh.option.setNumber("General.Terminal", 0)
        try:
            yield
        except GeometryError:
            raise
        except Exception as error:  # gmsh reports every failure as a bare Exception
            raise GeometryError(f"gmsh could not build or mesh the section: {error}") from None
