"""Checkpoints of a long run, so that a stopped run continues where it was.

While a case solves, the solver offers its state after every step (:data:`fem.stepper.Checkpoint`);
:class:`Checkpointer` keeps it at the case's interval (``[run] checkpoint_every``: wall-clock
time, or a number of steps) in one file beside the results folder, ``.NAME.checkpoint.npz``
(the staging folders beside it are removed by the next run; a checkpoint must outlive them).
The file is written whole under a temporary name and renamed, so a run killed while writing
it leaves the previous checkpoint. It holds the state's arrays and one JSON entry, ``meta``:
the format, the soakwise version, a SHA-256 of the case file's bytes, the time and step
reached, and the state's numbers with each array named by its entry.

:func:`read_checkpoint` refuses, with the reason, a checkpoint of another case file, another
soakwise version or another format. The command line removes the checkpoint once the results
folder is in place.
"""

from __future__ import annotations

import hashlib
import json
import re
import time as clock
import warnings
import zipfile
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from .errors import AdvisorError
from .writers.atomic import atomic_path
from .writers.version import soakwise_version

FORMAT = 1
DEFAULT_SECONDS = 30.0  # wall-clock time between checkpoints when a case does not say
WRITING_SHARE = 10.0  # wall-clock intervals are at least this many times a checkpoint's writing


@dataclass(frozen=True)
class CheckpointEvery:
    """How often a run keeps a checkpoint: every ``seconds`` of wall-clock time, or every
    ``steps`` steps (one of the two)."""

    seconds: float | None = None
    steps: int | None = None

    def describe(self) -> str:
        if self.steps is not None:
            return f"every {self.steps} steps"
        return f"every {self.seconds:g} s of wall-clock time"


DEFAULT_EVERY = CheckpointEvery(seconds=DEFAULT_SECONDS)


def checkpoint_path(folder: Path) -> Path:
    """Where the checkpoint of results folder ``folder`` is kept: ``.NAME.checkpoint.npz``
    beside it."""
    folder = Path(folder)
    return folder.parent / f".{folder.name}.checkpoint.npz"


def case_fingerprint(data: bytes) -> str:
    """The SHA-256 of a case file's bytes, hexadecimal: a checkpoint belongs to these bytes."""
    return hashlib.sha256(data).hexdigest()


class Checkpointer:
    """The solver's ``checkpoint`` callback: writes the offered state when it is due.

    Parameters
    ----------
    path : path
        The checkpoint file (:func:`checkpoint_path`).
    fingerprint : str
        :func:`case_fingerprint` of the case file.
    every : CheckpointEvery
        The interval.
    end_time : float
        The run's end time, s (kept for messages).
    monotonic : callable
        The wall clock, s (tests give their own).

    Attributes
    ----------
    saved_time : float or None
        The run's time at the last checkpoint written (or read to resume from), s.
    """

    def __init__(
        self,
        path: Path,
        fingerprint: str,
        every: CheckpointEvery,
        end_time: float,
        monotonic: Callable[[], float] = clock.monotonic,
    ):
        self.path, self.fingerprint, self.every = Path(path), fingerprint, every
        self.end_time = end_time
        self._monotonic = monotonic
        self._last_wall = 0.0
        self._last_steps: int | None = None
        self._wait = every.seconds
        self.saved_time: float | None = None
        self.failed = False  # a write failed: no more checkpoints this run

    def __call__(self, time: float, steps: int, snapshot: Callable[[], dict]) -> None:
        if self.failed or time >= self.end_time * (1 - 1e-12):
            return
        if self._last_steps is None:  # the first step offered (after a resume, too): the
            self._last_steps = steps - 1  # intervals count from here, not from meshing
            self._last_wall = self._monotonic()
        if self.every.steps is not None:
            due = steps - self._last_steps >= self.every.steps
        else:
            due = self._monotonic() - self._last_wall >= self._wait
        if not due:
            return
        started = self._monotonic()
        try:
            write_checkpoint(self.path, snapshot(), self.fingerprint, time, steps, self.end_time)
        except OSError as error:  # a checkpoint is a safeguard: the run goes on without it
            self.failed = True
            reason = error.strerror or error
            warnings.warn(
                f"no checkpoint could be written to {str(self.path)!r} ({reason}); the run "
                "continues without checkpoints",
                stacklevel=2,
            )
            return
        self.saved_time = time
        self._last_wall, self._last_steps = self._monotonic(), steps
        if self.every.seconds is not None:  # a large field series takes time to write:
            cost = self._last_wall - started  # checkpoints take at most a tenth of the run
            self._wait = max(self.every.seconds, WRITING_SHARE * cost)


