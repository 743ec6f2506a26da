"""The lumped-capacitance family: one (or two) temperatures for the whole part.

Classical: ρ·c·V·dT/dt = Σ q_i(T, t)·A_i + q̇·V, with q_i the heat flux each boundary
condition lets into a part at one temperature (h·(T∞ − T), εσ(T_sur⁴ − T⁴), a flux, ...).
With constant coefficients and no radiation, T(t) = T∞ + (T0 − T∞)·exp(−t/τ),
τ = ρ·c·V / Σ h·A and T∞ the h·A-weighted ambient (Incropera et al., *Fundamentals of Heat
and Mass Transfer*, 6th ed., §5.1, eq. 5.6 — from memory); otherwise the same balance is
integrated in time with the model's own schedules and properties, as an enthalpy balance
(:mod:`advisor.analysis.lumped_balance`), so latent heat and coefficients that follow the
surface temperature are taken as they are.

Corrected: the same model with every coefficient replaced by h_eff = h / (1 + h·s/k), s the
section's correction length: the first-order perturbation of the slowest mode for small Biot
number, found by one steady solve on the model's own mesh (:mod:`fem.correction_length`).
A lumped model with h_eff then decays at the slowest mode's rate to second order in Bi, for
any section. For a slab, a long cylinder and a sphere s = L/3, R/4, R/5, which is the improved
lumped model h_eff = h / (1 + Bi/β), β = 3, 4, 5 with Bi on the half-thickness or radius, of
Cotta & Mikhailov, *Heat Conduction: Lumped Analysis, Integral Transforms, Symbolic
Computation*, Wiley 1997, ch. 2 (Hermite H1,1/H0,0 approximation; from memory). The shape
factor reported is β = d/s with d the largest conduction distance, so Bi_d/β = h·s/k.

Fitted: a single exponential fitted to the late-time field mean, and a two-node (core and
skin) model fitted to the field mean and slowest point, with parameters to export.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

import numpy as np
from scipy.optimize import least_squares

from fem import ThermalModel

from ..errors import AdvisorError
from .lumped_balance import integrate_balance

if TYPE_CHECKING:
    from .biot import BiotNumber


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
        Where the lumped model heads under the t = 0 conditions, °C: the ambient raised by
        sources and fluxes, (Σh·A·T∞ + Σq·A + q̇·V) / Σh·A.
    coefficient_scale : float
        Factor on every surface coefficient (1 for the classical model).
    """

    name: str
    time_constant: float
    ambient: float
    initial_temperature: float
    closed_form: bool
    coefficient_scale: float
    equilibrium: float
    model: ThermalModel = field(repr=False)

    @classmethod
    def of(
        cls,
        model: ThermalModel,
        *,
        scale: float = 1.0,
        name: str = "classical",
        initial_temperature: float | None = None,
    ) -> LumpedModel:
        """The lumped model for the same part, materials and conditions as ``model``."""
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
        return cls(
            name,
            heat_capacity(model, t0) / conductance,
            weighted / conductance,
            float(t0),
            closed,
            scale,
            (weighted + supplied_heat(model, t0, 0.0)) / conductance,
            model,
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
        """When the core (the slowest point) reaches ``target``."""
        if horizon is None:
            return None
        times = np.linspace(0.0, horizon, 801)
        return crossing_time(
            times, self.states(times)[0], target, self.initial_temperature - self.ambient
        )

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


@dataclass(frozen=True)
class Correction:
    """The corrected lumped model's coefficient factor and how it was found.

    Attributes
    ----------
    shape : float
        β = d/s with d the largest conduction distance: h_eff = h/(1 + Bi_d/β).
    scale : float
        h_eff/h = 1/(1 + h·s/k) at the start.
    length : float
        s in m, the correction length, quoted with ``conductivity``.
    conductivity : float
        k in W/(m·K) that s and the Biot numbers are quoted with (the lowest of the regions at
        the initial mean temperature); every region's own k enters the solve.
    note : str
        How it was found, in words.
    """

    shape: float
    scale: float
    length: float
    conductivity: float
    note: str


def correction_factor(model: ThermalModel, biot: Sequence[BiotNumber]) -> Correction:
    """The corrected lumped model's factor from the section's own correction length.

    One steady solve (:func:`fem.correction_length.correction_length`) at the initial mean
    temperature, coefficients linearised there at t = 0, gives the internal resistance
    R = s/k; h_eff = h/(1 + h̄·R) with h̄ the mean coefficient of the Biot numbers.
    """
    from fem.correction_length import correction_length

    by_name = {b.name: b for b in biot}
    distance = by_name["conduction_distance"]
    t0 = mean_initial(model)
    found = correction_length(model, t0, 0.0)
    conductivity = min(float(m.conductivity_at(t0)) for m in model.materials.values())
    length = found.length(conductivity)
    beta = distance.length / length
    scale = found.coefficient_scale(distance.heat_transfer_coefficient)
    regions = len(model.materials)
    which_k = (
        f"k = {conductivity:.4g} W/(m·K)"
        if regions == 1
        else f"each region's own k in the solve, s quoted with the lowest, {conductivity:.4g} "
        "W/(m·K)"
    )
    if not all(m.is_constant for m in model.materials.values()):
        which_k += f", properties at the initial mean {t0:.4g} °C"
    note = (
        f"correction length s = {1000 * length:.4g} mm from one steady solve on the section "
        f"(the slowest mode to first order in Bi; {which_k}); β = d/s = {beta:.4g} with the "
        f"conduction distance d = {1000 * distance.length:.4g} mm (slab 3, long cylinder 4, "
        f"sphere 5): h_eff = h/(1 + {distance.value:.3g}/{beta:.4g})"
    )
    return Correction(float(beta), float(scale), float(length), conductivity, note)


def correction(model: ThermalModel, biot: Sequence[BiotNumber]) -> tuple[float, float, str]:
    """β, the coefficient scale h_eff/h and the note of :func:`correction_factor`."""
    found = correction_factor(model, biot)
    return found.shape, found.scale, found.note
