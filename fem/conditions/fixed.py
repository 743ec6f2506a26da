"""A prescribed surface temperature (a Dirichlet condition)."""

from __future__ import annotations

from dataclasses import dataclass

from ..schedules import Schedule, schedule_text
from .base import Condition, register, temperature_field


@register
@dataclass(frozen=True)
class FixedTemperature(Condition):
    """A prescribed surface temperature in °C (a Dirichlet condition)."""

    name = "fixed"
    label = "fixed temperature"
    alone = True
    flows = False  # its heat flow is a reaction the solver measures, not a law
    holds_temperature = True
    units = {"temperature": "_degC"}

    temperature: float | Schedule

    def __post_init__(self) -> None:
        temperature = temperature_field(
            self.temperature, "FixedTemperature temperature", "temperature"
        )
        object.__setattr__(self, "temperature", temperature)

    def driving_temperatures(self, end_time: float) -> tuple[float, ...]:
        return self.temperature.extremes(end_time)

    def held_temperature(self, time: float) -> float:
        return self.temperature(time)

    def describe(self, end_time: float) -> str:
        return f"fixed temperature {schedule_text(self.temperature, '°C', end_time)}"
