"""The lumped-capacitance model: one temperature for the whole part.

ρ·c·V·dT/dt = Σ h_i·A_i·(T∞,i − T) + Σ ε_i·σ·A_i·(T_sur,i⁴ − T⁴) + Σ q_i·A_i + q̇·V.

With constant coefficients and no radiation, T(t) = T∞ + (T0 − T∞)·exp(−t/τ) with
τ = ρ·c·V / Σ h·A and T∞ the h·A-weighted ambient (Incropera et al., *Fundamentals of Heat
and Mass Transfer*, 6th ed., §5.1, eq. 5.6 — from memory). Otherwise the same balance is
integrated in time with the model's own schedules and properties.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy.integrate import solve_ivp

from fem import ThermalModel
from fem.forms import KELVIN, STEFAN_BOLTZMANN

from .errors import AdvisorError


@dataclass(frozen=True)
class LumpedModel:
    """The lumped model of a part (planar: per metre of depth; axisymmetric: revolved).

    Attributes
    ----------
    time_constant : float
        τ = ρ·c·V / Σ h·A_s in s, with the coefficients at t = 0 (radiation linearised there).
    ambient : float
        h·A-weighted ambient temperature T∞ in °C at t = 0.
    initial_temperature : float
        T0 in °C: the volume-weighted mean of the initial state.
    classical : bool
        True when the closed-form exponential is exact for the model's conditions.
    """

    time_constant: float
    ambient: float
    initial_temperature: float
    classical: bool
    model: ThermalModel

    @classmethod
    def of(cls, model: ThermalModel, initial_temperature: float | None = None) -> LumpedModel:
        """The lumped model for the same part, materials and conditions as ``model``."""
        if not model.exchange_groups:
            raise AdvisorError(
                "the model has no edge that exchanges heat, so a lumped model has no time "
                "constant; give at least one edge group a Convection or Radiation condition"
            )
        t0 = _mean_initial(model) if initial_temperature is None else initial_temperature
        conductance, weighted = exchange_conductance(model, t0, 0.0)
        capacity = _capacity(model, t0)
        classical = (
            not model.radiation
            and not model.fixed
            and not model.fluxes
            and not model.heat_sources
            and all(
                c.heat_transfer_coefficient.is_constant and c.ambient.is_constant
                for c in model.convection.values()
            )
            and all(m.is_constant for m in model.materials.values())
        )
        return cls(capacity / conductance, weighted / conductance, float(t0), classical, model)

    def temperature(self, times: np.ndarray) -> np.ndarray:
        """T(t) in °C at ``times`` in s."""
        times = np.asarray(times, dtype=float)
        if self.classical:
            decay = np.exp(-times / self.time_constant)
            return self.ambient + (self.initial_temperature - self.ambient) * decay
        return _integrate(self, times)

    def time_to(self, target: float) -> float | None:
        """Time in s at which T reaches ``target`` °C (classical model); ``None`` if never."""
        if not self.classical:
            return None
        start = self.initial_temperature - self.ambient
        remaining = target - self.ambient
        if start == 0 or remaining / start <= 0 or remaining / start > 1:
            return None
        return self.time_constant * math.log(start / remaining)


def _mean_initial(model: ThermalModel) -> float:
    value = model.initial_temperature
    if isinstance(value, float):
        return value
    facts = model.section.facts
    if isinstance(value, dict):
        return sum(facts.region_volumes[r] * t for r, t in value.items()) / facts.volume
    return float(np.mean(value))  # a field: the nodal mean is close enough for T0


def _capacity(model: ThermalModel, temperature: float) -> float:
    facts = model.section.facts
    return float(
        sum(
            facts.region_volumes[r] * float(m.heat_capacity_at(temperature))
            for r, m in model.materials.items()
        )
    )


def exchange_conductance(
    model: ThermalModel, temperature: float, time: float
) -> tuple[float, float]:
    """Σ h·A (W/K, radiation linearised at ``temperature``) and Σ h·A·T∞ (W)."""
    surfaces = model.section.facts.surface_areas
    conductance = weighted = 0.0
    for name, c in model.convection.items():
        ha = c.heat_transfer_coefficient(time) * surfaces[name]
        conductance += ha
        weighted += ha * c.ambient(time)
    for name, r in model.radiation.items():
        t, s = temperature + KELVIN, r.surroundings(time) + KELVIN
        ha = r.emissivity * STEFAN_BOLTZMANN * (t * t + s * s) * (t + s) * surfaces[name]
        conductance += ha
        weighted += ha * r.surroundings(time)
    return conductance, weighted


def _integrate(lumped: LumpedModel, times: np.ndarray) -> np.ndarray:
    model = lumped.model
    facts = model.section.facts
    surfaces = facts.surface_areas

    def rate(t, y):
        temperature = y[0]
        heat = 0.0
        for name, c in model.convection.items():
            heat += c.heat_transfer_coefficient(t) * surfaces[name] * (c.ambient(t) - temperature)
        for name, r in model.radiation.items():
            heat += (
                r.emissivity
                * STEFAN_BOLTZMANN
                * surfaces[name]
                * ((r.surroundings(t) + KELVIN) ** 4 - (temperature + KELVIN) ** 4)
            )
        for name, f in model.fluxes.items():
            heat += f.flux(t) * surfaces[name]
        for region, q in model.heat_sources.items():
            heat += q(t) * facts.region_volumes[region]
        return [heat / _capacity(model, temperature)]

    end = float(times.max(initial=0.0))
    if end == 0:
        return np.full(times.shape, lumped.initial_temperature)
    result = solve_ivp(
        rate,
        (0.0, end),
        [lumped.initial_temperature],
        method="LSODA",
        t_eval=np.clip(times, 0.0, end),
        rtol=1e-8,
        atol=1e-8,
        max_step=end / 200,
    )
    if not result.success:
        raise AdvisorError(f"the lumped model could not be integrated: {result.message}")
    return result.y[0]
