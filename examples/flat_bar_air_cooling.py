"""An aluminium flat bar cooling in a fan draught after brazing — a case where lumped holds.

Invented scenario: a 100 mm × 12 mm bar of an aluminium alloy (round property values, from
memory) leaves a brazing furnace at 560 °C into a fan draught at 30 °C, h = 45 W/(m²·K) on the
two broad faces and 25 W/(m²·K) on the narrow edges. When may it be handled at 60 °C, and is a
lumped estimate good enough? Run ``python examples/flat_bar_air_cooling.py [OUT]``.
"""

from __future__ import annotations

import sys
from pathlib import Path

from advisor.pipeline import run_model, write_results
from fem import Convection, Material, ThermalModel
from geometries import Rectangle


def run(out: Path | None = None, mesh_size: float = 0.002, time_step: float = 10.0):
    """Solve and assess the case; write the results folder to ``out`` if given."""
    bar = Rectangle(
        0.100,
        0.012,
        edge_names={"bottom": "broad", "top": "broad", "left": "narrow", "right": "narrow"},
    )
    model = ThermalModel(
        section=bar.mesh(mesh_size),
        material=Material(
            conductivity=180.0,
            density=2700.0,
            specific_heat=900.0,
            name="aluminium alloy (round values)",
        ),
        boundaries={"broad": Convection(45.0, 30.0), "narrow": Convection(25.0, 30.0)},
        initial_temperature=560.0,
        probes={"centre": (0.050, 0.006)},
    )
    results = run_model(
        model,
        3600.0,
        title="Aluminium flat bar cooling in a fan draught",
        run_options={"time_step": time_step, "output_interval": 180.0},
        advisor_options={"target": 60.0, "tolerance": 0.02, "quantity": "slowest"},
    )
    if out is not None:
        write_results(results, out, force=True)
    return results.assessment


if __name__ == "__main__":
    out = Path(sys.argv[1]) if len(sys.argv) > 1 else Path("flat-bar-results")
    result = run(out)
    print("lumped adequate:", result.verdict.adequate)
    for reason in result.verdict.reasons:
        print(" -", reason)
    print("results in", out)
