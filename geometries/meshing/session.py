"""The guard around gmsh's global state.

gmsh keeps one global state per process. All access goes through :func:`gmsh_session`, which
holds a lock, starts gmsh quietly and always finalises it, so repeated meshing in one process is
safe and parallel meshing runs in separate processes.

gmsh's API is used directly (pygmsh's session falls short here). gmsh starts without its own
interrupt handler: with it, Ctrl-C during meshing ended the process at once (no message, the
results folder's lock left behind), and a run started with Ctrl-C ignored (a background job)
could be ended by it all the same. Without it, Python's handler stays and the interruption is
raised when gmsh returns. gmsh's start still sets some handlers at the system level; on the
main thread those that were there before (SIGINT, SIGTERM) are put back, and so is Python's
SIGPIPE (ignored, so a write to a closed pipe is a ``BrokenPipeError``), which gmsh's start sets
back to ending the process at once.
"""

from __future__ import annotations

import signal
import threading
from collections.abc import Iterator
from contextlib import contextmanager

import gmsh

from ..errors import GeometryError

_GMSH_LOCK = threading.Lock()
_GUARDED = (signal.SIGINT, signal.SIGTERM, getattr(signal, "SIGPIPE", None))  # none on Windows


@contextmanager
def gmsh_session() -> Iterator[None]:
    """Hold gmsh for the block: started quietly, finalised on leaving; gmsh's own failures
    become :class:`GeometryError`."""
    main_thread = threading.current_thread() is threading.main_thread()
    with _GMSH_LOCK:
        # gmsh installs its own handlers at the system level; Python's are put back after it
        handlers = (
            {sig: signal.getsignal(sig) for sig in _GUARDED if sig is not None}
            if main_thread
            else {}
        )
        gmsh.initialize([], interruptible=False)
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
            for sig, handler in handlers.items():
                if handler is not None:
                    signal.signal(sig, handler)
