"""A concrete column in a daily air-temperature cycle (invented scenario; the case is
``cyclic-ambient.toml``). How much of the ±8 K swing reaches the core, and how late?
Run ``python examples/cyclic_ambient.py [OUT]``.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
from _common import run_case_file


def run(out=None, overrides=None):
    return run_case_file("cyclic-ambient", out, overrides)


if __name__ == "__main__":
    result = run(Path(sys.argv[1]) if len(sys.argv) > 1 else None)
    solution = result.solution
    last_day = solution.times >= solution.times[-1] - 86400.0
    core = solution.probes["core"][last_day]
    print(f"core swing over the last day: {np.ptp(core) / 2:.2f} K (air ±8 K)")
    print("verdict:", result.verdict.rating, "-", result.verdict.advice)
