"""What every boundary condition knows, and the check of one edge group's conditions.

A condition states the heat flowing *into* the part through its edge, per unit surface, as

    q(T, t) = s(t) − h(t)·T − r(T, t)

with a part linear in the surface temperature T (the load s and the coefficient h, which the
solver folds into its matrices) and, for nonlinear conditions, a remainder r it evaluates at the
edge's quadrature points through the :class:`SurfaceEdge` it is given. For the lumped model,
the Biot numbers and the slowest mode it also gives one coefficient at one temperature, the
secant h(T) with q(T) = h(T)·(T_∞ − T) + q_0, so a one-temperature part receives exactly q.

A new kind is one module: a frozen dataclass deriving from :class:`Condition` that overrides
what differs from the defaults below, and ``@register`` under the name case files use.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Iterable
from dataclasses import dataclass
from typing import ClassVar, Protocol

import numpy as np
import scipy.sparse as sp

from ..errors import ModelError
from ..schedules import Schedule, as_schedule, schedule_data
from ..temperatures import ABSOLUTE_ZERO, check_temperature

KINDS: dict[str, type[Condition]] = {}  # name in case files → class


def register(kind: type[Condition]) -> type[Condition]:
    """Class decorator: list ``kind`` under its ``kind.name`` (messages list kinds from here)."""
    KINDS[kind.name] = kind
    return kind


class SurfaceEdge(Protocol):
    """What an edge group offers its conditions (built by :func:`fem.assembly.assemble`)."""

    area: float  # the group's surface area, m² (planar: m²/m)
    weights: np.ndarray  # ∫ φ_i dS per node

    def interpolate(self, field: np.ndarray) -> np.ndarray:
        """The nodal ``field`` at the edge's quadrature points."""

    def integrate(self, flux: np.ndarray) -> np.ndarray:
        """∫ q φ_i dS per node for ``q`` given at the quadrature points (or a number)."""

    def exchange(self, coefficient) -> sp.csr_matrix:
        """∫ c φ_j φ_i dS for ``c`` at the quadrature points (or a number)."""


@dataclass(frozen=True)
class Linearised:
    """A condition as q = coefficient·(ambient − T) + supplied at one temperature and time.

    Attributes
    ----------
    coefficient : float
        h in W/(m²·K) (0 for a condition that only supplies heat).
    ambient : float
        The temperature it drives the surface towards, °C.
    supplied : float
        Heat into the part regardless of its temperature, W/m².
    """

    coefficient: float
    ambient: float = 0.0
    supplied: float = 0.0


