"""The benchmark sections and thermal models (invented scenarios, round steel-like values).

- ``square``: a quarter of a 100 mm × 100 mm bar (symmetry on the left and bottom edges)
  plunged from 500 °C into a fluid at 20 °C with h = 160 W/(m²·K): Bi = hL/k = 0.2 on the
  half-side L = 50 mm. Its exact solution is in :mod:`benchmarks.exact`.
- ``angle``: a filleted L-profile (legs 100 mm, 20 mm thick, root radius 10 mm, toe radius
  4 mm) with a 10 mm bore through the vertical leg, cooled on every edge.
- ``radiating``: the square at 900 °C cooling by radiation (ε = 0.85) with weak natural
  convection (h = 5 W/(m²·K)): radiation carries most of the heat, so each step is nonlinear.

Mesh sizes are found for a requested node count: a coarse mesh measures nodes per unit area
at a known size, and the size scales as 1/√nodes.
"""

from __future__ import annotations

import math

from fem import Convection, Insulated, Material, Radiation, ThermalModel
from geometries import Circle, Rectangle, SectionMesh, profiles

HALF_SIDE = 0.05  # m
CONDUCTIVITY, DENSITY, SPECIFIC_HEAT = 40.0, 7850.0, 500.0  # W/(m·K), kg/m³, J/(kg·K)
MATERIAL = Material(CONDUCTIVITY, DENSITY, SPECIFIC_HEAT, name="benchmark steel (invented)")
DIFFUSIVITY = CONDUCTIVITY / (DENSITY * SPECIFIC_HEAT)  # m²/s
DIFFUSION_TIME = HALF_SIDE**2 / DIFFUSIVITY  # s: t = Fo · this
BIOT = 0.2
HEAT_TRANSFER = BIOT * CONDUCTIVITY / HALF_SIDE  # W/(m²·K)
INITIAL, AMBIENT = 500.0, 20.0  # °C
MAX_ELEMENTS = 50_000_000


def square_shape() -> Rectangle:
    return Rectangle(
        HALF_SIDE,
        HALF_SIDE,
        edge_names={"left": "symmetry", "bottom": "symmetry", "right": "cooled", "top": "cooled"},
        region="bar",
    )


def angle_shape():
    leg, thickness = 0.100, 0.020
    outline = profiles.angle(
        leg, leg, thickness, root_radius=0.010, toe_radius=0.004, region="profile"
    )
    return outline - Circle(0.005, centre=(thickness / 2, 0.060), name="bore")


SHAPES = {"square": square_shape, "angle": angle_shape}


def size_for(shape_name: str, nodes: int | None = None, triangles: int | None = None) -> float:
    """Element size in m that gives about ``nodes`` nodes (or ``triangles`` triangles)."""
    shape = SHAPES[shape_name]()
    wanted = triangles if triangles is not None else nodes
    size = shape.size / 40
    for _ in range(2):  # a coarse guess, then one at about 1/20 of the wanted count
        coarse = shape.mesh(size, max_elements=MAX_ELEMENTS)
        count = coarse.mesh.t.shape[1] if triangles is not None else coarse.mesh.p.shape[1]
        exact = size * math.sqrt(count / wanted)
        if count * 20 >= wanted:
            return exact
        size = exact * math.sqrt(20)
    return exact


def mesh(shape_name: str, size: float) -> SectionMesh:
    return SHAPES[shape_name]().mesh(size, max_elements=MAX_ELEMENTS)


def square_model(section: SectionMesh) -> ThermalModel:
    return ThermalModel(
        section,
        MATERIAL,
        boundaries={
            "symmetry": Insulated("symmetry"),
            "cooled": Convection(heat_transfer_coefficient=HEAT_TRANSFER, ambient=AMBIENT),
        },
        initial_temperature=INITIAL,
        probes={"centre": (0.0, 0.0), "corner": (HALF_SIDE, HALF_SIDE)},
    )


def angle_model(section: SectionMesh) -> ThermalModel:
    fluid = Convection(heat_transfer_coefficient=4 * HEAT_TRANSFER, ambient=AMBIENT)
    return ThermalModel(
        section,
        MATERIAL,
        boundaries=dict.fromkeys(section.edge_groups, fluid),
        initial_temperature=INITIAL,
    )


RADIATING_INITIAL = 900.0  # °C


def radiating_model(section: SectionMesh) -> ThermalModel:
    cooled = (
        Radiation(emissivity=0.85, surroundings=AMBIENT),
        Convection(heat_transfer_coefficient=5.0, ambient=AMBIENT),
    )
    return ThermalModel(
        section,
        MATERIAL,
        boundaries={"symmetry": Insulated("symmetry"), "cooled": cooled},
        initial_temperature=RADIATING_INITIAL,
    )


MODELS = {"square": square_model, "angle": angle_model, "radiating": radiating_model}
