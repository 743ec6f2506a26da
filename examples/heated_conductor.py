"""A copper bus bar warming up under its own current in still air (invented scenario; the
case is ``heated-conductor.toml``). How close is it to its steady temperature after three
hours, and does one temperature stand for the bar? Run
``python examples/heated_conductor.py [OUT]``.
"""

from __future__ import annotations

import sys
from pathlib import Path

from _common import run_case_file


def run(out=None, overrides=None):
    return run_case_file("heated-conductor", out, overrides)


if __name__ == "__main__":
    result = run(Path(sys.argv[1]) if len(sys.argv) > 1 else None)
    print(
        f"steady lumped temperature {result.lumped.equilibrium:.1f} degC; after the run the "
        f"bar is at {result.solution.mean[-1]:.1f} degC, "
        f"{result.solution.internal_difference[-1]:.3f} K from centre to edge"
    )
    print("verdict:", result.verdict.rating)
