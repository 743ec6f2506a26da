"""The driver: :func:`solve` checks its arguments, assembles the system (unless given one),
records the initial state, hands the run to the method registered under its name
(:mod:`fem.methods`) and gathers the histories, the cost and the run's checks into a
:class:`~fem.solution.Solution`.

Methods (:mod:`fem.multistep`, :mod:`fem.exponential_run`): Crank–Nicolson with
backward-Euler start-up half-steps, BDF2 started by backward Euler, backward Euler, each step
solved once with a cached factorisation (linear models) or by simplified Newton; or, for
linear models whose schedules only jump, exponential steps from breakpoint to breakpoint.
"""

from __future__ import annotations

import time as clock
from collections.abc import Callable, Iterable
from pathlib import Path

from .arguments import (
    DEFAULT_METHOD,
    DEFAULT_NEWTON_ITERATIONS,
    DEFAULT_NEWTON_TOLERANCE,
    RunControls,
    StopWhen,
    check_arguments,
)
from .assembly import assemble, initial_field
from .errors import ModelError
from .events import merged_breakpoints, stop_reason
from .fields import FieldSeries
from .linalg import Cost, LinearAlgebra
from .methods import stepper_for
from .model import ThermalModel
from .recorder import HistoryRecorder
from .run_checks import check_run
from .scales import surface_diffusion_time
from .solution import Solution, SolverStats
from .stepper import Checkpoint, March, RunContext, Stepper
from .system import ConductionSystem

__all__ = ["StopWhen", "solve"]


def solve(
    model: ThermalModel | ConductionSystem,
    end_time: float,
    *,
    method: str = DEFAULT_METHOD,
    time_step: float | None = None,
    adaptive: bool | None = None,
    tolerance: float | None = None,
    min_step: float | None = None,
    max_step: float | None = None,
    output_interval: float | None = None,
    output_times: Iterable[float] | None = None,
    startup_steps: int | None = None,
    stop: StopWhen | None = None,
    newton_tolerance: float = DEFAULT_NEWTON_TOLERANCE,
    max_newton_iterations: int = DEFAULT_NEWTON_ITERATIONS,
    field_folder: str | Path | None = None,
    progress: Callable[[float, float, int], None] | None = None,
    checkpoint: Checkpoint | None = None,
    resume: dict | None = None,
) -> Solution:
    """Solve the transient conduction problem from t = 0 to ``end_time``.

    Parameters
    ----------
    model : ThermalModel or ConductionSystem
        The problem, or its assembled system (``fem.assemble(model)``): a loop that changes
        only coefficients (h, ambients, fluxes, their schedules) gives each run
        ``system.with_boundaries(...)`` and does not assemble again.
    end_time : float
        Duration in s; > 0. With ``stop`` it is the longest the run may take.
    method : str
        ``"crank-nicolson"`` (default), ``"bdf2"``, ``"backward-euler"`` or
        ``"exponential"``: for linear models whose schedules only jump, one step from
        breakpoint to breakpoint, exact in time to ``tolerance`` (see
        :mod:`fem.exponential`); one factorisation and a few tens of triangular solves.
    time_step : float, optional
        Fixed step in s; for fixed steps without ``output_times``, the step used is the largest
        one not above it that fits a whole number of times into every output interval. With
        ``adaptive`` it is the first step. With ``"exponential"`` it is the spacing of the
        history records (default ``end_time / 200``, refined after every breakpoint).
    adaptive : bool, optional
        Control the step by the local error estimate. Default: adaptive when no ``time_step``
        is given.
    tolerance : float, optional
        Largest local error per step in K for adaptive steps (with ``"exponential"``: the
        largest error estimate at any node and record time). Default: 1e-4 of the range of
        initial and boundary temperatures (1e-5 for the first-order backward Euler).
    min_step, max_step : float, optional
        Bounds of adaptive steps in s (default: the smaller of 1e-9·end_time and 1e-6 of the
        surface elements' diffusion time ℓ²/α; and end_time).
    output_interval : float, optional
        Time in s between stored fields (the first at t = 0, the last at ``end_time``).
        Default: ``end_time / 50``.
    output_times : sequence of float, optional
        Explicit times in s for the stored fields, instead of ``output_interval``.
    startup_steps : int, optional
        Crank–Nicolson: leading steps replaced by two backward-Euler half-steps each (default
        2; 0 for plain Crank–Nicolson). BDF2: backward-Euler steps before BDF2 (default 1).
    stop : StopWhen, optional
        End the run when a quantity reaches a target.
    newton_tolerance : float
        Newton's method stops when the largest temperature change is below this, K.
    max_newton_iterations : int
        Iterations allowed per step; a step that needs more is retried smaller, and the run
        stops with :class:`SolverError` only at the smallest step.
    field_folder : str or Path, optional
        Write the output fields to this folder as they are produced instead of keeping them in
        memory.
    progress : callable, optional
        Called after every step as ``progress(time, end_time, steps)``.
    checkpoint : callable, optional
        Offered the run's state after every step as ``checkpoint(time, steps, snapshot)``
        (``snapshot()`` builds it: nested dicts of numbers, strings, None and arrays); the
        multistep methods offer it, ``"exponential"`` does not.
    resume : dict, optional
        A state a checkpoint was given, from a run of the same model and arguments: the run
        continues from it, to the same results as a run never stopped (linear models; within
        ``newton_tolerance`` for nonlinear ones, whose first step after resuming factorises
        its Newton tangent afresh).

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
    >>> result = solve(model, end_time=600.0, time_step=1.0)
    >>> result.stats.factorisations
    1
    >>> bool(result.mean[-1] < 850.0)
    True

    An assembled system serves several runs without assembling again:

    >>> from fem import assemble
    >>> system = assemble(model)
    >>> again = solve(system, end_time=600.0, time_step=1.0)
    >>> bool(again.mean[-1] == result.mean[-1])
    True
    """
    controls = check_arguments(
        _model_of(model),
        end_time,
        method=method,
        time_step=time_step,
        adaptive=adaptive,
        tolerance=tolerance,
        min_step=min_step,
        max_step=max_step,
        output_interval=output_interval,
        output_times=output_times,
        startup_steps=startup_steps,
        stop=stop,
        newton_tolerance=newton_tolerance,
        max_newton_iterations=max_newton_iterations,
    )
    hooks = {"progress": progress, "checkpoint": checkpoint, "resume": resume}
    return _run(model, controls, FieldSeries(field_folder), hooks)


