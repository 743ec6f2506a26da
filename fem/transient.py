"""The time-stepping driver: Crank–Nicolson with backward-Euler start-up half-steps.

With A = K + H the scheme is

    (M + θ·Δt·A) T⁺ = (M − (1 − θ)·Δt·A) T + Δt·b,

Crank–Nicolson (θ = ½, step Δt) after a few backward-Euler half-steps (θ = 1, step Δt/2) that
damp the fast modes a sudden plunge excites (Rannacher's start-up). Both use the same matrix
M + ½·Δt·A, so one LU factorisation serves the whole run.
"""

from __future__ import annotations

import math
import numbers
import time as clock

import numpy as np
import scipy.sparse.linalg as spla
from skfem import Basis, ElementTriP1, ElementTriP2

from .errors import ModelError
from .model import ThermalModel
from .recorder import HistoryRecorder
from .solution import RunChecks, Solution, SolverStats
from .system import assemble

DEFAULT_STEPS = 500
DEFAULT_OUTPUTS = 50
ENERGY_BALANCE_TOLERANCE = 1e-8
EXCURSION_TOLERANCE = 1e-3  # as a fraction of the temperature range


def solve(
    model: ThermalModel,
    end_time: float,
    *,
    time_step: float | None = None,
    output_interval: float | None = None,
    startup_steps: int = 2,
) -> Solution:
    """Solve the transient conduction problem from t = 0 to ``end_time``.

    Parameters
    ----------
    model : ThermalModel
        The problem.
    end_time : float
        Duration in s; > 0.
    time_step : float, optional
        Largest step in s. The step actually used is the largest one not above it that fits a
        whole number of times into every output interval. Default: ``end_time / 500``.
    output_interval : float, optional
        Time in s between stored fields (the first is at t = 0, the last at ``end_time``).
        Default: ``end_time / 50``.
    startup_steps : int
        Number of leading Crank–Nicolson steps replaced by two backward-Euler half-steps each;
        0 for plain Crank–Nicolson.

    Returns
    -------
    Solution

    Examples
    --------
    >>> from geometries import Rectangle
    >>> from fem import Convection, Insulated, Material, ThermalModel
    >>> section = Rectangle(0.02, 0.01,
    ...     edge_names={"left": "symmetry", "bottom": "symmetry"}).mesh(size=0.002)
    >>> oil = Convection(heat_transfer_coefficient=500.0, ambient=60.0)
    >>> model = ThermalModel(section, Material(45.0, 7850.0, 475.0),
    ...     boundaries={"symmetry": Insulated("symmetry"), "right": oil, "top": oil},
    ...     initial_temperature=850.0)
    >>> result = solve(model, end_time=600.0)
    >>> result.stats.factorisations
    1
    >>> bool(result.mean[-1] < 850.0)
    True
    """
    step, steps_per_output, intervals = _check_arguments(
        end_time, time_step, output_interval, startup_steps
    )
    started = clock.perf_counter()
    system = assemble(model)
    element = ElementTriP1() if model.element_order == 1 else ElementTriP2()
    dof_locations = Basis(model.section.mesh, element).doflocs
    assembled = clock.perf_counter()

    M, A, b = system.capacity, system.operator, system.load
    left = (M + 0.5 * step * A).tocsc()
    factor = spla.splu(left, permc_spec="MMD_AT_PLUS_A")
    factorised = clock.perf_counter()

    recorder = HistoryRecorder(system, dof_locations, model.probes)
    temperature = np.full(system.size, float(model.initial_temperature))
    recorder.record(0.0, temperature)
    recorder.store_field(0.0, temperature)

    n_steps = steps_per_output * intervals
    startup = min(startup_steps, n_steps)
    half_steps = 0
    now = 0.0
    for k in range(1, n_steps + 1):
        if k <= startup:
            for _ in range(2):  # backward Euler over Δt/2, same matrix M + ½·Δt·A
                previous = temperature
                temperature = factor.solve(M @ previous + 0.5 * step * b)
                recorder.absorbed_heat += 0.5 * step * recorder.heat_flow_total(temperature)
                half_steps += 1
                now += 0.5 * step
                if half_steps % 2:
                    recorder.record(now, temperature)
        else:
            previous = temperature
            temperature = factor.solve(M @ previous - 0.5 * step * (A @ previous) + step * b)
            midpoint = 0.5 * (previous + temperature)
            recorder.absorbed_heat += step * recorder.heat_flow_total(midpoint)
        now = k * step  # no drift from repeated additions
        recorder.record(now, temperature)
        if k % steps_per_output == 0:
            recorder.store_field(now, temperature)
    finished = clock.perf_counter()

    histories = recorder.histories()
    stats = SolverStats(
        method="crank-nicolson",
        steps=n_steps + startup,
        startup_steps=2 * startup,
        time_step=step,
        factorisations=1,
        unknowns=system.size,
        assembly_seconds=assembled - started,
        factorisation_seconds=factorised - assembled,
        stepping_seconds=finished - factorised,
    )
    checks = _run_checks(model, histories, step, startup)
    return Solution(model=model, stats=stats, checks=checks, **histories)


