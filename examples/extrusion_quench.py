"""An aluminium channel profile quenched by sprays that hit the outer faces harder than the
inner ones (invented scenario; the case is ``extrusion-quench.toml``).

Which faces carry the heat, and how late is the web compared with a lumped estimate?
Run ``python examples/extrusion_quench.py [OUT]``.
"""

from __future__ import annotations

import sys
from pathlib import Path

from _common import run_case_file
from scipy.integrate import trapezoid


def run(out=None, overrides=None):
    return run_case_file("extrusion-quench", out, overrides)


if __name__ == "__main__":
    result = run(Path(sys.argv[1]) if len(sys.argv) > 1 else None)
    solution = result.solution
    for group, flow in solution.heat_flow.items():
        energy = trapezoid(flow, solution.times)
        print(f"{group:10s} takes {-energy / 1000:8.1f} kJ per metre of profile")
    print("time to 150 degC:", {k: round(v, 1) for k, v in result.time_to_target.items() if v})
    print("verdict:", result.verdict.rating, "-", result.verdict.direction)
