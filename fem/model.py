"""The thermal model: a meshed section with a material, boundary conditions and a start."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

from geometries import AXIS_GROUP, GeometryError, SectionMesh

from .boundary import BoundaryCondition, Convection, Insulated
from .errors import ModelError
from .materials import Material


@dataclass(frozen=True)
class ThermalModel:
    """Transient conduction in a section: planar (per metre of depth) or axisymmetric (the
    solid of revolution about x = 0).

    Parameters
    ----------
    section : geometries.SectionMesh
        The meshed section.
    material : Material
        Properties of the solid.
    boundaries : dict of str to boundary condition
        One condition for *every* edge group of the section, keyed by group name. The axis of
        an axisymmetric section needs none (it is added as ``Insulated("axis")``).
    initial_temperature : float
        Uniform starting temperature in °C.
    probes : dict of str to (x, y)
        Named points in m whose temperature is recorded every step.
    element_order : int
        1 for linear (P1) or 2 for quadratic (P2) triangles.

    Examples
    --------
    >>> from geometries import Rectangle
    >>> section = Rectangle(0.02, 0.01).mesh(size=0.0025)
    >>> air = Convection(heat_transfer_coefficient=25.0, ambient=20.0)
    >>> model = ThermalModel(section, Material(45.0, 7850.0, 475.0),
    ...     boundaries={side: air for side in ("left", "right", "top", "bottom")},
    ...     initial_temperature=200.0)
    >>> model.exchange_groups
    ('bottom', 'left', 'right', 'top')
    """

    section: SectionMesh
    material: Material
    boundaries: Mapping[str, BoundaryCondition]
    initial_temperature: float
    probes: Mapping[str, tuple[float, float]] = field(default_factory=dict)
    element_order: int = 1

    def __post_init__(self) -> None:
        groups = set(self.section.edge_groups)
        boundaries = dict(self.boundaries)
        if self.section.axisymmetric and AXIS_GROUP in groups:
            axis = boundaries.setdefault(AXIS_GROUP, Insulated("axis"))
            if not isinstance(axis, Insulated):
                raise ModelError(
                    f"the axis of an axisymmetric section carries no heat flow; remove the "
                    f"{type(axis).__name__} condition on {AXIS_GROUP!r}"
                )
        object.__setattr__(self, "boundaries", boundaries)
        named = set(boundaries)
        if named - groups:
            raise ModelError(
                f"boundary conditions name edge group(s) {sorted(named - groups)} that the "
                f"section does not have; its edge groups are {sorted(groups)}"
            )
        if groups - named:
            raise ModelError(
                f"edge group(s) {sorted(groups - named)} have no boundary condition; give each "
                "one a condition (Insulated() for no heat flow)"
            )
        for name, condition in self.boundaries.items():
            if not isinstance(condition, Convection | Insulated):
                raise ModelError(
                    f"boundary condition for {name!r} must be Convection or Insulated, "
                    f"got {condition!r}"
                )
        if not np.isfinite(self.initial_temperature) or self.initial_temperature <= -273.15:
            raise ModelError(
                f"initial_temperature must be above -273.15 degC, got {self.initial_temperature!r}"
            )
        if self.element_order not in (1, 2):
            raise ModelError(f"element_order must be 1 or 2, got {self.element_order!r}")
        for name, point in self.probes.items():
            try:
                self.section.locate(np.asarray(point, dtype=float).reshape(2, 1))
            except GeometryError:
                raise ModelError(
                    f"probe {name!r} at {tuple(point)} m lies outside the section"
                ) from None

    @property
    def exchange_groups(self) -> tuple[str, ...]:
        """Edge groups that exchange heat with the surroundings, sorted by name."""
        return tuple(sorted(n for n, c in self.boundaries.items() if isinstance(c, Convection)))

    @property
    def convection(self) -> dict[str, Convection]:
        """The convective conditions, keyed by edge group."""
        return {n: c for n, c in self.boundaries.items() if isinstance(c, Convection)}
