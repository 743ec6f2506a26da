"""The built-in demonstration: a steel bar quenched in oil.

An invented scenario: a 60 mm × 40 mm bar of low-alloy steel leaves the furnace at 850 °C and
is quenched in oil at 60 °C with h = 400 W/(m²·K) on all four faces. The question is when its
core has cooled to 200 °C and whether a lumped estimate would have said so. A quarter of the
section is modelled, cut on its two symmetry lines. The property values are round figures
typical of low-alloy steel (from memory), for demonstration only.
"""

from __future__ import annotations

from dataclasses import replace

from fem import Convection, Insulated, Material, ThermalModel
from geometries import Rectangle

from .pipeline import Results, run_model
from .whole_part import Mirror

WIDTH, HEIGHT = 0.060, 0.040  # m, the full section
# The quarter's two symmetry lines: pictures show the whole bar, and it counts four copies.
MIRRORS = (Mirror((0.0, 0.0), (1.0, 0.0)), Mirror((0.0, 0.0), (0.0, 1.0)))
TARGET = 200.0  # degC
END_TIME = 600.0  # s
TITLE = "Steel bar 60 mm x 40 mm quenched in oil (demonstration)"


def demo_model(mesh_size: float = 0.001) -> ThermalModel:
    """The demonstration's thermal model; ``mesh_size`` in m."""
    quarter = Rectangle(
        WIDTH / 2,
        HEIGHT / 2,
        edge_names={
            "left": "symmetry",
            "bottom": "symmetry",
            "right": "quenched",
            "top": "quenched",
        },
        region="bar",
    )
    steel = Material(
        conductivity=40.0,
        density=7850.0,
        specific_heat=520.0,
        name="low-alloy steel (demo values)",
    )
    section = quarter.mesh(mesh_size)
    section = replace(section, facts=replace(section.facts, symmetry_multiplier=2 ** len(MIRRORS)))
    return ThermalModel(
        section=section,
        material=steel,
        boundaries={
            "symmetry": Insulated("symmetry"),
            "quenched": Convection(heat_transfer_coefficient=400.0, ambient=60.0),
        },
        initial_temperature=850.0,
        probes={
            "core": (0.0, 0.0),
            "face_centre": (WIDTH / 2, 0.0),
            "corner": (WIDTH / 2, HEIGHT / 2),
        },
    )


def run_demo(mesh_size: float = 0.001, time_step: float = 1.0) -> Results:
    """Solve and assess the demonstration through the pipeline; sizes in m and s."""
    return run_model(
        demo_model(mesh_size),
        END_TIME,
        title=TITLE,
        run_options={"time_step": time_step, "output_interval": END_TIME / 30},
        advisor_options={"target": TARGET, "tolerance": 0.05, "quantity": "slowest"},
        mirrors=MIRRORS,
    )