def _check_arguments(end_time, time_step, output_interval, startup_steps):
    """Validate the run controls; return the step, steps per output and output intervals."""
    if not _positive(end_time):
        raise ModelError(f"end_time must be a finite time > 0 s, got {end_time!r}")
    if output_interval is None:
        output_interval = end_time / DEFAULT_OUTPUTS
    if not _positive(output_interval) or output_interval > end_time:
        raise ModelError(
            f"output_interval must be a time in (0, end_time = {end_time}] s, "
            f"got {output_interval!r}"
        )
    if time_step is None:
        time_step = end_time / DEFAULT_STEPS
    if not _positive(time_step) or time_step > end_time:
        raise ModelError(
            f"time_step must be a time in (0, end_time = {end_time}] s, got {time_step!r}"
        )
    if (
        not isinstance(startup_steps, numbers.Integral)
        or isinstance(startup_steps, bool)
        or (startup_steps < 0)
    ):
        raise ModelError(f"startup_steps must be a whole number >= 0, got {startup_steps!r}")
    end_time, time_step, output_interval = (
        float(end_time),
        float(time_step),
        float(output_interval),
    )
    intervals = math.ceil(end_time / output_interval - 1e-9)
    interval = end_time / intervals
    steps_per_output = math.ceil(interval / time_step - 1e-9)
    return interval / steps_per_output, steps_per_output, intervals


def _positive(value) -> bool:
    return isinstance(value, numbers.Real) and math.isfinite(value) and value > 0


def _run_checks(model: ThermalModel, histories: dict, step: float, startup: int) -> RunChecks:
    warnings = []
    stored, absorbed = histories["stored_energy"], histories["absorbed_heat"]
    scale = max(np.abs(stored).max(), np.finfo(float).tiny)
    balance = float(np.abs(stored - absorbed).max() / scale)
    if balance > ENERGY_BALANCE_TOLERANCE:
        warnings.append(
            f"energy balance is off by {balance:.1e} of the stored energy change "
            f"(expected below {ENERGY_BALANCE_TOLERANCE:.0e})"
        )

    bounds = [model.initial_temperature] + [c.ambient for c in model.convection.values()]
    low, high = min(bounds), max(bounds)
    excursion = float(
        max(low - histories["minimum"].min(), histories["maximum"].max() - high, 0.0)
    )
    if excursion > EXCURSION_TOLERANCE * max(high - low, 1.0):
        warnings.append(
            f"temperatures left the range of initial and ambient values [{low}, {high}] degC "
            f"by {excursion:.3g} K; consistent-capacity elements overshoot when the step is far "
            "below the diffusion time of the surface elements: refine the mesh near the "
            "heat-exchanging edges or take a larger step"
        )

    ratio = _step_to_surface_diffusion(model, step)
    if ratio > 1.0 and startup == 0:
        warnings.append(
            f"the time step is {ratio:.3g} times the diffusion time of the smallest surface "
            "element and no start-up steps were taken: Crank-Nicolson may oscillate"
        )
    return RunChecks(balance, excursion, ratio, tuple(warnings))


def _step_to_surface_diffusion(model: ThermalModel, step: float) -> float:
    mesh = model.section.mesh
    facets = [mesh.boundaries[name] for name in model.exchange_groups]
    if not facets:
        return 0.0
    ends = mesh.p[:, mesh.facets[:, np.concatenate(facets)]]
    smallest = float(np.linalg.norm(ends[:, 0] - ends[:, 1], axis=0).min())
    return step / (smallest**2 / model.material.diffusivity)
