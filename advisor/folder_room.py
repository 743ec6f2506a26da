"""Can a results folder be written where asked: a folder this process may write in, with
room for the results (an upper estimate of their size), found before the solve; and an
operating-system error on the way said in a few words."""

from __future__ import annotations

import errno
import math
import os
import shutil
import tempfile
from pathlib import Path

# Sizes of a results folder, measured on the quench-bar starter (753 nodes, 51 output times:
# plots and report 2.3 MB, fields 3.9 MB, about 100 bytes a node a frame with the XDMF copy,
# a GIF frame 5 kB; at 43 nodes 7.5 kB a frame), rounded up: an estimate to refuse a run
# whose results cannot fit.
FIXED_BYTES = 4_000_000
FIELD_BYTES_PER_NODE = 120
FIELD_BYTES_PER_FRAME = 10_000  # a frame's headers and its entries in the series' indexes
ANIMATION_BYTES_PER_FRAME = 20_000


class CannotWriteError(OSError):
    """The results cannot be written where asked: no permission, not a folder, or no room.
    The message says which, with the figures; nothing was written."""


def expected_size(nodes: int, outputs: int, *, vtk: bool = True, animation: bool = True) -> int:
    """An upper estimate of a results folder's size in bytes, for ``nodes`` mesh nodes and
    ``outputs`` output times (see the measured sizes above)."""
    size = FIXED_BYTES
    if vtk:
        size += (FIELD_BYTES_PER_FRAME + FIELD_BYTES_PER_NODE * nodes) * outputs
    if animation:
        size += ANIMATION_BYTES_PER_FRAME * outputs
    return size


def check_can_write(folder: Path, expected_bytes: int | None = None) -> None:
    """Check, before a solve, that results folder ``folder`` can be made: the nearest existing
    folder on its path is a folder this process may write in and, with ``expected_bytes``,
    has that much room.

    Raises
    ------
    CannotWriteError
        With the reason and the figures; nothing is changed.
    """
    folder = Path(os.path.abspath(folder))
    where = folder.parent
    while not where.exists() and not where.is_symlink() and where != where.parent:
        where = where.parent
    if not where.is_dir():
        raise CannotWriteError(
            f"cannot write {str(folder)!r}: {str(where)!r} is a file, not a folder"
        )
    try:
        with tempfile.TemporaryFile(dir=where, prefix=".soakwise-probe."):
            pass
    except OSError as error:
        raise CannotWriteError(
            f"cannot write in {str(where)!r} ({error.strerror or error}); choose a results "
            "folder (--out) where you may write"
        ) from None
    if expected_bytes is None:
        return
    free = shutil.disk_usage(where).free
    if free < expected_bytes:
        raise CannotWriteError(
            f"not enough room for the results in {str(where)!r}: about "
            f"{_megabytes(expected_bytes)} expected, {_megabytes(free)} free; free some space, "
            "choose another folder (--out) or turn outputs off ([outputs] vtk = false, "
            "animation = false)"
        )


def check_room(folder: Path, model, end_time: float, run_options: dict, outputs: dict) -> None:
    """:func:`check_can_write` with the expected size of the results of ``model`` (a
    :class:`fem.ThermalModel`) run to ``end_time`` s with a case's run options and
    ``[outputs]`` choices."""
    if run_options.get("output_times") is not None:
        count = len(tuple(run_options["output_times"])) + 1
    else:
        interval = run_options.get("output_interval") or end_time / 50
        count = math.floor(end_time / interval + 1e-9) + 2
    nodes = int(model.section.mesh.p.shape[1])
    size = expected_size(
        nodes, count, vtk=outputs.get("vtk", True), animation=outputs.get("animation", True)
    )
    check_can_write(folder, size)


def _megabytes(size: float) -> str:
    return f"{math.ceil(size / 1e5) / 10:g} MB"


def error_words(error: OSError) -> str:
    """An operating-system error in a few words: "No space left on device" or the like."""
    if isinstance(error, CannotWriteError):
        return str(error)
    if error.errno in (errno.ENOSPC, getattr(errno, "EDQUOT", errno.ENOSPC)):
        return "no space left on the device"
    return error.strerror or str(error).splitlines()[0][:200]
