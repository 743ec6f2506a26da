"""Sums over the whole part that every lumped balance uses, each at one temperature: the mean
initial state, the heat capacity ρ·c·V, the exchange conductance Σ h·A and its ambient, the
heat supplied by fluxes and sources, and the stored enthalpy."""

from __future__ import annotations

import numpy as np

from fem import ThermalModel


def mean_initial(model: ThermalModel) -> float:
    """Volume-weighted mean of the initial state, °C."""
    value = model.initial_temperature
    if isinstance(value, float):
        return value
    facts = model.section.facts
    if isinstance(value, dict):
        return sum(facts.region_volumes[r] * t for r, t in value.items()) / facts.volume
    return float(np.mean(value))  # a field: the nodal mean is close enough for T0


def heat_capacity(model: ThermalModel, temperature: float) -> float:
    """Σ ρ·c(T)·V over the regions, J/K (planar: J/(K·m))."""
    facts = model.section.facts
    return float(
        sum(
            facts.region_volumes[r] * float(m.heat_capacity_at(temperature))
            for r, m in model.materials.items()
        )
    )


def exchange_conductance(
    model: ThermalModel, temperature: float, time: float, scale: float = 1.0
) -> tuple[float, float]:
    """Σ h·A (W/K) and Σ h·A·T∞ (W) over the boundary conditions, each linearised at the
    surface ``temperature`` °C and ``time`` s (:meth:`fem.conditions.Condition.linearised`),
    coefficients multiplied by ``scale``."""
    surfaces = model.section.facts.surface_areas
    conductance = weighted = 0.0
    for name, condition in model.conditions():
        if condition.flows:
            line = condition.linearised(temperature, time)
            ha = scale * line.coefficient * surfaces[name]
            conductance += ha
            weighted += ha * line.ambient
    return conductance, weighted


def mean_coefficient(model: ThermalModel, temperature: float, time: float) -> float:
    """Surface-weighted mean of h over the exchanging edges, each condition linearised at
    ``temperature`` °C, W/(m²·K)."""
    surfaces = model.section.facts.surface_areas
    conductance, _ = exchange_conductance(model, temperature, time)
    return conductance / sum(surfaces[g] for g in model.exchange_groups)


def supplied_heat(model: ThermalModel, temperature: float, time: float) -> float:
    """Heat into the part that does not depend on its temperature (fluxes and sources), W."""
    facts = model.section.facts
    supplied = sum(
        c.linearised(temperature, time).supplied * facts.surface_areas[name]
        for name, c in model.conditions()
        if c.flows
    )
    return supplied + sum(q(time) * facts.region_volumes[r] for r, q in model.heat_sources.items())


def stored_enthalpy(model: ThermalModel, temperatures, reference: float) -> np.ndarray:
    """Σ V_r·(H_r(T) − H_r(T_ref)) over the regions for one temperature per entry of
    ``temperatures`` °C, J (planar: J/m): sensible and latent heat."""
    volumes = model.section.facts.region_volumes
    t = np.asarray(temperatures, dtype=float)
    return sum(
        volumes[r] * np.asarray(m.enthalpy(t, reference), dtype=float)
        for r, m in model.materials.items()
    )
