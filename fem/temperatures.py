"""Degrees Celsius and kelvin: the one place the two scales meet.

The Python API takes and returns temperatures in °C; laws that need absolute temperature
(radiation) convert here.
"""

from __future__ import annotations

import numpy as np

KELVIN = 273.15  # K at 0 °C
ABSOLUTE_ZERO = -KELVIN  # °C


def to_kelvin(celsius):
    """``celsius`` (°C, number or array) as an absolute temperature in K."""
    return celsius + KELVIN


def above_absolute_zero(value) -> bool:
    """True when ``value`` (°C, number or array) is finite and above absolute zero everywhere."""
    values = np.asarray(value, dtype=float)
    return bool(np.all(np.isfinite(values)) and np.all(values > ABSOLUTE_ZERO))
