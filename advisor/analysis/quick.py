"""A quick check that needs no field solve: Biot numbers, the lumped and corrected curves,
their times to target, the slowest mode and the expected direction of the lumped error — in
well under a second on a coarse mesh, so it fits a design loop.

The slowest point's time comes from the slowest mode alone: once the faster modes have died
away, T − T∞ ≈ a·φ₁·exp(−λ₁t) with a = (φ₁ᵀMθ₀)/(φ₁ᵀMφ₁) the initial field's projection on
the mode (M the capacity matrix, θ₀ = T₀ − T∞), and the slowest point is where a·φ₁ is
farthest from T∞. That holds for a linear model with constant conditions and a uniform steady
state; where the model leaves those assumptions the check says so, in ``assumptions_broken``,
with which way the estimate moves.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from fem import PropertyTable, ThermalModel, assemble
from fem.assembly import initial_field
from fem.modes import Eigenpair, slowest_eigenpair
from fem.system import ConductionSystem

from .assessment import check_request, correction
from .biot import BiotNumber, biot_numbers
from .lumped import LumpedModel
from .modes import SlowestMode, slowest_mode
from .process_words import infer_process, process_words
from .verdict import COMMON_LIMIT

LATENT_PEAK = 3.0  # a specific-heat table peaking above 3× its lowest value holds latent heat


@dataclass(frozen=True)
class QuickCheck:
    """What can be said about the lumped estimate before solving the field.

    Attributes
    ----------
    biot : tuple of BiotNumber
    lumped, corrected : LumpedModel
    mode : SlowestMode
    time_to_target : dict of str to float or None
        ``classical`` and ``corrected`` lumped times, and ``slowest (modal estimate)``: the
        late-stage slowest point, ln(core_to_mean·θ0/θ)/λ₁, in s.
    expected_direction : str
        Which way the lumped estimate will be wrong.
    assumptions_broken : tuple of str
        Where the model leaves the modal estimate's assumptions (nonlinear exchange,
        temperature-dependent properties, latent heat, conditions that change during the run,
        a steady state that is not uniform), each with which way it moves the estimate; empty
        when the estimate applies.
    """

    biot: tuple[BiotNumber, ...]
    lumped: LumpedModel
    corrected: LumpedModel
    mode: SlowestMode
    target: float | None
    time_to_target: dict[str, float | None]
    expected_direction: str
    assumptions_broken: tuple[str, ...] = field(default=())


def quick_check(
    model: ThermalModel,
    *,
    target: float | None = None,
    process: str | None = None,
    end_time: float | None = None,
) -> QuickCheck:
    """Judge the lumped estimate from the model alone (no time stepping).

    Use a coarse mesh: the Biot numbers and the slowest mode converge fast with the mesh.
    ``process`` chooses the words of the expected direction
    (:data:`.process_words.PROCESSES`; inferred from the model when None); ``end_time`` (s),
    the run's end, whose conditions say where the part is heading (a furnace ramp's last
    temperature; default: the conditions at t = 0).

    Examples
    --------
    >>> from geometries import Rectangle
    >>> from fem import Convection, Material, ThermalModel
    >>> oil = Convection(heat_transfer_coefficient=400.0, ambient=60.0)
    >>> bar = ThermalModel(Rectangle(0.06, 0.04).mesh(size=0.005), Material(40.0, 7850.0, 520.0),
    ...     {s: oil for s in ("left", "right", "top", "bottom")}, initial_temperature=850.0)
    >>> check = quick_check(bar, target=200.0)
    >>> check.time_to_target["classical"] < check.time_to_target["slowest (modal estimate)"]
    True
    """
    check_request(model, target=target, process=process, end_time=end_time)
    heading = 0.0 if end_time is None else float(end_time)  # where the conditions end
    lumped = LumpedModel.of(model, horizon=heading)
    drive = lumped.initial_temperature - lumped.equilibrium
    # the surface passes between the initial and the driving temperatures: a coefficient
    # that follows it (radiation, a boiling curve) is sampled over that range
    biot = biot_numbers(model, temperature_range=model.driving_temperatures(0.0))
    _, scale, _ = correction(model, biot)
    corrected = LumpedModel.of(model, scale=scale, name="corrected", horizon=heading)
    system = assemble(model)
    pair = slowest_eigenpair(system, lumped.initial_temperature, 0.0)  # one solve serves both
    mode = slowest_mode(model, system, pair)

    times: dict[str, float | None] = {}
    if target is not None:
        horizon = 20 * lumped.time_constant
        times["classical"] = lumped.time_to(target, horizon)
        times["corrected"] = corrected.time_to(target, horizon)
        times["slowest (modal estimate)"] = _modal_time(system, lumped, target, pair)

    heating = drive < 0
    bi = biot[0]
    if bi.high < COMMON_LIMIT / 10:
        direction = (
            f"Bi = {bi.value:.3g}: the part is close to uniform; the lumped estimate "
            "should be good"
        )
    else:
        direction = (
            "the lumped estimate will run ahead of the slowest point: it will say the "
            "part is "
            + ("heated through" if heating else "cooled")
            + " too early — "
            + process_words(
                process
                or infer_process(model, lumped.initial_temperature, lumped.equilibrium, target),
                "heating" if heating else "cooling",
            )
        )
    reasons = assumptions_broken(model, lumped.initial_temperature)
    return QuickCheck(biot, lumped, corrected, mode, target, times, direction, reasons)


def _modal_time(
    system: ConductionSystem, lumped: LumpedModel, target: float, pair: Eigenpair
) -> float | None:
    """When the slowest point of a·φ₁·exp(−λ₁t) reaches ``target`` °C, s (None if the mode's
    slowest point starts nearer the equilibrium than the target)."""
    dofs, shape = pair.dofs, pair.shape
    # ρc where the eigenpair was found (the lumped mean initial temperature)
    capacity = system.capacity_tangent(np.full(system.size, lumped.initial_temperature))
    capacity = capacity[dofs][:, dofs]
    start = initial_field(system)[dofs] - lumped.equilibrium
    amplitude = (shape @ (capacity @ start)) / (shape @ (capacity @ shape))
    side = math.copysign(1.0, lumped.initial_temperature - lumped.equilibrium)
    slowest = float(np.max(side * amplitude * shape))  # farthest towards the start
    ratio = slowest / (side * (target - lumped.equilibrium))
    return math.log(ratio) / pair.rate if ratio > 1 else None


def assumptions_broken(model: ThermalModel, temperature: float) -> tuple[str, ...]:
    """Where ``model`` leaves the modal estimate's assumptions, each with which way that
    moves the estimate; ``temperature`` °C is where coefficients and properties were taken."""
    reasons = []
    nonlinear = {n: c.name for n, c in model.conditions() if not c.linear}
    radiating = sorted(n for n, kind in nonlinear.items() if kind == "radiation")
    following = sorted(n for n, kind in nonlinear.items() if kind != "radiation")
    if radiating:
        reasons.append(
            f"edges {radiating} radiate: the mode takes their coefficient at "
            f"{temperature:.4g} °C; radiation weakens as the surface nears its surroundings, so "
            "the estimate is early for cooling and late for heating"
        )
    if following:
        reasons.append(
            f"the coefficient on edges {following} follows the surface temperature (a curve or "
            f"a correlation): the mode takes it at {temperature:.4g} °C, which moves the "
            "estimate either way"
        )
    tables = {
        r: m for r, m in model.materials.items() if isinstance(m.conductivity, PropertyTable)
    }
    if tables:
        reasons.append(
            f"the conductivity of {sorted(tables)} depends on temperature: the mode takes it at "
            f"the starting {temperature:.4g} °C, which moves the estimate either way"
        )
    reasons.extend(_heat_capacity_reasons(model, temperature))
    changing = sorted({n for n, c in model.conditions() if not c.is_constant()})
    changing += sorted(r for r, q in model.heat_sources.items() if not q.is_constant)
    if changing:
        reasons.append(
            f"the conditions or sources of {changing} change during the run: the mode takes "
            "them at t = 0, so the estimate moves with the schedule, either way"
        )
    if not _uniform_steady_state(model, temperature):
        reasons.append(
            "the part does not head to one uniform temperature (heat sources, fluxes or "
            "different ambients): the slowest point settles elsewhere than the lumped "
            "equilibrium, so the estimate can be off either way or the target never reached"
        )
    return tuple(reasons)


def _heat_capacity_reasons(model: ThermalModel, temperature: float) -> list[str]:
    """Latent heat (a specific-heat peak) or a specific heat that varies with temperature;
    the mode takes ρc at ``temperature`` °C."""
    latent, varying = [], []
    for region, material in model.materials.items():
        table = material.specific_heat
        if isinstance(table, PropertyTable):
            values = np.asarray(table.values, dtype=float)
            (latent if values.max() > LATENT_PEAK * values.min() else varying).append(region)
    reasons = []
    if latent:
        reasons.append(
            f"{sorted(latent)} hold latent heat (a specific-heat peak): the mode uses one heat "
            f"capacity, at the starting {temperature:.4g} °C, not the phase change's plateau; "
            "the estimate can be off several-fold either way"
        )
    if varying:
        reasons.append(
            f"the specific heat of {sorted(varying)} depends on temperature: the mode takes it "
            f"at the starting {temperature:.4g} °C, which moves the estimate either way"
        )
    return reasons


def _uniform_steady_state(model: ThermalModel, temperature: float) -> bool:
    """True when, under the t = 0 conditions, the part heads to one uniform temperature: no
    sources, no supplied flux, one ambient for every exchanging edge."""
    if any(q(0.0) for q in model.heat_sources.values()):
        return False
    lines = [c.linearised(temperature, 0.0) for _, c in model.conditions() if c.flows]
    if any(line.supplied for line in lines):
        return False
    ambients = [line.ambient for line in lines if line.coefficient > 0]
    return not ambients or max(ambients) - min(ambients) <= 1e-9 * max(
        1.0, max(abs(a) for a in ambients)
    )
