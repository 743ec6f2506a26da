"""The thermal model: a meshed section with materials, boundary conditions, sources and a
starting state."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

from geometries import AXIS_GROUP, GeometryError, SectionMesh

from .conditions import (
    Condition,
    FixedTemperature,
    Insulated,
    conditions,
)
from .errors import ModelError
from .interfaces import Interface
from .interfaces import prepared as prepared_interfaces
from .materials import Material
from .schedules import Schedule, as_schedule
from .temperatures import check_temperature


@dataclass(frozen=True)
class ThermalModel:
    """Transient conduction in a section: planar (per metre of depth) or axisymmetric (the
    solid of revolution about x = 0).

    Parameters
    ----------
    section : geometries.SectionMesh
        The meshed section.
    material : Material or dict of str to Material
        One material for the whole section, or one per region.
    boundaries : dict of str to condition or tuple of conditions
        A condition for *every* edge group of the section, keyed by group name; a group may
        combine Convection, Radiation and HeatFlux in a tuple. The axis of an axisymmetric
        section needs none (it is added as ``Insulated("axis")``).
    initial_temperature : float, dict of str to float, or Solution
        Uniform starting temperature in °C, one per region, or the final field of an earlier
        run on the same mesh (stages chain: heat, transfer, quench, hold).
    probes : dict of str to (x, y)
        Named points in m whose temperature is recorded every step.
    element_order : int
        1 for linear (P1) or 2 for quadratic (P2) triangles.
    heat_sources : dict of str to float or schedule
        Heat generated per unit volume in W/m³, per region.
    interfaces : dict of str to Interface
        Named contacts between pairs of regions, each with its conductance (or resistance):
        the field jumps across them. ``section`` becomes the mesh cut along them
        (:mod:`fem.interfaces`).

    Examples
    --------
    >>> from geometries import Rectangle
    >>> from fem import Convection, Material
    >>> section = Rectangle(0.02, 0.01).mesh(size=0.0025)
    >>> air = Convection(heat_transfer_coefficient=25.0, ambient=20.0)
    >>> model = ThermalModel(section, Material(45.0, 7850.0, 475.0),
    ...     boundaries={side: air for side in ("left", "right", "top", "bottom")},
    ...     initial_temperature=200.0)
    >>> model.exchange_groups
    ('bottom', 'left', 'right', 'top')
    """

    section: SectionMesh
    material: Material | Mapping[str, Material]
    boundaries: Mapping[str, Condition | tuple[Condition, ...]]
    initial_temperature: float | Mapping[str, float] | np.ndarray
    probes: Mapping[str, tuple[float, float]] = field(default_factory=dict)
    element_order: int = 1
    heat_sources: Mapping[str, float | Schedule] = field(default_factory=dict)
    interfaces: Mapping[str, Interface] = field(default_factory=dict)

    def __post_init__(self) -> None:
        if not isinstance(self.section, SectionMesh):
            raise ModelError(f"section must be a geometries.SectionMesh, got {self.section!r}")
        section, interfaces = prepared_interfaces(self.section, self.interfaces)
        self._set("section", section)
        self._set("interfaces", interfaces)
        regions = set(self.section.regions)
        self._set("material", self._materials(regions))
        self._set("boundaries", self._boundaries())
        check_element_order(self.element_order)
        self._set("initial_temperature", self._initial(regions))
        unknown = sorted(set(self.heat_sources) - regions)
        if unknown:
            raise ModelError(
                f"heat_sources name region(s) {unknown} that the section does not "
                f"have; its regions are {sorted(regions)}"
            )
        self._set(
            "heat_sources",
            {
                r: as_schedule(q, f"heat source of region {r!r}")
                for r, q in self.heat_sources.items()
            },
        )
        for name, point in self.probes.items():
            try:
                self.section.locate(np.asarray(point, dtype=float).reshape(2, 1))
            except (GeometryError, ValueError):
                raise ModelError(
                    f"probe {name!r} at {tuple(point)} m lies outside the section"
                ) from None
        self._set("probes", {n: (float(p[0]), float(p[1])) for n, p in self.probes.items()})

    def _set(self, name: str, value) -> None:
        object.__setattr__(self, name, value)

    def _materials(self, regions: set[str]) -> Material | dict[str, Material]:
        if isinstance(self.material, Material):
            return self.material
        materials = dict(self.material)
        _exactly(materials, regions, "materials must be given for exactly the section's regions")
        for region, material in materials.items():
            if not isinstance(material, Material):
                raise ModelError(
                    f"material of region {region!r} must be a Material, got {material!r}"
                )
        return materials

    def _boundaries(self) -> dict[str, tuple[Condition, ...]]:
        groups = set(self.section.edge_groups)
        boundaries = dict(self.boundaries)
        if self.section.axisymmetric and AXIS_GROUP in groups:
            # A model rebuilt from another (dataclasses.replace) has the axis as a tuple.
            axis_conditions = conditions(
                boundaries.setdefault(AXIS_GROUP, Insulated("axis")), AXIS_GROUP
            )
            if any(c.flows or c.holds_temperature for c in axis_conditions):
                raise ModelError(
                    f"the axis of an axisymmetric section carries no heat flow; remove the "
                    f"{', '.join(type(c).__name__ for c in axis_conditions)} condition on "
                    f"{AXIS_GROUP!r}"
                )
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
        return {name: conditions(value, name) for name, value in boundaries.items()}

    def _initial(self, regions: set[str]):
        value = self.initial_temperature
        if hasattr(value, "final_state") and hasattr(value, "model"):
            earlier = value.model
            same_mesh = (
                earlier.section.mesh.p.shape == self.section.mesh.p.shape
                and np.array_equal(earlier.section.mesh.p, self.section.mesh.p)
            )
            if not same_mesh or earlier.element_order != self.element_order:
                raise ModelError(
                    "an earlier Solution can start this model only on the same mesh and "
                    "element order"
                )
            return np.array(value.final_state, dtype=float)  # the field, not the whole run
        if isinstance(value, np.ndarray):  # a field, taken from a Solution before
            return value
        if isinstance(value, Mapping):
            _exactly(value, regions, "initial temperatures must be given for exactly the regions")
            for region, t in value.items():
                check_temperature(t, f"initial temperature of region {region!r}")
            return {r: float(t) for r, t in value.items()}
        check_temperature(value, "initial_temperature")
        return float(value)

    # ------------------------------------------------------------------------------------
    @property
    def materials(self) -> dict[str, Material]:
        """The material of each region."""
        if isinstance(self.material, Material):
            return dict.fromkeys(self.section.regions, self.material)
        return dict(self.material)

    @property
    def fixed(self) -> dict[str, FixedTemperature]:
        """The conditions that hold the surface temperature, keyed by edge group."""
        return {n: c for n, c in self.conditions() if c.holds_temperature}

    @property
    def exchange_groups(self) -> tuple[str, ...]:
        """Edge groups that exchange heat with surroundings (convection, radiation, any kind
        with a coefficient), sorted."""
        return tuple(sorted({n for n, c in self.conditions() if c.exchanges}))

    @property
    def is_linear(self) -> bool:
        """True when no property depends on temperature and every condition is linear."""
        return all(m.is_constant for m in self.materials.values()) and all(
            c.linear for _, c in self.conditions()
        )

    def conditions(self) -> list[tuple[str, Condition]]:
        """Every (edge group, condition) pair, in group order."""
        return [(name, c) for name, cs in self.boundaries.items() for c in cs]

    def breakpoints(self, end_time: float) -> tuple[float, ...]:
        """Times in (0, end_time] where a condition or a source jumps or kinks, sorted (not
        merged: the solver merges points within round-off of each other)."""
        points: set[float] = set()
        for _, condition in self.conditions():
            points.update(condition.breakpoints(end_time))
        for source in self.heat_sources.values():
            points.update(source.breakpoints(end_time))
        return tuple(sorted(points))

    def driving_temperatures(self, end_time: float) -> tuple[float, float]:
        """Lowest and highest of the initial temperatures and every temperature a condition
        drives the part towards over [0, end_time], °C."""
        values = [*self.initial_range()]
        for _, condition in self.conditions():
            values.extend(condition.driving_temperatures(end_time))
        return (min(values), max(values))

    def initial_range(self) -> tuple[float, float]:
        """Lowest and highest starting temperature, °C."""
        value = self.initial_temperature
        if isinstance(value, float):
            return (value, value)
        if isinstance(value, dict):
            return (min(value.values()), max(value.values()))
        return (float(np.min(value)), float(np.max(value)))


def check_element_order(value) -> int:
    """``value`` as an element order: 1 (linear, P1) or 2 (quadratic, P2)."""
    if isinstance(value, bool) or value not in (1, 2):
        raise ModelError(f"element_order must be 1 or 2, got {value!r}", argument="element_order")
    return int(value)


def _exactly(given: Mapping, regions: set[str], what: str) -> None:
    """Raise unless ``given`` is keyed by exactly the section's ``regions``."""
    missing, unknown = sorted(regions - set(given)), sorted(set(given) - regions)
    if missing or unknown:
        raise ModelError(f"{what} {sorted(regions)}; missing {missing}, unknown {unknown}")
