"""Degrees Celsius and kelvin: the one place the two scales meet.

The Python API takes and returns temperatures in °C; laws that need absolute temperature
(radiation) convert here.
"""

from __future__ import annotations

import numbers

import numpy as np

from .errors import ModelError, shown

KELVIN = 273.15  # K at 0 °C
ABSOLUTE_ZERO = -KELVIN  # °C


def to_kelvin(celsius):
    """``celsius`` (°C, number or array) as an absolute temperature in K."""
    return celsius + KELVIN


def above_absolute_zero(value) -> bool:
    """True when ``value`` (°C, number or array) is finite and above absolute zero everywhere."""
    values = np.asarray(value, dtype=float)
    return bool(np.all(np.isfinite(values)) and np.all(values > ABSOLUTE_ZERO))


def check_temperature(value, what: str, argument: str | None = None) -> float:
    """``value`` as a float if it is a finite temperature above absolute zero, °C; a
    :class:`ModelError` naming ``what`` (and ``argument``) otherwise."""
    if not (
        isinstance(value, numbers.Real)
        and not isinstance(value, bool)
        and above_absolute_zero(value)
    ):
        raise ModelError(
            f"{what} must be a temperature above {ABSOLUTE_ZERO:g} degC, "
            f"got {shown(value, 'degC')}",
            argument=argument,
        )
    return float(value)
