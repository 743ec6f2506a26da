"""Latent heat in the enthalpy: the smooth liquid fraction of a phase change, and the enthalpy
given directly as a table of temperature."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import ModelError
from .temperatures import ABSOLUTE_ZERO


def smooth_fraction(temperature, solidus: float, liquidus: float):
    """The liquid fraction S(T) of a phase change between ``solidus`` and ``liquidus`` °C:
    0 below, 1 above and 3x² − 2x³ between (x the position in the range), so the latent heat it
    releases, L·S'(T), is continuous and Newton's method sees no jump in the tangent."""
    x = _position(temperature, solidus, liquidus)
    if np.ndim(x) == 0:
        return x * x * (3.0 - 2.0 * x)
    weight = x * -2.0  # in place from here: a residual takes it at every quadrature point
    weight += 3.0
    x *= x
    x *= weight
    return x


def smooth_fraction_slope(temperature, solidus: float, liquidus: float):
    """dS/dT of :func:`smooth_fraction`, 1/K: 6x(1 − x)/(liquidus − solidus), peak 1.5/range."""
    x = _position(temperature, solidus, liquidus)
    return 6.0 * x * (1.0 - x) / (liquidus - solidus)


def _position(temperature, solidus: float, liquidus: float):
    """Where ``temperature`` lies in the range, 0 at the solidus to 1 at the liquidus (held
    beyond); minimum and maximum rather than np.clip, whose overhead shows on small models."""
    x = (np.asarray(temperature, dtype=float) - solidus) / (liquidus - solidus)
    if np.ndim(x) == 0:
        return np.minimum(np.maximum(x, 0.0), 1.0)
    np.maximum(x, 0.0, out=x)
    return np.minimum(x, 1.0, out=x)


@dataclass(frozen=True)
class EnthalpyTable:
    """Specific enthalpy h(T) as a table of temperature, latent heat included, J/kg.

    Between the points h is the monotone piecewise-cubic (PCHIP) interpolant, so the specific
    heat dh/dT is continuous and never negative; beyond the ends h continues along the end
    slopes.

    Parameters
    ----------
    temperatures : sequence of float
        Strictly increasing temperatures in °C (at least three).
    values : sequence of float
        Specific enthalpy at those temperatures in J/kg, strictly increasing (any reference).
    """

    temperatures: tuple[float, ...]
    values: tuple[float, ...]

    def __post_init__(self) -> None:
        t = np.asarray(self.temperatures, dtype=float)
        v = np.asarray(self.values, dtype=float)
        if t.ndim != 1 or t.shape != v.shape or len(t) < 3:
            raise ModelError(
                "an enthalpy table needs at least three (temperature, enthalpy) pairs of equal "
                f"length, got {len(t)} temperatures and {len(v)} values"
            )
        if not (np.all(np.isfinite(t)) and np.all(np.isfinite(v))):
            raise ModelError("enthalpy table entries must be finite")
        if np.any(np.diff(t) <= 0) or np.any(t <= ABSOLUTE_ZERO):
            raise ModelError(
                f"enthalpy table temperatures must increase strictly and lie above "
                f"{ABSOLUTE_ZERO:g} degC, got {t.tolist()}"
            )
        if np.any(np.diff(v) <= 0):
            raise ModelError(
                f"enthalpy table values must increase strictly with temperature (a specific "
                f"heat > 0), got {v.tolist()} J/kg"
            )
        object.__setattr__(self, "temperatures", tuple(t.tolist()))
        object.__setattr__(self, "values", tuple(v.tolist()))

    def _curve(self):
        curve = self.__dict__.get("_pchip")
        if curve is None:
            from scipy.interpolate import PchipInterpolator  # only runs that use a table pay

            curve = PchipInterpolator(self.temperatures, self.values, extrapolate=False)
            object.__setattr__(self, "_pchip", curve)
        return curve

    def __call__(self, temperature):
        """h at ``temperature`` °C, J/kg."""
        t = np.asarray(temperature, dtype=float)
        low, high = self.temperatures[0], self.temperatures[-1]
        curve = self._curve()
        inside = curve(np.clip(t, low, high))
        slope_low, slope_high = curve(low, 1), curve(high, 1)
        return (
            inside
            + np.where(t < low, slope_low * (t - low), 0.0)
            + np.where(t > high, slope_high * (t - high), 0.0)
        )

    def slope(self, temperature):
        """dh/dT at ``temperature`` °C: the specific heat, J/(kg·K)."""
        low, high = self.temperatures[0], self.temperatures[-1]
        return self._curve()(np.clip(np.asarray(temperature, dtype=float), low, high), 1)
