"""The checks every run makes on itself: the energy balance, temperatures outside the driving
range, the step against the surface elements' diffusion time, and an unmet stop condition."""

from __future__ import annotations

import numpy as np

from .events import reached
from .model import ThermalModel
from .scales import temperature_span
from .solids import run_range_warnings
from .solution import RunChecks
from .stepper import RunControls, Stepper

ENERGY_BALANCE_TOLERANCE = 1e-8
EXCURSION_TOLERANCE = 1e-3  # as a fraction of the temperature range
# Steps longer than this many surface-element diffusion times leave the first steps' surface
# temperatures off by over 1 % of the driving difference (a fifth of the advisor's default
# tolerance) even with start-up steps (a plane wall at Bi = 1, L/20: 0.42 % at 1, 0.95 % at
# 8, 1.4 % at 20; tests/test_error_estimate_checks.py).
STARTUP_DIFFUSION_LIMIT = 16.0


def check_run(
    model: ThermalModel,
    controls: RunControls,
    stepper: Stepper,
    histories: dict,
    initial_capacity: float,
    smallest_step: float,
    surface_diffusion_time: float,
    startup_steps: int,
) -> RunChecks:
    """The run's checks from its ``histories`` (see :class:`fem.solution.RunChecks`).

    Parameters
    ----------
    initial_capacity : float
        1ᵀ(dC/dT) at the initial field, J/K.
    smallest_step, surface_diffusion_time : float
        s.
    startup_steps : int
        Start-up steps taken since the last restart.
    """
    warnings: list[str] = []
    balance = _energy_balance(model, controls, stepper, histories, initial_capacity, warnings)
    excursion = _excursion(model, controls, stepper, histories, warnings)
    lowest, highest = float(histories["minimum"].min()), float(histories["maximum"].max())
    notes = run_range_warnings(model.materials, lowest, highest)  # once per run
    ratio = smallest_step / surface_diffusion_time
    if ratio > 1.0 and startup_steps == 0 and stepper.rings_without_startup:
        warnings.append(
            f"the time step is {ratio:.3g} times the diffusion time of the smallest surface "
            f"element and no start-up steps were taken: {stepper.title} may oscillate"
        )
    elif ratio > STARTUP_DIFFUSION_LIMIT and not stepper.exact_in_time:
        warnings.append(
            f"the smallest time step is {ratio:.3g} times the diffusion time of the smallest "
            "surface element: start-up steps damp the oscillation, but temperatures near the "
            "heat-exchanging edges are off by more than 1 % of the driving difference "
            "over the first steps; take a smaller time_step (or adaptive steps) for early "
            "times"
        )
    stop = controls.stop
    if (
        stop is not None
        and histories["times"][-1] >= controls.end_time * (1 - 1e-12)
        and not reached(histories, stop)
    ):
        warnings.append(
            f"the stop condition ({stop.quantity} reaching {stop.target:g} degC) was "
            f"not met by end_time = {controls.end_time:g} s"
        )
    return RunChecks(balance, excursion, ratio, tuple(warnings), tuple(notes))


def _energy_balance(model, controls, stepper, histories, capacity, warnings) -> float:
    """Largest |stored − absorbed| relative to the stored-energy change or (for a part that
    only redistributes its heat) to the energy of moving the whole part across the span."""
    span = temperature_span(model)
    stored = histories["stored_energy"]
    scale = max(float(np.abs(stored).max()), capacity * span)
    balance = float(np.abs(stored - histories["absorbed_heat"]).max()) / scale
    if stepper.exact_in_time:  # balanced to the method's own accuracy, not to round-off
        limit = max(ENERGY_BALANCE_TOLERANCE, controls.tolerance / span)
    elif model.is_linear:
        limit = ENERGY_BALANCE_TOLERANCE
    else:
        heat_capacity = max(m.volumetric_heat_capacity for m in model.materials.values())
        newton = 1e3 * controls.newton_tolerance * model.section.facts.volume * heat_capacity
        limit = max(ENERGY_BALANCE_TOLERANCE, newton / scale)
    if balance > limit:
        warnings.append(
            f"energy balance is off by {balance:.1e} of the stored energy change "
            f"(expected below {limit:.0e})"
        )
    return balance


def _excursion(model, controls, stepper, histories, warnings) -> float:
    """How far in K the field left the range of initial and driving temperatures (0 when
    sources or fluxes put heat in regardless of temperature)."""
    unbounded = any(not c.bounded for _, c in model.conditions())
    if unbounded or model.heat_sources:
        return 0.0
    low, high = model.driving_temperatures(controls.end_time)
    excursion = float(
        max(low - histories["minimum"].min(), histories["maximum"].max() - high, 0.0)
    )
    if excursion > EXCURSION_TOLERANCE * max(high - low, 1.0):
        remedy = "refine the mesh near the heat-exchanging edges"
        if not stepper.exact_in_time:
            remedy += " or take a larger step"
        warnings.append(
            f"temperatures left the range of initial and boundary values [{low:.6g}, "
            f"{high:.6g}] degC by {excursion:.3g} K; consistent-capacity elements "
            "overshoot at times far below the diffusion time of the surface elements: " + remedy
        )
    return excursion