def write_checkpoint(
    path: Path, state: dict, fingerprint: str, time: float, steps: int, end_time: float
) -> None:
    """Write ``state`` (nested dicts and lists of numbers, strings, None and arrays) to
    ``path`` atomically, with what :func:`read_checkpoint` checks."""
    arrays: dict[str, np.ndarray] = {}
    meta = {
        "format": FORMAT,
        "written_by": soakwise_version(),
        "case_sha256": fingerprint,
        "time": float(time),
        "steps": int(steps),
        "end_time": float(end_time),
        "state": _flatten(state, arrays),
    }
    with atomic_path(Path(path)) as temporary, open(temporary, "wb") as stream:
        np.savez(stream, meta=np.array(json.dumps(meta)), **arrays)


def read_checkpoint(path: Path, fingerprint: str) -> tuple[dict, float]:
    """The state kept in checkpoint ``path`` and the run's time it was taken at, s.

    Raises
    ------
    AdvisorError
        When there is none, it cannot be read, or it belongs to another case file, soakwise
        version or format; the message says which and what to do.
    """
    path = Path(path)
    shown = repr(str(path))
    if not path.is_file():
        raise AdvisorError(f"nothing to resume: there is no checkpoint {shown}")
    try:
        with np.load(path, allow_pickle=False) as stored:
            meta = json.loads(str(stored["meta"]))
            arrays = {name: stored[name] for name in stored.files if name != "meta"}
    except (OSError, ValueError, KeyError, zipfile.BadZipFile) as error:
        raise AdvisorError(
            f"checkpoint {shown} cannot be read ({error}); delete it and run from the start"
        ) from None
    again = "; delete it and run from the start"
    if not isinstance(meta, dict) or meta.get("format") != FORMAT:
        raise AdvisorError(f"checkpoint {shown} is of another format{again}")
    if meta.get("written_by") != soakwise_version():
        raise AdvisorError(
            f"checkpoint {shown} was written by soakwise {meta.get('written_by')}, this is "
            f"soakwise {soakwise_version()}: a run continues only with the version that "
            f"began it{again}"
        )
    if meta.get("case_sha256") != fingerprint:
        raise AdvisorError(
            f"checkpoint {shown} belongs to another case file (or to this one before it was "
            f"changed): a run continues only from its own case, unchanged{again}"
        )
    try:
        return _unflatten(meta["state"], arrays), float(meta["time"])
    except (KeyError, TypeError, ValueError) as error:
        raise AdvisorError(f"checkpoint {shown} is incomplete ({error}){again}") from None


def remove_checkpoint(path: Path) -> None:
    """Remove checkpoint ``path`` if it exists."""
    Path(path).unlink(missing_ok=True)


def remove_unfinished(path: Path) -> None:
    """Remove the temporary files of checkpoint ``path`` that a run killed while writing it
    left (``.NAME.XXXXXXXX.part`` beside it; the checkpoint itself is whole or absent)."""
    path = Path(path)
    pattern = re.compile(re.escape(f".{path.name}.") + r"[a-z0-9_]{8}\.part")
    if path.parent.is_dir():
        for entry in path.parent.iterdir():
            if pattern.fullmatch(entry.name) and entry.is_file() and not entry.is_symlink():
                entry.unlink(missing_ok=True)


def _flatten(value, arrays: dict[str, np.ndarray]):
    """``value`` as JSON-ready data, its arrays moved to ``arrays`` under names "a<k>"."""
    if isinstance(value, dict):
        return {"dict": {str(k): _flatten(v, arrays) for k, v in value.items()}}
    if isinstance(value, list | tuple):
        return {"list": [_flatten(v, arrays) for v in value]}
    if isinstance(value, np.ndarray):
        name = f"a{len(arrays)}"
        arrays[name] = value
        return {"array": name}
    if isinstance(value, np.generic):
        return value.item()
    if value is None or isinstance(value, bool | int | float | str):
        return value
    raise TypeError(f"a checkpoint cannot hold {type(value).__name__}")


def _unflatten(value, arrays: dict[str, np.ndarray]):
    if isinstance(value, dict):
        if "array" in value:
            return arrays[value["array"]]
        if "list" in value:
            return [_unflatten(v, arrays) for v in value["list"]]
        return {k: _unflatten(v, arrays) for k, v in value["dict"].items()}
    return value
