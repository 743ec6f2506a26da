"""Boundary conditions, one (or a convection–radiation pair) per edge group.

Heat flows are positive *into* the part. Every coefficient, ambient, flux and temperature may be
a number or a schedule of time (see :mod:`fem.schedules`).
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass

from .errors import ModelError
from .schedules import Schedule, as_schedule

ABSOLUTE_ZERO = -273.15  # degC


def _temperature(value, what: str) -> Schedule:
    schedule = as_schedule(value, what)
    if schedule.bounds()[0] <= ABSOLUTE_ZERO:
        raise ModelError(f"{what} must be a temperature above -273.15 degC, got {value!r}")
    return schedule


@dataclass(frozen=True)
class Convection:
    """Heat exchange with a fluid: q = h·(T∞ − T) into the part (a Robin condition).

    Parameters
    ----------
    heat_transfer_coefficient : float or schedule
        h in W/(m²·K); > 0.
    ambient : float or schedule
        Fluid temperature T∞ in °C; above absolute zero.
    """

    heat_transfer_coefficient: float | Schedule
    ambient: float | Schedule

    def __post_init__(self) -> None:
        h = as_schedule(self.heat_transfer_coefficient, "Convection heat_transfer_coefficient")
        if h.bounds()[0] <= 0:
            raise ModelError(
                f"Convection heat_transfer_coefficient must be a finite value > 0 W/(m^2*K), "
                f"got {self.heat_transfer_coefficient!r}; use Insulated() for an edge "
                "without heat exchange"
            )
        object.__setattr__(self, "heat_transfer_coefficient", h)
        object.__setattr__(self, "ambient", _temperature(self.ambient, "Convection ambient"))


@dataclass(frozen=True)
class Radiation:
    """Grey-body radiation to large surroundings: q = ε·σ·(T_sur⁴ − T⁴), temperatures in
    kelvin inside the solver.

    Parameters
    ----------
    emissivity : float
        ε in [0, 1].
    surroundings : float or schedule
        Temperature of the surroundings in °C.
    """

    emissivity: float
    surroundings: float | Schedule

    def __post_init__(self) -> None:
        e = self.emissivity
        if not (isinstance(e, int | float) and not isinstance(e, bool) and 0 <= e <= 1):
            raise ModelError(f"Radiation emissivity must be in [0, 1], got {e!r}")
        object.__setattr__(
            self, "surroundings", _temperature(self.surroundings, "Radiation surroundings")
        )


@dataclass(frozen=True)
class HeatFlux:
    """A prescribed heat flux into the part, q in W/m² (negative for heat leaving)."""

    flux: float | Schedule

    def __post_init__(self) -> None:
        object.__setattr__(self, "flux", as_schedule(self.flux, "HeatFlux flux"))


@dataclass(frozen=True)
class FixedTemperature:
    """A prescribed surface temperature in °C (a Dirichlet condition)."""

    temperature: float | Schedule

    def __post_init__(self) -> None:
        object.__setattr__(
            self, "temperature", _temperature(self.temperature, "FixedTemperature temperature")
        )


@dataclass(frozen=True)
class Insulated:
    """No heat flow across the edge: an insulated face, a symmetry line or the axis.

    Parameters
    ----------
    reason : str
        ``"insulated"``, ``"symmetry"`` or ``"axis"`` (the axis of an axisymmetric section);
        reported, with no effect on the equations.
    """

    reason: str = "insulated"

    def __post_init__(self) -> None:
        if self.reason not in ("insulated", "symmetry", "axis"):
            raise ModelError(
                f"Insulated reason must be 'insulated', 'symmetry' or 'axis', got {self.reason!r}"
            )


Condition = Convection | Radiation | HeatFlux | FixedTemperature | Insulated
BoundaryCondition = Condition | tuple[Condition, ...]


def conditions(value, group: str) -> tuple[Condition, ...]:
    """The conditions of one edge group as a tuple, checked for a sensible combination.

    One group may combine a Convection with a Radiation (and a HeatFlux); a FixedTemperature
    or an Insulated condition stands alone.
    """
    items = (
        tuple(value) if isinstance(value, Iterable) and not isinstance(value, str) else (value,)
    )
    if not items:
        raise ModelError(f"edge group {group!r} has an empty list of boundary conditions")
    for item in items:
        if not isinstance(item, Convection | Radiation | HeatFlux | FixedTemperature | Insulated):
            raise ModelError(
                f"boundary condition for {group!r} must be Convection, Radiation, HeatFlux, "
                f"FixedTemperature or Insulated, got {item!r}"
            )
    alone = [i for i in items if isinstance(i, FixedTemperature | Insulated)]
    if alone and len(items) > 1:
        raise ModelError(
            f"edge group {group!r}: {type(alone[0]).__name__} cannot be combined with other "
            "conditions"
        )
    kinds = [type(i) for i in items]
    if len(set(kinds)) != len(kinds):
        raise ModelError(f"edge group {group!r} has two conditions of the same kind")
    return items
