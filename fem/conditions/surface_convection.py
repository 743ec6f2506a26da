"""Convection whose coefficient follows the surface temperature: q = h(T_s)·(T∞ − T_s) into the
part, from a table of h or of the heat flux against T_s, or from a function h(T_s).

A quench in a liquid passes through film boiling (a vapour blanket, low h), its collapse (a sharp
rise), nucleate boiling (the peak) and single-phase convection. Each stage of a time schedule
may have its own curve (an agitation change at t = 20 s). The field equations use the flux and
its exact tangent dq/dT_s = h + h'(T_s)·(T_s − T∞) (or the flux table's slope); the lumped model,
the Biot numbers and the slowest mode use the secant h(T) at the temperature they ask for, so
Biot numbers over a run follow the curve.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from ..errors import ModelError
from ..schedules import Schedule, schedule_data, schedule_text
from .base import Condition, Linearised, SurfaceEdge, register, temperature_field
from .surface_curve import SurfaceCurve

DERIVATIVE_STEP = 1e-3  # K: central difference of a function h(T_s)

Curve = SurfaceCurve | Callable


@register
@dataclass(frozen=True)
class SurfaceTemperatureConvection(Condition):
    """Convection with a coefficient that depends on the surface temperature.

    Parameters
    ----------
    curve : SurfaceCurve, callable, or sequence of (start time, curve) pairs
        The coefficient (or heat flux) against the surface temperature: a
        :class:`SurfaceCurve`; a function h(T_s) of the surface temperature in °C (numpy
        arrays in, W/(m²·K) out, > 0); or stages ``((0, curve_1), (20, curve_2), ...)``,
        each curve applying from its start time in s (the first at 0) to the next.
    ambient : float or schedule
        Fluid temperature T∞ in °C.

    Examples
    --------
    >>> quench = SurfaceTemperatureConvection(
    ...     SurfaceCurve((100.0, 400.0, 450.0, 900.0), (3000.0, 4000.0, 400.0, 300.0)), 60.0)
    >>> round(quench.linearised(425.0, 0.0).coefficient)
    2200
    """

    name = "surface_convection"
    label = "convection, h of surface temperature"
    linear = False
    exchanges = True
    units = {"ambient": "_degC"}

    curve: Curve | tuple[tuple[float, Curve], ...]
    ambient: float | Schedule

    def __post_init__(self) -> None:
        ambient = temperature_field(
            self.ambient, "SurfaceTemperatureConvection ambient", "ambient"
        )
        object.__setattr__(self, "ambient", ambient)
        object.__setattr__(self, "curve", _stages(self.curve))
        if ambient.is_constant:
            for _, curve in self.curve:
                if isinstance(curve, SurfaceCurve):
                    curve.check_sign(ambient(0.0))

    # -- the curve ----------------------------------------------------------------------------
    def curve_at(self, time: float) -> Curve:
        """The curve that applies at ``time`` s."""
        current = self.curve[0][1]
        for start, curve in self.curve:
            if time >= start:
                current = curve
        return current

    def heat_flux(self, surface, time: float = 0.0):
        """q(T_s) leaving the surface at surface temperature(s) ``surface`` °C, W/m², with
        dq/dT_s in W/(m²·K)."""
        curve, ambient = self.curve_at(time), self.ambient(time)
        if isinstance(curve, SurfaceCurve):
            return curve.outflow(surface, ambient)
        t = np.asarray(surface, dtype=float)
        h = np.asarray(curve(t), dtype=float)
        slope = (curve(t + DERIVATIVE_STEP) - curve(t - DERIVATIVE_STEP)) / (2 * DERIVATIVE_STEP)
        _check_finite(h, slope, t, curve)
        return h * (t - ambient), h + slope * (t - ambient)

    def coefficient(self, surface, time: float = 0.0):
        """The secant h(T_s) = q/(T_s − T∞) at surface temperature(s) ``surface`` °C,
        W/(m²·K)."""
        curve, ambient = self.curve_at(time), self.ambient(time)
        if isinstance(curve, SurfaceCurve):
            return curve.coefficient(surface, ambient)
        return np.asarray(curve(np.asarray(surface, dtype=float)), dtype=float)

    # -- time -------------------------------------------------------------------------------
    def breakpoints(self, end_time: float) -> set[float]:
        stages = {start for start, _ in self.curve[1:] if 0 < start <= end_time}
        return stages | set(self.ambient.breakpoints(end_time))

    def is_constant(self) -> bool:
        return len(self.curve) == 1 and self.ambient.is_constant

    def driving_temperatures(self, end_time: float) -> tuple[float, ...]:
        return self.ambient.extremes(end_time)

    # -- the field equations ------------------------------------------------------------------
    def outflow(self, edge: SurfaceEdge, temperature: np.ndarray, time: float) -> np.ndarray:
        """∫ q(T_s) φ_i dS: the heat leaving through each node, W."""
        return edge.integrate(self.heat_flux(edge.interpolate(temperature), time)[0])

    def outflow_tangent(self, edge: SurfaceEdge, temperature: np.ndarray, time: float):
        """∫ dq/dT_s φ_j φ_i dS, W/K."""
        return edge.exchange(self.heat_flux(edge.interpolate(temperature), time)[1])

    def linearised(self, temperature: float, time: float) -> Linearised:
        """The secant h(T) at surface temperature ``temperature`` °C: the exact flux there."""
        return Linearised(float(self.coefficient(temperature, time)), self.ambient(time))

    # -- descriptions -------------------------------------------------------------------------
    def describe(self, end_time: float) -> str:
        fluid = schedule_text(self.ambient, "°C", end_time)
        stages = [
            (start, curve.describe() if isinstance(curve, SurfaceCurve) else "h = a function")
            for start, curve in self.curve
            if start <= end_time
        ]
        if len(stages) == 1:
            return f"convection, {stages[0][1]}, to a fluid at {fluid}"
        words = "; ".join(f"from {start:g} s {text}" for start, text in stages)
        return f"convection to a fluid at {fluid}: {words}"

    def summary(self) -> dict:
        stages = [
            {
                "from_s": start,
                **(curve.summary() if isinstance(curve, SurfaceCurve) else {"function": True}),
            }
            for start, curve in self.curve
        ]
        return {"kind": self.label, "curve": stages, "ambient_degC": schedule_data(self.ambient)}


def _check_finite(h: np.ndarray, slope: np.ndarray, surface: np.ndarray, curve) -> None:
    """Refuse a coefficient function that gave NaN or infinity (or an h or slope of another
    shape than the temperatures it was given), naming the first surface temperature."""
    h, slope = np.broadcast_to(h, surface.shape), np.broadcast_to(slope, surface.shape)
    bad = ~(np.isfinite(h) & np.isfinite(slope))
    if bad.any():
        raise ModelError(
            f"the heat-transfer coefficient function {getattr(curve, '__name__', curve)!r} "
            f"gave h = {float(h[bad][0]):.6g} W/(m²·K) with a slope of "
            f"{float(slope[bad][0]):.6g} W/(m²·K²) at a surface temperature of "
            f"{float(surface[bad][0]):.6g} °C: both must be finite at every temperature the "
            "surface passes through",
            argument="curve",
        )


def _stages(curve) -> tuple[tuple[float, Curve], ...]:
    """``curve`` as stages ((start, curve), ...) from t = 0, checked."""
    if isinstance(curve, SurfaceCurve) or callable(curve):
        return ((0.0, curve),)
    try:
        stages = tuple((float(start), item) for start, item in curve)
    except (TypeError, ValueError):
        raise ModelError(
            "SurfaceTemperatureConvection curve must be a SurfaceCurve, a function h(T_s) or a "
            f"sequence of (start time, curve) pairs, got {curve!r}",
            argument="curve",
        ) from None
    starts = [start for start, _ in stages]
    increasing = all(b > a for a, b in zip(starts, starts[1:], strict=False))
    if not stages or starts[0] != 0 or not increasing:
        raise ModelError(
            f"SurfaceTemperatureConvection stages must start at 0 s and in increasing order, "
            f"got start times {starts}",
            argument="curve",
        )
    for _, item in stages:
        if not (isinstance(item, SurfaceCurve) or callable(item)):
            raise ModelError(
                f"each stage's curve must be a SurfaceCurve or a function h(T_s), got {item!r}",
                argument="curve",
            )
    return stages