def _model_of(model: ThermalModel | ConductionSystem) -> ThermalModel:
    if isinstance(model, ConductionSystem):
        return model.model
    if isinstance(model, ThermalModel):
        return model
    raise ModelError(
        f"model must be a ThermalModel or its ConductionSystem, got {model!r}", argument="model"
    )


def _run(model, controls: RunControls, fields: FieldSeries, hooks: dict) -> Solution:
    """Assemble (unless given a system), march by the requested method, check the run."""
    started = clock.perf_counter()
    stepper = stepper_for(controls.method)
    if hooks["resume"] is not None and not stepper.resumable:
        raise ModelError(
            f"a {stepper.title} run cannot resume from a checkpoint; run it again from the start",
            argument="resume",
        )
    system = model if isinstance(model, ConductionSystem) else assemble(model)
    assembled = clock.perf_counter()
    run, start = _start(system, controls, fields, hooks)
    march = stepper.march(run)
    finished = clock.perf_counter()
    histories = run.recorder.histories()
    checks = check_run(
        system.model,
        controls,
        stepper,
        histories,
        float(system.capacity_tangent(start).sum()),
        march.smallest_step,
        run.surface_diffusion_time,
        march.recent_startup_steps,
    )
    stats = _stats(
        stepper, controls, march, run.cost, system.size, assembled - started, finished - assembled
    )
    return Solution(
        model=system.model,
        stats=stats,
        checks=checks,
        final_state=march.final_state,
        stop_time=march.stop_time,
        stop_reason=stop_reason(controls.stop, march.stop_time, controls.end_time),
        stop=controls.stop,
        **histories,
    )


def _start(system, controls, fields, hooks):
    """The run's context with the initial state recorded, and the initial field as the model
    gives it (before fixed temperatures are imposed)."""
    model = system.model
    start = initial_field(system)
    initial = start.copy()
    system.impose_fixed(initial, 0.0)
    stored = float(system.stored(initial).sum())
    recorder = HistoryRecorder(system, system.basis.doflocs, fields, stored)
    recorder.record(0.0, initial, stored, 0.0, dict.fromkeys(system.fixed_dofs, 0.0))
    recorder.store_field(0.0, initial)
    cost = Cost()
    run = RunContext(
        system=system,
        controls=controls,
        algebra=LinearAlgebra(system, cost, _step_solver(controls)),
        recorder=recorder,
        cost=cost,
        initial=initial,
        breakpoints=merged_breakpoints(model, controls.end_time),
        surface_diffusion_time=surface_diffusion_time(model),
        **hooks,
    )
    return run, start


def _step_solver(controls: RunControls) -> str | None:
    """The factorisation of the step matrices: the default (Cholesky where installed) for fixed
    steps, SuperLU otherwise. Cholesky factorised 1.4-2.5× slower and solved 1.4-2.5× faster on
    the benchmark square (10k-992k unknowns), so it pays from about 50-150 solves per
    factorisation: fixed steps reach that, adaptive steps (a factorisation per step size) and
    exponential steps (8-33 solves) do not."""
    if controls.adaptive or controls.method == "exponential":
        return "superlu"
    return None


def _stats(
    stepper: Stepper,
    controls: RunControls,
    march: March,
    cost: Cost,
    unknowns: int,
    assembly_seconds: float,
    run_seconds: float,
) -> SolverStats:
    return SolverStats(
        method=stepper.name,
        adaptive=controls.adaptive,
        steps=march.steps,
        rejected_steps=march.rejected_steps,
        startup_steps=march.startup_steps,
        time_step=march.time_step,
        smallest_step=march.smallest_step,
        largest_step=march.largest_step,
        factorisations=cost.factorisations,
        newton_iterations=cost.newton_iterations,
        max_newton_iterations=cost.max_newton_iterations,
        unknowns=unknowns,
        assembly_seconds=assembly_seconds,
        factorisation_seconds=cost.factorisation_seconds,
        stepping_seconds=run_seconds - cost.factorisation_seconds,
        solves=cost.solves,
        krylov_dimension=march.krylov_dimension,
        error_estimate=march.error_estimate,
        retried_steps=march.retried_steps,
        subdivided_steps=march.subdivided_steps,
        damped_iterations=cost.damped_iterations,
    )