class Condition:
    """Base of every boundary condition: defaults for a condition with no heat flow.

    Class attributes
    ----------------
    name : str
        The kind's name in case files and the registry.
    label : str
        The kind in words, for summaries.
    linear : bool
        True when the heat flow is linear in temperature (only s and h above).
    alone : bool
        True when it cannot share its edge group with another condition.
    exchanges : bool
        True when it exchanges heat with surroundings at a temperature (it has a coefficient,
        so it counts for the lumped time constant and the Biot numbers).
    flows : bool
        True when heat crosses the edge through it (its group gets edge terms and a history).
    holds_temperature : bool
        True when it imposes the surface temperature (:meth:`held_temperature`).
    bounded : bool
        True when it cannot drive the part beyond the temperatures it drives towards (heat
        supplied regardless of temperature, as a prescribed flux, can); the solver's
        maximum-principle check runs only when every condition is bounded.
    units : dict of str to str
        Unit suffix of each field in summary keys.
    """

    name: ClassVar[str] = ""
    label: ClassVar[str] = ""
    linear: ClassVar[bool] = True
    alone: ClassVar[bool] = False
    exchanges: ClassVar[bool] = False
    flows: ClassVar[bool] = True
    holds_temperature: ClassVar[bool] = False
    bounded: ClassVar[bool] = True
    units: ClassVar[dict[str, str]] = {}

    # -- time -------------------------------------------------------------------------------
    def named_schedules(self) -> dict[str, Schedule]:
        """Every schedule of time the condition holds, by field name."""
        fields = dataclasses.fields(self)
        values = {f.name: getattr(self, f.name) for f in fields}
        return {name: v for name, v in values.items() if hasattr(v, "breakpoints")}

    def schedules(self) -> tuple[Schedule, ...]:
        """Every schedule of time the condition holds."""
        return tuple(self.named_schedules().values())

    def breakpoints(self, end_time: float) -> set[float]:
        """Times in (0, ``end_time``] s where one of its schedules jumps or kinks."""
        return {p for s in self.schedules() for p in s.breakpoints(end_time)}

    def is_constant(self) -> bool:
        """True when none of its schedules changes with time."""
        return all(s.is_constant for s in self.schedules())

    def driving_temperatures(self, end_time: float) -> tuple[float, ...]:
        """Extremes over [0, ``end_time``] s of the temperatures it drives the part towards, °C."""
        return ()

    def held_temperature(self, time: float) -> float | None:
        """The surface temperature it imposes at ``time``, °C; None when it imposes none."""
        return None

    # -- the field equations ----------------------------------------------------------------
    def exchange_coefficient(self, time: float) -> float:
        """h(t) of the linear part, W/(m²·K)."""
        return 0.0

    def supplied(self, time: float) -> float:
        """s(t) of the linear part: heat into the part at 0 °C, W/m²."""
        return 0.0

    def outflow(self, edge: SurfaceEdge, temperature: np.ndarray, time: float):
        """∫ r(T, t) φ_i dS per node (W), the nonlinear remainder leaving; None if linear."""
        return None

    def outflow_tangent(self, edge: SurfaceEdge, temperature: np.ndarray, time: float):
        """∫ ∂r/∂T φ_j φ_i dS (W/K); None if linear."""
        return None

    # -- one temperature for the whole part -------------------------------------------------
    def linearised(self, temperature: float, time: float) -> Linearised:
        """The secant coefficient at surface ``temperature`` °C and ``time`` s: exact heat flow
        there (see :class:`Linearised`). A linear condition's follows from its linear part;
        a nonlinear kind must state its own."""
        if not self.linear:
            raise NotImplementedError(
                f"{type(self).__name__} is nonlinear: it must define linearised() so the lumped "
                "model, the Biot numbers and the slowest mode see its heat flow"
            )
        coefficient, supplied = self.exchange_coefficient(time), self.supplied(time)
        if coefficient:
            return Linearised(coefficient, supplied / coefficient)
        return Linearised(0.0, supplied=supplied)

    def lumped_heat(self, temperature: float, time: float, coefficient_scale: float = 1.0):
        """Heat into a part at one ``temperature`` °C, W/m², with the exchange coefficient
        multiplied by ``coefficient_scale``: exact, as the coefficient is the secant."""
        line = self.linearised(temperature, time)
        exchanged = coefficient_scale * line.coefficient * (line.ambient - temperature)
        return exchanged + line.supplied

    def lumped_closed_form(self) -> bool:
        """True when its lumped heat is h·(T∞ − T) with h and T∞ constant (or none)."""
        return self.linear and self.is_constant()

    # -- what the histories report -----------------------------------------------------------
    def heat_flow(self, edge: SurfaceEdge, temperature: np.ndarray, time: float) -> float:
        """Heat flow into the part through ``edge`` for the field ``temperature``, W."""
        flow = self.supplied(time) * edge.area
        h = self.exchange_coefficient(time)
        if h:
            # einsum, not BLAS dot: fem.system.inner says why (per-step histories)
            flow -= h * float(np.einsum("i,i->", edge.weights, temperature))
        remainder = self.outflow(edge, temperature, time)
        return flow if remainder is None else flow - float(remainder.sum())

    def heat_flows_many(self, edge: SurfaceEdge, times, temperatures) -> np.ndarray:
        """:meth:`heat_flow` of a linear condition for many states, one per row of
        ``temperatures`` (W): one product for the batch."""
        supplied = np.array([self.supplied(t) for t in times])
        h = np.array([self.exchange_coefficient(t) for t in times])
        return supplied * edge.area - h * (temperatures @ edge.weights)

    # -- descriptions --------------------------------------------------------------------------
    def describe(self, end_time: float) -> str:
        """The condition in words for a report."""
        return self.label or type(self).__name__

    def summary(self) -> dict:
        """The condition as JSON-ready data, schedules spelled out, units in the keys."""
        entry: dict = {"kind": self.label or self.name}
        for field in dataclasses.fields(self):
            value = getattr(self, field.name)
            key = field.name + self.units.get(field.name, "")
            entry[key] = value if isinstance(value, str) else schedule_data(value)
        return entry


def schedule_field(value, what: str, argument: str) -> Schedule:
    """``value`` as a schedule; a :class:`ModelError` naming ``argument`` otherwise."""
    try:
        return as_schedule(value, what)
    except ModelError as error:
        raise ModelError(str(error), argument=argument) from None


def temperature_field(value, what: str, argument: str) -> Schedule:
    """``value`` as a schedule of temperature, °C, above absolute zero at all times."""
    schedule = schedule_field(value, what, argument)
    if schedule.is_constant:
        check_temperature(schedule(0.0), what, argument)
    elif schedule.bounds()[0] <= ABSOLUTE_ZERO:
        raise ModelError(
            f"{what} must be a temperature above {ABSOLUTE_ZERO:g} degC at all times, "
            f"got {value!r}",
            argument=argument,
        )
    return schedule


def conditions(value, group: str) -> tuple[Condition, ...]:
    """The conditions of one edge group as a tuple, checked for a sensible combination.

    One group may combine conditions of different kinds (a Convection with a Radiation and a
    HeatFlux); a FixedTemperature or an Insulated condition stands alone.
    """
    items = (
        tuple(value) if isinstance(value, Iterable) and not isinstance(value, str) else (value,)
    )
    if not items:
        raise ModelError(f"edge group {group!r} has an empty list of boundary conditions")
    for item in items:
        if not isinstance(item, Condition):
            names = [kind.__name__ for kind in KINDS.values()]
            raise ModelError(
                f"boundary condition for {group!r} must be {', '.join(names[:-1])} or "
                f"{names[-1]}, got {item!r}"
            )
    alone = [i for i in items if i.alone]
    if alone and len(items) > 1:
        raise ModelError(
            f"edge group {group!r}: {type(alone[0]).__name__} cannot be combined with other "
            "conditions"
        )
    kinds = [type(i) for i in items]
    if len(set(kinds)) != len(kinds):
        raise ModelError(f"edge group {group!r} has two conditions of the same kind")
    return items
