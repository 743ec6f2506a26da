"""A steel round soaked in a furnace (invented scenario), built with the Python API: an
axisymmetric half-section, convection plus radiation, properties that change with
temperature, and a stop when the core reaches the soak temperature. The same part is in
``furnace-round.toml``. Run ``python examples/furnace_round.py [OUT]``.
"""

from __future__ import annotations

import sys
from pathlib import Path

from advisor.pipeline import run_model, write_results
from fem import (
    Convection,
    Insulated,
    Material,
    PropertyTable,
    Radiation,
    StopWhen,
    ThermalModel,
)
from geometries import Rectangle, Section


def run(out=None, mesh_size=0.002, end_time=4 * 3600.0):
    half = Rectangle(
        0.040, 0.120, edge_names={"bottom": "mid_length", "right": "mantle", "top": "end_face"}
    )
    section = Section(half, axisymmetric=True).mesh(mesh_size, order=2)
    steel = Material(  # invented round values for a low-alloy steel
        conductivity=PropertyTable((20.0, 400.0, 900.0), (42.0, 36.0, 27.0)),
        density=7850.0,
        specific_heat=PropertyTable((20.0, 400.0, 900.0), (460.0, 560.0, 650.0)),
        name="low-alloy steel (demo values)",
    )
    furnace = (Convection(15.0, 900.0), Radiation(0.8, 900.0))
    model = ThermalModel(
        section,
        steel,
        {"mid_length": Insulated("symmetry"), "mantle": furnace, "end_face": furnace},
        initial_temperature=20.0,
        probes={"core": (0.0, 0.0)},
    )
    results = run_model(
        model,
        end_time,
        title="Steel round soaked in a furnace",
        run_options={"stop": StopWhen("core", 880.0)},
        advisor_options={"target": 880.0, "quantity": "time_to_target"},
    )
    if out is not None:
        write_results(results, out, force=True)
    return results.assessment


if __name__ == "__main__":
    result = run(Path(sys.argv[1]) if len(sys.argv) > 1 else None)
    print(
        f"core soaked at {result.solution.stop_time / 60:.1f} min; the lumped estimate says "
        f"{result.time_to_target['classical'] / 60:.1f} min"
    )
    print("verdict:", result.verdict.rating, "-", result.verdict.advice)
