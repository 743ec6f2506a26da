"""Where a run keeps its output fields: in memory, or written to disk as they are produced."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

import numpy as np


class FieldSeries:
    """Temperature fields (°C at the mesh vertices) at the output times.

    Behaves as a read-only sequence of arrays: ``len``, indexing, iteration and
    ``np.asarray`` (which stacks them, shape (n_outputs, n_vertices)). With ``folder`` set,
    each field is written to ``folder/field_NNNNN.npy`` when it is added (atomically) and read
    back on access, so a run never holds more than one field in memory.

    Parameters
    ----------
    folder : str or Path, optional
        Directory for the fields; created if missing. ``None`` keeps them in memory.
    """

    def __init__(self, folder: str | Path | None = None):
        self._folder = None if folder is None else Path(folder)
        if self._folder is not None:
            self._folder.mkdir(parents=True, exist_ok=True)
        self._items: list[np.ndarray | Path] = []

    @property
    def folder(self) -> Path | None:
        return self._folder

    def append(self, field: np.ndarray) -> None:
        if self._folder is None:
            self._items.append(np.array(field, dtype=float))  # kept: a copy of its own
            return
        field = np.asarray(field, dtype=float)  # written now: no copy needed
        path = self._folder / f"field_{len(self._items):05d}.npy"
        handle, temporary = tempfile.mkstemp(dir=self._folder, suffix=".npy.part")
        with os.fdopen(handle, "wb") as stream:
            np.save(stream, field)
        os.replace(temporary, path)
        self._items.append(path)

    def __len__(self) -> int:
        return len(self._items)

    def __getitem__(self, index: int) -> np.ndarray:
        item = self._items[index]
        return np.load(item) if isinstance(item, Path) else item

    def __iter__(self):
        for k in range(len(self)):
            yield self[k]

    def __array__(self, dtype=None, copy=None):
        stacked = np.array([self[k] for k in range(len(self))])
        return stacked if dtype is None else stacked.astype(dtype)

    @property
    def shape(self) -> tuple[int, ...]:
        return (len(self), *self[0].shape) if len(self) else (0,)
