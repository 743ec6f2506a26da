"""A prescribed heat flux into the part, whatever its temperature."""

from __future__ import annotations

from dataclasses import dataclass

from ..schedules import Schedule, schedule_text
from .base import Condition, register, schedule_field


@register
@dataclass(frozen=True)
class HeatFlux(Condition):
    """A prescribed heat flux into the part, q in W/m² (negative for heat leaving)."""

    name = "flux"
    label = "heat flux"
    bounded = False  # heat goes in whatever the temperature
    units = {"flux": "_W_per_m2"}

    flux: float | Schedule

    def __post_init__(self) -> None:
        object.__setattr__(self, "flux", schedule_field(self.flux, "HeatFlux flux", "flux"))

    def supplied(self, time: float) -> float:
        return self.flux(time)

    def lumped_closed_form(self) -> bool:
        return False  # it moves the lumped equilibrium away from the ambient

    def describe(self, end_time: float) -> str:
        return f"heat flux into the part {schedule_text(self.flux, 'W/m²', end_time)}"
