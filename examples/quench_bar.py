"""The steel bar quenched in oil — the demonstration — from its case file
(``quench-bar.toml``). Run ``python examples/quench_bar.py [OUT]``.
"""

from __future__ import annotations

import sys
from pathlib import Path

from _common import run_case_file


def run(out=None, overrides=None):
    return run_case_file("quench-bar", out, overrides)


if __name__ == "__main__":
    result = run(Path(sys.argv[1]) if len(sys.argv) > 1 else None)
    print("time to 200 degC:", {k: round(v, 1) for k, v in result.time_to_target.items() if v})
    print("two-node model for system simulation:", result.two_node.parameters())
