"""One benchmark task in a fresh process: ``python -m benchmarks.worker TASK PARAMS OUT``.

PARAMS is a JSON object; the result (and, while the task runs, its partial progress) is
written to the JSON file OUT, always with this process's peak resident memory and the load
average at the end.
"""

from __future__ import annotations

import json
import os
import sys
import time
import traceback
from pathlib import Path

from .machine import load_average, peak_rss


class Reporter:
    """Writes a task's result so far to its JSON file (atomically, at most every ``every`` s)."""

    def __init__(self, path: str | Path | None, every: float = 2.0):
        self.path = None if path is None else Path(path)
        self.every = every
        self.data: dict = {
            "status": "running",
            "load_average_start": load_average(),
            "source_digest": source_digest(),
        }
        self._written = 0.0

    def update(self, force: bool = False, **values) -> None:
        self.data.update(values)
        now = time.perf_counter()
        if self.path is not None and (force or now - self._written >= self.every):
            self._written = now
            self.data["peak_rss_bytes"] = peak_rss()
            temporary = self.path.with_suffix(".part")
            temporary.write_text(json.dumps(self.data, default=_plain))
            os.replace(temporary, self.path)


def source_digest() -> dict[str, str]:
    """Short digests of the solver's files as this task imported them (others edit them)."""
    import hashlib

    root = Path(__file__).resolve().parent.parent
    digests = {}
    for name in ("fem/transient.py", "fem/system.py", "fem/recorder.py", "fem/fields.py"):
        try:
            digests[name] = hashlib.sha256((root / name).read_bytes()).hexdigest()[:12]
        except OSError:
            digests[name] = "missing"
    return digests


def _plain(value):
    import numpy as np

    if isinstance(value, np.generic):
        return value.item()
    if isinstance(value, np.ndarray):
        return value.tolist()
    return repr(value)


def run_task(name: str, params: dict, reporter: Reporter) -> dict:
    from . import cases

    result = cases.TASKS[name](params, reporter)
    reporter.data.update(result)
    reporter.update(
        force=True, status="done", load_average_end=load_average(), peak_rss_bytes=peak_rss()
    )
    return reporter.data


def main(argv: list[str]) -> int:
    name, params, out = argv[0], json.loads(argv[1]), argv[2]
    reporter = Reporter(out)
    try:
        run_task(name, params, reporter)
    except MemoryError:
        reporter.update(force=True, status="out of memory", error=traceback.format_exc())
        return 3
    except Exception:
        reporter.update(force=True, status="failed", error=traceback.format_exc())
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
