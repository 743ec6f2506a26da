"""The lumped-capacitance model: one temperature for the whole part.

ρ·c·V·dT/dt = Σ h_i·A_i·(T∞,i − T), so T(t) = T∞ + (T0 − T∞)·exp(−t/τ) with
τ = ρ·c·V / Σ h_i·A_i and T∞ the h·A-weighted ambient (Incropera et al., *Fundamentals of Heat
and Mass Transfer*, 6th ed., §5.1, eq. 5.6 — from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from fem import ThermalModel

from .errors import AdvisorError


@dataclass(frozen=True)
class LumpedModel:
    """The classical lumped model of a part, from the section's volume and exchanging surface
    (planar: per metre of depth; axisymmetric: the solid of revolution).

    Attributes
    ----------
    time_constant : float
        τ = ρ·c·V / Σ h·A_s in s.
    ambient : float
        h·A-weighted ambient temperature T∞ in °C.
    initial_temperature : float
        T0 in °C.
    """

    time_constant: float
    ambient: float
    initial_temperature: float

    @classmethod
    def of(cls, model: ThermalModel) -> LumpedModel:
        """The lumped model for the same part, material and boundary conditions as ``model``."""
        exchange = model.convection
        if not exchange:
            raise AdvisorError(
                "the model has no edge that exchanges heat, so a lumped model has no time "
                "constant; give at least one edge group a Convection condition"
            )
        surfaces = model.section.facts.surface_areas
        conductance = sum(c.heat_transfer_coefficient * surfaces[n] for n, c in exchange.items())
        ambient = (
            sum(c.heat_transfer_coefficient * surfaces[n] * c.ambient for n, c in exchange.items())
            / conductance
        )
        capacity = model.material.volumetric_heat_capacity * model.section.facts.volume
        return cls(capacity / conductance, ambient, float(model.initial_temperature))

    def temperature(self, times: np.ndarray) -> np.ndarray:
        """T(t) in °C at ``times`` in s."""
        decay = np.exp(-np.asarray(times, dtype=float) / self.time_constant)
        return self.ambient + (self.initial_temperature - self.ambient) * decay

    def time_to(self, target: float) -> float | None:
        """Time in s at which T reaches ``target`` °C; ``None`` if it never does."""
        start = self.initial_temperature - self.ambient
        remaining = target - self.ambient
        if start == 0 or remaining / start <= 0 or remaining / start > 1:
            return None
        return self.time_constant * math.log(start / remaining)
