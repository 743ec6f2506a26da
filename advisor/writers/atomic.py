"""Write files so that an interrupted run never leaves a half-written one behind."""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path


@contextmanager
def atomic_path(path: Path) -> Iterator[Path]:
    """Yield a temporary path beside ``path``; on success rename it to ``path``."""
    path = Path(path)
    handle, temporary = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name}.", suffix=".part")
    os.close(handle)
    temporary = Path(temporary)
    try:
        yield temporary
        os.chmod(temporary, 0o644)  # mkstemp makes files private; results are for sharing
        os.replace(temporary, path)
    finally:
        temporary.unlink(missing_ok=True)


def write_text(path: Path, text: str) -> None:
    """Write ``text`` (UTF-8) to ``path`` atomically."""
    with atomic_path(path) as temporary:
        temporary.write_text(text, encoding="utf-8")


def write_with(path: Path, writer: Callable[[Path], None]) -> None:
    """Call ``writer(temporary_path)`` and move the result to ``path`` atomically."""
    with atomic_path(path) as temporary:
        writer(temporary)
