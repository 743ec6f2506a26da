"""One writer per results folder: a lock file beside the folder, held from the checks before
the solve until the folder is in place, so a second run into the same folder is refused
instead of silently replacing the first one's results.

The lock is ``.NAME.lock`` beside ``NAME``, locked with ``fcntl.flock`` where the system has
it (the lock dies with its process, even after ``kill -9``). Elsewhere the file is created
exclusively and holds the process id; one a killed run left is refused with a message
naming the file to delete (there is no safe test there that a process is gone).
While it holds the lock, a run removes the staging folders (``.NAME.XXXXXXXX.part``) and the
retired folder (``.NAME.old``) that an earlier, killed run of the same name left behind.
"""

from __future__ import annotations

import os
import re
import shutil
import threading
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path

from .errors import ResultsFolderExistsError

try:  # POSIX
    import fcntl
except ImportError:  # pragma: no cover - Windows
    fcntl = None

_HELD: dict[tuple[Path, int], int] = {}  # (folder, thread) held here → how many holders


def lock_path(folder: Path) -> Path:
    """The lock file of ``folder``: ``.NAME.lock`` beside it."""
    return folder.parent / f".{folder.name}.lock"


def leftovers(folder: Path) -> list[Path]:
    """Staging and retired folders an interrupted run of ``folder`` left beside it."""
    pattern = re.compile(re.escape(f".{folder.name}.") + r"(?:[a-z0-9_]{8}\.part|old)")
    if not folder.parent.is_dir():
        return []
    return sorted(
        entry
        for entry in folder.parent.iterdir()
        if pattern.fullmatch(entry.name) and entry.is_dir() and not entry.is_symlink()
    )


@contextmanager
def results_lock(folder: Path) -> Iterator[None]:
    """Hold the lock of results folder ``folder`` for the block (again, if already held by
    this process); its parent folder is made if missing, and removed again if left empty.

    Raises
    ------
    ResultsFolderExistsError
        If another process holds the lock.
    """
    folder = Path(os.path.abspath(folder))
    held = (folder, threading.get_ident())  # another thread locks like another process
    if held in _HELD:
        _HELD[held] += 1
        try:
            yield
        finally:
            _HELD[held] -= 1
        return
    made = _make_parents(folder.parent)
    try:
        handle = _acquire(lock_path(folder), folder)
        _HELD[held] = 1
        try:
            for stale in leftovers(folder):
                shutil.rmtree(stale, ignore_errors=True)
            yield
        finally:
            del _HELD[held]
            _release(lock_path(folder), handle)
    finally:
        for parent in made:  # innermost first; only folders this lock made, and only if empty
            try:
                parent.rmdir()
            except OSError:
                break


def _make_parents(parent: Path) -> list[Path]:
    missing = []
    while not parent.exists() and parent != parent.parent:
        missing.append(parent)
        parent = parent.parent
    for path in reversed(missing):
        path.mkdir(exist_ok=True)
    return missing


def _refused(folder: Path, lock: Path, holder: str) -> ResultsFolderExistsError:
    return ResultsFolderExistsError(
        f"another run is writing {str(folder)!r} ({holder} holds {lock.name} beside it); "
        "wait for it to end or choose another results folder"
    )


def _acquire(lock: Path, folder: Path) -> int:
    """The open, locked lock file's descriptor."""
    if fcntl is None:  # pragma: no cover - Windows
        return _acquire_exclusive(lock, folder)
    while True:
        handle = os.open(lock, os.O_RDWR | os.O_CREAT, 0o644)
        try:
            fcntl.flock(handle, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:
            holder = _holder(handle)
            os.close(handle)
            raise _refused(folder, lock, holder) from None
        try:
            same = os.fstat(handle).st_ino == os.stat(lock).st_ino
        except FileNotFoundError:
            same = False
        if same:  # not a file the previous holder removed while this one was opening it
            os.ftruncate(handle, 0)
            os.write(handle, f"{os.getpid()}\n".encode())
            return handle
        os.close(handle)


def _acquire_exclusive(lock: Path, folder: Path) -> int:  # pragma: no cover - Windows
    try:
        handle = os.open(lock, os.O_RDWR | os.O_CREAT | os.O_EXCL, 0o644)
    except FileExistsError:
        pid = _pid(lock.read_text(errors="replace"))
        holder = "another process" if pid is None else f"process {pid}"
        raise ResultsFolderExistsError(
            f"another run may be writing {str(folder)!r} ({holder} holds {lock.name} beside "
            "it); if none is, a killed run left it: delete that file"
        ) from None
    os.write(handle, f"{os.getpid()}\n".encode())
    return handle


def _release(lock: Path, handle: int) -> None:
    lock.unlink(missing_ok=True)  # before closing: a waiting run then sees a new file
    os.close(handle)


def _holder(handle: int) -> str:
    pid = _pid(os.pread(handle, 32, 0).decode(errors="replace"))
    return "another process" if pid is None else f"process {pid}"


def _pid(text: str) -> int | None:
    return int(text.strip()) if text.strip().isdigit() else None
