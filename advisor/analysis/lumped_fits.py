"""Lumped models fitted to a field: a single exponential fitted to the late-time field mean,
and a two-node (core and skin) model fitted to the field mean and slowest point, with
parameters to export; and the crossing rule every time the advisor reads uses."""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

if TYPE_CHECKING:
    from .lumped import LumpedModel


@dataclass(frozen=True)
class FittedExponential:
    """T = T∞ + amplitude·exp(−t/τ), fitted to the late-time field mean.

    ``amplitude`` differs from T0 − T∞ by the energy the fast modes carry off early: the
    intercept of the late-time straight line in log(T̄ − T∞).
    """

    time_constant: float
    amplitude: float
    ambient: float
    name: str = "fitted exponential"

    def temperature(self, times) -> np.ndarray:
        return self.ambient + self.amplitude * np.exp(
            -np.asarray(times, float) / self.time_constant
        )

    def time_to(self, target: float, horizon: float | None = None) -> float | None:
        ratio = (target - self.ambient) / self.amplitude
        if ratio <= 0:
            return None
        return float(max(self.time_constant * math.log(1 / ratio), 0.0))

    def parameters(self) -> dict[str, float]:
        return {
            "time_constant_s": self.time_constant,
            "amplitude_K": self.amplitude,
            "ambient_degC": self.ambient,
        }


def fit_exponential(times, mean, ambient: float, initial: float) -> FittedExponential | None:
    """Fit the late decay of ``mean`` (between 50 % and 2 % of the initial difference left);
    ``None`` when the run does not get that far."""
    theta = (np.asarray(mean) - ambient) / (initial - ambient)
    late = (theta < 0.5) & (theta > 0.02)
    if np.count_nonzero(late) < 5:
        return None
    slope, intercept = np.polyfit(np.asarray(times)[late], np.log(theta[late]), 1)
    if slope >= 0:
        return None
    return FittedExponential(
        float(-1.0 / slope), float((initial - ambient) * math.exp(intercept)), float(ambient)
    )


@dataclass(frozen=True)
class TwoNodeModel:
    """A core and a skin node: C_core·T_c' = G·(T_s − T_c), C_skin·T_s' = G·(T_c − T_s) +
    H·(T∞ − T_s). Capacities in J/K, conductances in W/K (planar: per metre of depth); the
    mean is (C_core·T_c + C_skin·T_s)/(C_core + C_skin) and the core is the slowest point."""

    core_capacity: float
    skin_capacity: float
    internal_conductance: float
    surface_conductance: float
    ambient: float
    initial_temperature: float
    name: str = "two-node"

    def states(self, times) -> np.ndarray:
        """(core, skin, mean) temperatures at ``times``, shape (3, n)."""
        c1, c2, g, h = (
            self.core_capacity,
            self.skin_capacity,
            self.internal_conductance,
            self.surface_conductance,
        )
        system = np.array([[-g / c1, g / c1], [g / c2, -(g + h) / c2]])
        start = np.full(2, self.initial_temperature - self.ambient)
        rates, modes = np.linalg.eig(system)  # two real, distinct, negative rates
        weights = np.linalg.solve(modes, start)
        t = np.asarray(times, float)
        values = (modes * weights) @ np.exp(np.outer(rates, t))
        mean = (c1 * values[0] + c2 * values[1]) / (c1 + c2)
        return np.vstack([values, mean]) + self.ambient

    def temperature(self, times) -> np.ndarray:
        """The mean temperature, °C."""
        return self.states(times)[2]

    def time_to(self, target: float, horizon: float | None = None) -> float | None:
        """When the core (the slowest point) reaches ``target`` within ``horizon`` s: the
        first sample past it brackets the root, which Brent's method then solves (a part much
        faster than the horizon crosses within the first sample interval)."""
        if horizon is None:
            return None
        side = np.sign(self.initial_temperature - self.ambient)
        times = np.linspace(0.0, horizon, 801)
        remaining = (self.states(times)[0] - target) * side  # > 0 until reached
        reached = np.flatnonzero(remaining <= 0)
        if len(reached) == 0:
            return None
        i = int(reached[0])
        if i == 0 or remaining[i] == 0:
            return float(times[i])

        from scipy.optimize import brentq  # 0.12 s to import: not for a quick check

        def core_minus_target(t: float) -> float:
            return float(self.states([t])[0][0] - target)

        return float(brentq(core_minus_target, times[i - 1], times[i], xtol=1e-13 * times[i]))

    def parameters(self) -> dict[str, float]:
        return {
            "core_capacity_J_per_K": self.core_capacity,
            "skin_capacity_J_per_K": self.skin_capacity,
            "internal_conductance_W_per_K": self.internal_conductance,
            "surface_conductance_W_per_K": self.surface_conductance,
            "ambient_degC": self.ambient,
        }


def fit_two_node(times, mean, slowest, lumped: LumpedModel) -> TwoNodeModel | None:
    """Fit the skin's share of the capacity and the internal conductance to the field's mean
    and slowest point (total capacity and surface conductance stay those of the part)."""
    if not lumped.closed_form:
        return None
    capacity = lumped.heat_capacity
    surface = capacity / lumped.time_constant
    drive = lumped.initial_temperature - lumped.equilibrium
    sample = np.linspace(0, len(times) - 1, min(len(times), 120)).astype(int)
    t = np.asarray(times)[sample]
    targets = np.concatenate([np.asarray(mean)[sample], np.asarray(slowest)[sample]])

    def model_of(x):
        share, log_ratio = x
        return TwoNodeModel(
            float(capacity * (1 - share)),
            float(capacity * share),
            float(surface * math.exp(log_ratio)),
            surface,
            lumped.ambient,
            lumped.initial_temperature,
        )

    def residual(x):
        states = model_of(x).states(t)
        return (np.concatenate([states[2], states[0]]) - targets) / abs(drive)

    from scipy.optimize import least_squares

    fit = least_squares(residual, x0=[0.5, math.log(5.0)], bounds=([0.02, -3.0], [0.98, 8.0]))
    return model_of(fit.x) if fit.success else None


def crossing_time(times, history, target: float, drive: float) -> float | None:
    """First time ``history`` reaches ``target`` coming from the side of the initial value
    (``drive`` = T0 − T∞ gives the direction), interpolated linearly within the step."""
    remaining = (np.asarray(history) - target) * np.sign(drive)  # > 0 until reached
    reached = np.flatnonzero(remaining <= 0)
    if len(reached) == 0:
        return None
    i = int(reached[0])
    if i == 0:
        return float(times[0])
    r0, r1 = remaining[i - 1], remaining[i]
    return float(times[i - 1] + (times[i] - times[i - 1]) * r0 / (r0 - r1))
