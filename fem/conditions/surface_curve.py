"""A heat-transfer coefficient or a heat flux as a table of surface temperature: the curve a
quenchant or a boiling liquid is characterised by.

A coefficient table gives h(T_s) piecewise linear, held at its end values beyond the table. A
heat-flux table gives q(T_s) leaving the surface piecewise linear, and beyond its ends the
end's secant coefficient q_end/(T_end − T∞) carries on, so the flux still vanishes at the bath
temperature. A flux table is the better form near the bath, where h = q/(T_s − T∞) is 0/0.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import ModelError
from ..table_integrals import segment_slope
from ..temperatures import ABSOLUTE_ZERO

QUANTITIES = {"coefficient": "W/(m²·K)", "heat_flux": "W/m²"}
NEAR_AMBIENT = 1e-6  # K: closer than this to the ambient, the coefficient is the flux's slope


@dataclass(frozen=True)
class SurfaceCurve:
    """h or q against the surface temperature, piecewise linear.

    Parameters
    ----------
    surface_temperatures : sequence of float
        Strictly increasing surface temperatures in °C (at least two).
    values : sequence of float
        The coefficient h in W/(m²·K) (all > 0) or the heat flux q leaving the surface in
        W/m² (positive when the surface is hotter than the fluid), one per temperature.
    quantity : str
        ``"coefficient"`` (default) or ``"heat_flux"``.

    Examples
    --------
    >>> water = SurfaceCurve((100.0, 400.0, 450.0, 900.0), (3000.0, 4000.0, 400.0, 300.0))
    >>> float(water.coefficient(425.0, 20.0))
    2200.0
    """

    surface_temperatures: tuple[float, ...]
    values: tuple[float, ...]
    quantity: str = "coefficient"

    def __post_init__(self) -> None:
        if self.quantity not in QUANTITIES:
            raise ModelError(
                f"SurfaceCurve quantity must be 'coefficient' or 'heat_flux', got "
                f"{self.quantity!r}",
                argument="quantity",
            )
        try:
            t = np.asarray(self.surface_temperatures, dtype=float)
            v = np.asarray(self.values, dtype=float)
        except (TypeError, ValueError):
            raise ModelError(
                "SurfaceCurve surface_temperatures and values must be lists of numbers, got "
                f"{self.surface_temperatures!r} and {self.values!r}",
                argument="surface_temperatures",
            ) from None
        if t.ndim != 1 or t.shape != v.shape or len(t) < 2:
            raise ModelError(
                "SurfaceCurve needs at least two surface temperatures and as many values, got "
                f"{t.size} and {v.size}",
                argument="values",
            )
        if not (np.all(np.isfinite(t)) and np.all(np.isfinite(v))):
            raise ModelError("SurfaceCurve entries must be finite", argument="values")
        if np.any(np.diff(t) <= 0) or t[0] <= ABSOLUTE_ZERO:
            raise ModelError(
                f"SurfaceCurve surface_temperatures must increase strictly and lie above "
                f"{ABSOLUTE_ZERO:g} degC, got {t.tolist()}",
                argument="surface_temperatures",
            )
        if self.quantity == "coefficient" and np.any(v <= 0):
            raise ModelError(
                f"SurfaceCurve coefficients must be > 0 W/(m^2*K), got {v.tolist()}",
                argument="values",
            )
        object.__setattr__(self, "surface_temperatures", tuple(t.tolist()))
        object.__setattr__(self, "values", tuple(v.tolist()))
        # the table as arrays with its slopes, once: a lumped balance asks for one temperature
        # at a time, thousands of times, where converting the tuples was most of a call
        slopes = np.diff(v) / np.diff(t)
        object.__setattr__(self, "_arrays", (t, v, slopes))

    @property
    def unit(self) -> str:
        return QUANTITIES[self.quantity]

    def check_sign(self, ambient: float) -> None:
        """A flux table must carry heat from the hotter side: q·(T_s − T∞) ≥ 0 at every point."""
        if self.quantity != "heat_flux":
            return
        t, q = np.asarray(self.surface_temperatures), np.asarray(self.values)
        wrong = q * (t - ambient) < 0
        if np.any(wrong):
            i = int(np.argmax(wrong))
            raise ModelError(
                f"the heat flux {q[i]:g} W/m^2 leaving a surface at {t[i]:g} degC flows towards "
                f"the hotter side of a fluid at {ambient:g} degC: it must be >= 0 above the "
                "fluid's temperature and <= 0 below it",
                argument="values",
            )

    def outflow(self, surface, ambient):
        """q(T_s) leaving the surface and dq/dT_s, W/m² and W/(m²·K), for the fluid at
        ``ambient`` °C."""
        t = np.asarray(surface, dtype=float)
        table_t, table_v, slopes = self._arrays
        value = np.interp(t, table_t, table_v)
        slope = segment_slope(t, table_t, slopes)
        if self.quantity == "coefficient":
            return value * (t - ambient), value + slope * (t - ambient)
        secants = [_secant(table_t[i], table_v[i], ambient) for i in (0, -1)]
        below, above = t < table_t[0], t > table_t[-1]
        for outside, secant in ((below, secants[0]), (above, secants[1])):
            if secant is not None:
                value = np.where(outside, secant * (t - ambient), value)
                slope = np.where(outside, secant, slope)
        return value, slope

    def coefficient(self, surface, ambient):
        """h(T_s) = q/(T_s − T∞) (for a flux table; its slope next to the ambient), W/(m²·K)."""
        if self.quantity == "coefficient":
            return np.interp(surface, *self._arrays[:2])
        t = np.asarray(surface, dtype=float)
        q, slope = self.outflow(t, ambient)
        near = np.abs(t - ambient) < NEAR_AMBIENT
        return np.where(near, slope, q / np.where(near, 1.0, t - ambient))

    def describe(self) -> str:
        low, high = min(self.values), max(self.values)
        words = "h" if self.quantity == "coefficient" else "heat flux"
        return (
            f"{words} from a table of surface temperature ({len(self.values)} points, "
            f"{self.surface_temperatures[0]:g}-{self.surface_temperatures[-1]:g} °C, "
            f"{low:.4g}-{high:.4g} {self.unit})"
        )

    def summary(self) -> dict:
        key = "coefficient_W_per_m2_K" if self.quantity == "coefficient" else "heat_flux_W_per_m2"
        return {
            "surface_temperatures_degC": list(self.surface_temperatures),
            key: list(self.values),
        }


def _secant(temperature: float, flux: float, ambient: float) -> float | None:
    """q/(T − T∞) at a table end; None when the end lies at the ambient."""
    if abs(temperature - ambient) < NEAR_AMBIENT or not math.isfinite(flux):
        return None
    return flux / (temperature - ambient)
