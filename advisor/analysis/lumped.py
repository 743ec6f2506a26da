"""The lumped-capacitance family: one (or two) temperatures for the whole part.

Classical: ρ·c·V·dT/dt = Σ q_i(T, t)·A_i + q̇·V, with q_i the heat flux each boundary
condition lets into a part at one temperature (h·(T∞ − T), εσ(T_sur⁴ − T⁴), a flux, ...).
With constant coefficients and no radiation, T(t) = T∞ + (T0 − T∞)·exp(−t/τ),
τ = ρ·c·V / Σ h·A and T∞ the h·A-weighted ambient (Incropera et al., *Fundamentals of Heat
and Mass Transfer*, 6th ed., §5.1, eq. 5.6 — from memory); otherwise the same balance is
integrated in time with the model's own schedules and properties, as an enthalpy balance
(:mod:`advisor.analysis.lumped_balance`), so latent heat and coefficients that follow the
surface temperature are taken as they are.

Corrected: the same model with every coefficient scaled to h_eff = h / (1 + h·s/k), s the
section's correction length (:mod:`advisor.analysis.lumped_correction`).

Fitted: a single exponential and a two-node (core and skin) model fitted to the field
(:mod:`advisor.analysis.lumped_fits`). The sums over the part they share are in
:mod:`advisor.analysis.lumped_terms`; this module re-exports the family's public names.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from fem import ThermalModel

from ..errors import AdvisorError
from .lumped_balance import integrate_balance
from .lumped_correction import Correction, correction, correction_factor
from .lumped_fits import (
    FittedExponential,
    TwoNodeModel,
    crossing_time,
    fit_exponential,
    fit_two_node,
)
from .lumped_terms import (
    exchange_conductance,
    heat_capacity,
    mean_coefficient,
    mean_initial,
    stored_enthalpy,
    supplied_heat,
)

__all__ = [
    "Correction",
    "FittedExponential",
    "LumpedModel",
    "TwoNodeModel",
    "correction",
    "correction_factor",
    "crossing_time",
    "exchange_conductance",
    "fit_exponential",
    "fit_two_node",
    "heat_capacity",
    "mean_coefficient",
    "mean_initial",
    "stored_enthalpy",
    "supplied_heat",
]


def _linear_enthalpy(model: ThermalModel, reference: float) -> bool:
    """True when the stored enthalpy is ρ·c·V·(T − T_ref) over the run's temperatures
    (a material with latent heat is not, even with constant specific heat)."""
    low, high = model.driving_temperatures(0.0)
    probe = np.linspace(min(low, reference) - 1.0, max(high, reference) + 1.0, 257)
    straight = heat_capacity(model, reference) * (probe - reference)
    stored = stored_enthalpy(model, probe, reference)
    return bool(np.allclose(stored, straight, rtol=1e-9, atol=0.0))


@dataclass(frozen=True)
class LumpedModel:
    """One temperature for the whole part, for the same conditions as a thermal model.

    Attributes
    ----------
    name : str
        ``"classical"`` or ``"corrected"``.
    time_constant : float
        τ = ρ·c·V / Σ h·A_s in s at t = 0 (radiation linearised there).
    ambient : float
        h·A-weighted ambient temperature in °C at t = 0.
    initial_temperature : float
        T0 in °C, the volume-weighted mean of the initial state.
    closed_form : bool
        True when the exponential is exact (constant conditions, no radiation or sources).
    equilibrium : float
        Where the lumped model heads under the conditions at ``horizon``, °C: the ambient
        raised by sources and fluxes, (Σh·A·T∞ + Σq·A + q̇·V) / Σh·A. For a furnace ramp it is
        where the furnace ends up, not where it starts.
    coefficient_scale : float
        Factor on every surface coefficient (1 for the classical model).
    horizon : float
        The time in s whose conditions give ``equilibrium`` (the end of the run; 0 unless
        given).
    """

    name: str
    time_constant: float
    ambient: float
    initial_temperature: float
    closed_form: bool
    coefficient_scale: float
    equilibrium: float
    model: ThermalModel = field(repr=False)
    horizon: float = 0.0

    @classmethod
    def of(
        cls,
        model: ThermalModel,
        *,
        scale: float = 1.0,
        name: str = "classical",
        initial_temperature: float | None = None,
        horizon: float = 0.0,
    ) -> LumpedModel:
        """The lumped model for the same part, materials and conditions as ``model``; its
        ``equilibrium`` is where the conditions at ``horizon`` s drive it (when they drive it
        nowhere, as a cycle ending where it began may, those at t = 0)."""
        if not model.exchange_groups:
            raise AdvisorError(
                "the model has no edge that exchanges heat, so a lumped model has no time "
                "constant; give at least one edge group a Convection or Radiation condition"
            )
        if model.fixed:
            raise AdvisorError(
                "a lumped model cannot hold a fixed surface temperature; "
                "compare it on a model with convection or radiation instead"
            )
        t0 = mean_initial(model) if initial_temperature is None else initial_temperature
        conductance, weighted = exchange_conductance(model, t0, 0.0, scale)
        closed = (
            all(c.lumped_closed_form() for _, c in model.conditions())
            and not model.heat_sources
            and all(m.is_constant for m in model.materials.values())
            and _linear_enthalpy(model, t0)
        )
        equilibrium = (weighted + supplied_heat(model, t0, 0.0)) / conductance
        late, late_weighted = exchange_conductance(model, t0, horizon, scale)
        if horizon > 0 and late > 0:
            heading = (late_weighted + supplied_heat(model, t0, horizon)) / late
            if abs(heading - t0) > 1e-9 * max(abs(t0), 1.0):
                equilibrium = heading
        return cls(
            name,
            heat_capacity(model, t0) / conductance,
            weighted / conductance,
            float(t0),
            closed,
            scale,
            equilibrium,
            model,
            float(horizon),
        )

    @property
    def heat_capacity(self) -> float:
        """ρ·c·V at the initial temperature, J/K (planar: J/(K·m))."""
        return heat_capacity(self.model, self.initial_temperature)

    @property
    def surface_coefficient(self) -> float:
        """The mean surface coefficient it uses at the start (scaled: h_eff for the corrected
        model), W/(m²·K)."""
        surfaces = self.model.section.facts.surface_areas
        exposed = sum(surfaces[g] for g in self.model.exchange_groups)
        conductance, _ = exchange_conductance(
            self.model, self.initial_temperature, 0.0, self.coefficient_scale
        )
        return conductance / exposed

    def stored_energy(self, temperatures) -> np.ndarray:
        """Heat stored since the start for lumped ``temperatures`` °C, J (planar: J/m): the
        enthalpy Σ V_r·(H_r(T) − H_r(T0)), latent heat included."""
        return stored_enthalpy(self.model, temperatures, self.initial_temperature)

    def temperature(self, times) -> np.ndarray:
        """T(t) in °C at ``times`` in s."""
        times = np.asarray(times, dtype=float)
        if self.closed_form:
            decay = np.exp(-times / self.time_constant)
            return self.ambient + (self.initial_temperature - self.ambient) * decay
        return self._integrate(times)

    def time_to(self, target: float, horizon: float | None = None) -> float | None:
        """Time in s at which T reaches ``target`` °C; ``None`` if never (or, for integrated
        models, not within ``horizon`` s)."""
        if self.closed_form:
            start = self.initial_temperature - self.ambient
            remaining = target - self.ambient
            if start == 0 or remaining / start <= 0 or remaining / start > 1:
                return None
            return self.time_constant * math.log(start / remaining)
        if horizon is None:
            return None
        _, crossing = integrate_balance(
            self.model,
            self.initial_temperature,
            np.array([0.0, horizon]),
            scale=self.coefficient_scale,
            target=target,
        )
        return crossing

    def parameters(self) -> dict[str, float]:
        return {
            "time_constant_s": self.time_constant,
            "ambient_degC": self.ambient,
            "coefficient_scale": self.coefficient_scale,
        }

    def _integrate(self, times: np.ndarray) -> np.ndarray:
        temperatures, _ = integrate_balance(
            self.model, self.initial_temperature, times, scale=self.coefficient_scale
        )
        return temperatures
