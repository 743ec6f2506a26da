"""A coated steel plate in hot gas (invented scenario), built with the Python API: two
materials on one conforming mesh. The same part is in ``coated-plate.toml``.
How large does the temperature difference across the coating get, and when?
Run ``python examples/coated_plate.py [OUT]``.
"""

from __future__ import annotations

import sys
from pathlib import Path

from advisor.pipeline import run_model, write_results
from fem import Convection, Insulated, Material, ThermalModel, solids
from geometries import Composite, Rectangle


def run(out=None, mesh_size=0.0005, end_time=900.0):
    sides = {"left": "sides", "right": "sides"}
    steel = Rectangle(0.020, 0.008, edge_names={"bottom": "back", **sides}, region="steel")
    coating = Rectangle(
        0.020,
        0.0006,
        corner=(0.0, 0.008),
        edge_names={"top": "hot_face", **sides},
        region="coating",
    )
    section = Composite((steel, coating)).mesh(mesh_size)
    ceramic = Material(1.2, 5600.0, 500.0, name="ceramic coating (demo values)")
    model = ThermalModel(
        section,
        {"steel": solids.material("carbon steel, plain"), "coating": ceramic},
        {
            "back": Insulated(),
            "sides": Insulated("symmetry"),
            "hot_face": Convection(250.0, 650.0),
        },
        initial_temperature=25.0,
        probes={"coating_top": (0.010, 0.0086), "steel_back": (0.010, 0.0)},
    )
    results = run_model(
        model,
        end_time,
        title="Coated steel plate in hot gas",
        advisor_options={"target": 400.0, "quantity": "peak_difference"},
    )
    if out is not None:
        write_results(results, out, force=True)
    return results.assessment


if __name__ == "__main__":
    result = run(Path(sys.argv[1]) if len(sys.argv) > 1 else None)
    print(
        f"largest internal difference {result.peak_internal_difference:.1f} K at "
        f"{result.peak_internal_difference_time:.1f} s; verdict {result.verdict.rating}"
    )
