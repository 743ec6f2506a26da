"""Heat exchange with a fluid: q = h·(T∞ − T) into the part (a Robin condition)."""

from __future__ import annotations

from dataclasses import dataclass

from ..errors import ModelError
from ..schedules import Schedule, schedule_text
from .base import Condition, register, schedule_field, temperature_field


@register
@dataclass(frozen=True)
class Convection(Condition):
    """Heat exchange with a fluid: q = h·(T∞ − T) into the part (a Robin condition).

    Parameters
    ----------
    heat_transfer_coefficient : float or schedule
        h in W/(m²·K); > 0.
    ambient : float or schedule
        Fluid temperature T∞ in °C; above absolute zero.
    """

    name = "convection"
    label = "convection"
    exchanges = True
    units = {"heat_transfer_coefficient": "_W_per_m2_K", "ambient": "_degC"}

    heat_transfer_coefficient: float | Schedule
    ambient: float | Schedule

    def __post_init__(self) -> None:
        h = schedule_field(
            self.heat_transfer_coefficient,
            "Convection heat_transfer_coefficient",
            "heat_transfer_coefficient",
        )
        if h.bounds()[0] <= 0:
            raise ModelError(
                f"Convection heat_transfer_coefficient must be a finite value > 0 W/(m^2*K), "
                f"got {self.heat_transfer_coefficient!r}; use Insulated() for an edge "
                "without heat exchange",
                argument="heat_transfer_coefficient",
            )
        object.__setattr__(self, "heat_transfer_coefficient", h)
        ambient = temperature_field(self.ambient, "Convection ambient", "ambient")
        object.__setattr__(self, "ambient", ambient)

    def driving_temperatures(self, end_time: float) -> tuple[float, ...]:
        return self.ambient.extremes(end_time)

    def exchange_coefficient(self, time: float) -> float:
        return self.heat_transfer_coefficient(time)

    def supplied(self, time: float) -> float:
        return self.heat_transfer_coefficient(time) * self.ambient(time)

    def describe(self, end_time: float) -> str:
        h = schedule_text(self.heat_transfer_coefficient, "W/(m²·K)", end_time)
        return f"convection, h = {h}, to a fluid at {schedule_text(self.ambient, '°C', end_time)}"
