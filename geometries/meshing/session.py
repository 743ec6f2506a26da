"""The guard around gmsh's global state.

gmsh keeps one global state per process. All access goes through :func:`gmsh_session`, which
holds a lock, starts gmsh quietly and always finalises it, so repeated meshing in one process is
safe and parallel meshing runs in separate processes.

gmsh's API is used directly (pygmsh's session falls short here): gmsh sets its own interrupt
handler when it starts, which only the main thread may do and which ``finalize`` does not undo.
Off the main thread (a dask worker's task) it starts without one; on the main thread the
handler that was there before is put back, so Ctrl-C keeps working after meshing.
"""

from __future__ import annotations

import signal
import threading
from collections.abc import Iterator
from contextlib import contextmanager

import gmsh

from ..errors import GeometryError

_GMSH_LOCK = threading.Lock()


@contextmanager
def gmsh_session() -> Iterator[None]:
    """Hold gmsh for the block: started quietly, finalised on leaving; gmsh's own failures
    become :class:`GeometryError`."""
    main_thread = threading.current_thread() is threading.main_thread()
    with _GMSH_LOCK:
        handler = signal.getsignal(signal.SIGINT) if main_thread else None
        gmsh.initialize([], interruptible=main_thread)
        try:
            gmsh.option.setNumber("General.Terminal", 0)
            gmsh.model.add("section")
            yield
        except GeometryError:
            raise
        except Exception as error:  # gmsh reports every failure as a bare Exception
            raise GeometryError(f"gmsh could not build or mesh the section: {error}") from None
        finally:
            gmsh.finalize()
            if main_thread and handler is not None:
                signal.signal(signal.SIGINT, handler)
