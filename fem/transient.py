"""The time-stepping driver.

Schemes (see :mod:`fem.integrators`): Crank–Nicolson with backward-Euler start-up half-steps
(Rannacher's start-up: they damp the fast modes a sudden plunge excites and use the same matrix
M + ½·Δt·A as Crank–Nicolson), BDF2 started by backward Euler, or backward Euler. Steps are
fixed or chosen by a local error estimate; no step crosses a schedule breakpoint or an output
time. Each step is solved by Newton's method on the free degrees of freedom (simplified: the
factorised tangent is kept while it contracts well); a linear problem converges in one
iteration with a factorisation kept in a small cache, so a linear run with a fixed step
factorises once. Linear models whose schedules only jump can instead take exponential steps
(:mod:`fem.exponential_run`).
"""

from __future__ import annotations

import math
import numbers
import time as clock
from collections import OrderedDict
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import scipy.sparse.linalg as spla

from .errors import ModelError, SolverError
from .exponential_run import check_exponential, run_exponential
from .fields import FieldSeries
from .integrators import (
    METHODS,
    StepFormula,
    bdf2_formula,
    local_error,
    predict,
    theta_formula,
)
from .model import ThermalModel
from .ordering import PermutedFactor, nested_dissection
from .recorder import HistoryRecorder
from .solution import RunChecks, Solution, SolverStats
from .system import assemble, initial_field, inner

DEFAULT_STEPS = 500
DEFAULT_RECORDS = 200  # exponential steps: history records over the run (plus start-up ones)
DEFAULT_OUTPUTS = 50
ENERGY_BALANCE_TOLERANCE = 1e-8
EXCURSION_TOLERANCE = 1e-3  # as a fraction of the temperature range
DEFAULT_RELATIVE_TOLERANCE = 1e-4  # local error, as a fraction of the temperature range
FACTOR_CACHE = 4
# Factor entries of nested dissection against minimum degree (symmetric mode, step matrices):
# 0.95 on the 193k-node L-profile, 0.75 on the 97k-node square, 0.66 at 992k nodes; below
# ~50k unknowns minimum degree is as good or better (1.0-1.6 on small L-profiles).
NESTED_DISSECTION_FROM = 50_000
TANGENT_RATE = 0.5  # a kept Newton tangent must shrink the change at least this much per iteration
LADDER = 2.0  # adaptive steps take values initial_step · 2^k, so few factorisations are made
SOLVERS = (*METHODS, "exponential")


@dataclass(frozen=True)
class StopWhen:
    """End the run when a quantity reaches a target.

    Parameters
    ----------
    quantity : str
        ``"mean"``, ``"minimum"``, ``"maximum"`` or the name of a probe.
    target : float
        Temperature in °C; the run stops at the first step that reaches or crosses it, and
        the crossing time is interpolated within that step.
    """

    quantity: str
    target: float


def solve(
    model: ThermalModel,
    end_time: float,
    *,
    method: str = "crank-nicolson",
    time_step: float | None = None,
    adaptive: bool | None = None,
    tolerance: float | None = None,
    min_step: float | None = None,
    max_step: float | None = None,
    output_interval: float | None = None,
    output_times=None,
    startup_steps: int | None = None,
    stop: StopWhen | None = None,
    newton_tolerance: float = 1e-6,
    max_newton_iterations: int = 30,
    field_folder=None,
    progress: Callable[[float, float, int], None] | None = None,
) -> Solution:
    """Solve the transient conduction problem from t = 0 to ``end_time``.

    Parameters
    ----------
    model : ThermalModel
        The problem.
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
        initial and boundary temperatures.
    min_step, max_step : float, optional
        Bounds of adaptive steps in s (default 1e-9·end_time and end_time).
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
        Iterations allowed per step before :class:`SolverError`.
    field_folder : str or Path, optional
        Write the output fields to this folder as they are produced instead of keeping them in
        memory.
    progress : callable, optional
        Called after every step as ``progress(time, end_time, steps)``.

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
    """
    controls = _RunControls.check(
        model,
        end_time,
        method,
        time_step,
        adaptive,
        tolerance,
        min_step,
        max_step,
        output_interval,
        output_times,
        startup_steps,
        stop,
        newton_tolerance,
        max_newton_iterations,
    )
    return _Run(model, controls, field_folder, progress).execute()


# ---------------------------------------------------------------------------------------------
# Run controls
# ---------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class _RunControls:
    end_time: float
    method: str
    adaptive: bool
    step: float
    tolerance: float
    min_step: float
    max_step: float
    output_times: tuple[float, ...]
    startup_steps: int
    stop: StopWhen | None
    newton_tolerance: float
    max_newton_iterations: int

    @classmethod
    def check(
        cls,
        model,
        end_time,
        method,
        time_step,
        adaptive,
        tolerance,
        min_step,
        max_step,
        output_interval,
        output_times,
        startup_steps,
        stop,
        newton_tolerance,
        max_newton_iterations,
    ) -> _RunControls:
        if not _positive(end_time):
            raise ModelError(f"end_time must be a finite time > 0 s, got {end_time!r}")
        end = float(end_time)
        if method not in SOLVERS:
            raise ModelError(f"method must be one of {SOLVERS}, got {method!r}")
        if method == "exponential":
            check_exponential(model)
        if time_step is not None and (not _positive(time_step) or time_step > end):
            raise ModelError(
                f"time_step must be a time in (0, end_time = {end_time}] s, got {time_step!r}"
            )
        adaptive = time_step is None if adaptive is None else bool(adaptive)
        if method == "exponential":
            adaptive = False  # exact in time between breakpoints: there is no step to adapt
        if startup_steps is None:
            startup_steps = 2 if method == "crank-nicolson" else 1
        if (
            not isinstance(startup_steps, numbers.Integral)
            or isinstance(startup_steps, bool)
            or startup_steps < 0
        ):
            raise ModelError(f"startup_steps must be a whole number >= 0, got {startup_steps!r}")
        if method == "bdf2" and startup_steps < 1:
            raise ModelError("BDF2 needs at least one backward-Euler start-up step")

        times = cls._outputs(end, output_interval, output_times)
        span = _temperature_span(model)
        if tolerance is None:
            tolerance = max(DEFAULT_RELATIVE_TOLERANCE * span, 1e-6)
        elif not _positive(tolerance):
            raise ModelError(
                f"tolerance must be a temperature difference > 0 K, got {tolerance!r}"
            )
        min_step = 1e-9 * end if min_step is None else min_step
        max_step = end if max_step is None else max_step
        for name, value in (("min_step", min_step), ("max_step", max_step)):
            if not _positive(value) or value > end:
                raise ModelError(f"{name} must be a time in (0, end_time] s, got {value!r}")
        if min_step > max_step:
            raise ModelError(f"min_step {min_step} s is above max_step {max_step} s")

        if time_step is not None:
            step = float(time_step)
        elif adaptive:
            step = min(_surface_diffusion_time(model), end / 100)
        elif method == "exponential":
            step = end / DEFAULT_RECORDS
        else:
            step = end / DEFAULT_STEPS
        if not adaptive and output_times is None:
            interval = times[1] - times[0] if len(times) > 1 else end
            step = interval / math.ceil(interval / step - 1e-9)
        step = float(min(max(step, min_step), max_step))

        if stop is not None:
            if not isinstance(stop, StopWhen):
                raise ModelError(f"stop must be a StopWhen, got {stop!r}")
            names = ("mean", "minimum", "maximum", *model.probes)
            if stop.quantity not in names:
                raise ModelError(
                    f"stop quantity must be one of {list(names)}, got {stop.quantity!r}"
                )
        if not _positive(newton_tolerance):
            raise ModelError(f"newton_tolerance must be > 0 K, got {newton_tolerance!r}")
        if not isinstance(max_newton_iterations, int) or max_newton_iterations < 1:
            raise ModelError(
                f"max_newton_iterations must be a whole number >= 1, got {max_newton_iterations!r}"
            )
        return cls(
            end,
            method,
            adaptive,
            step,
            float(tolerance),
            float(min_step),
            float(max_step),
            times,
            int(startup_steps),
            stop,
            float(newton_tolerance),
            max_newton_iterations,
        )

    @staticmethod
    def _outputs(end: float, interval, explicit) -> tuple[float, ...]:
        if explicit is not None:
            values = sorted({float(t) for t in explicit})
            if not values or values[0] <= 0 or values[-1] > end * (1 + 1e-12):
                raise ModelError(
                    f"output_times must lie in (0, end_time = {end}] s, got {list(explicit)!r}"
                )
            return tuple(values)
        if interval is None:
            interval = end / DEFAULT_OUTPUTS
        if not _positive(interval) or interval > end:
            raise ModelError(
                f"output_interval must be a time in (0, end_time = {end}] s, got {interval!r}"
            )
        count = math.ceil(end / float(interval) - 1e-9)
        return tuple(end * k / count for k in range(1, count + 1))


def _positive(value) -> bool:
    return (
        isinstance(value, numbers.Real)
        and not isinstance(value, bool)
        and math.isfinite(value)
        and value > 0
    )


def _temperature_span(model: ThermalModel) -> float:
    low, high = model.driving_temperatures(1e30)
    return max(high - low, 1.0)


def _smallest_surface_edge(model: ThermalModel) -> float:
    mesh = model.section.mesh
    groups = model.exchange_groups or tuple(model.fixed) or tuple(mesh.boundaries)
    facets = np.concatenate([mesh.boundaries[g] for g in groups])
    ends = mesh.p[:, mesh.facets[:, facets]]
    return float(np.linalg.norm(ends[:, 0] - ends[:, 1], axis=0).min())


def _surface_diffusion_time(model: ThermalModel) -> float:
    slowest = min(m.diffusivity for m in model.materials.values())
    return _smallest_surface_edge(model) ** 2 / slowest


# ---------------------------------------------------------------------------------------------
# The run
# ---------------------------------------------------------------------------------------------


@dataclass
class _StepResult:
    """What a step produced: the field, 1ᵀC(T) (J), the heat taken in over the step as the
    scheme integrates it (J, before the multistep correction), the fixed groups' reactions."""

    field: np.ndarray
    stored: float
    heat: float
    reactions: dict[str, float]


class _Run:
    def __init__(self, model: ThermalModel, controls: _RunControls, field_folder, progress):
        self.model = model
        self.c = controls
        self.progress = progress
        self.fields = FieldSeries(field_folder)
        self.factors: OrderedDict = OrderedDict()
        self.operators: dict = {}
        self.explicit: dict = {}
        self.factorisations = 0
        self.factorisation_seconds = 0.0
        self.newton_iterations = 0
        self.max_iterations = 0
        self.solves = 0
        self.ordering = None  # nested dissection of the free degrees of freedom
        self.tangent = None  # (key, factor) of the Newton tangent kept for simplified Newton
        self.last_increment = 0.0

    # -- linear algebra ---------------------------------------------------------------------
    def _factor(self, matrix, symmetric: bool = False):
        """LU of the free block. A symmetric positive definite step matrix (every linear
        problem) needs no pivoting: SuperLU's symmetric mode keeps a symmetric ordering intact
        (with partial pivoting, minimum degree on AᵀA + A factorised ~100× and solved ~25×
        slower at 10k unknowns). The ordering is minimum degree on AᵀA + A for small
        problems and nested dissection of the mesh (:mod:`fem.ordering`, computed once per
        run) from NESTED_DISSECTION_FROM unknowns. Newton matrices that k(T) makes
        unsymmetric pivot as usual, with COLAMD."""
        started = clock.perf_counter()
        free = self.system.free_dofs
        if symmetric and free.size < NESTED_DISSECTION_FROM:
            factor = spla.splu(
                matrix[free][:, free].tocsc(),
                permc_spec="MMD_AT_PLUS_A",
                diag_pivot_thresh=0.0,
                options={"SymmetricMode": True},
            )
        elif symmetric:
            if self.ordering is None:  # every step matrix and tangent has the same pattern
                self.ordering = nested_dissection(
                    matrix[free][:, free].tocsr(), self.system.basis.doflocs[:, free]
                )
            numbered = free[self.ordering]
            factor = PermutedFactor(
                spla.splu(
                    matrix[numbered][:, numbered].tocsc(),
                    permc_spec="NATURAL",
                    diag_pivot_thresh=0.0,
                    options={"SymmetricMode": True},
                ),
                self.ordering,
            )
        else:
            factor = spla.splu(matrix[free][:, free].tocsc(), permc_spec="COLAMD")
        self.factorisations += 1
        self.factorisation_seconds += clock.perf_counter() - started
        return factor

    def _linear_factor(self, formula: StepFormula, step: float, time: float):
        return self._cached_factor(formula.matrix_scale(step), time)

    def _shifted_solver(self, shift: float, time: float):
        """x ↦ (M + shift·A(time))⁻¹x on the free degrees of freedom."""
        return self._cached_factor(shift, time).solve

    def _cached_factor(self, scale: float, time: float):
        """The LU of M + scale·A(time), kept in a small cache."""
        key = (float(f"{scale:.12e}"), self.system.exchange_key(time))
        if key in self.factors:
            self.factors.move_to_end(key)
            return self.factors[key]
        factor = self._factor(
            self.system.capacity + scale * self.system.exchange_operator(time), symmetric=True
        )
        self.factors[key] = factor
        if len(self.factors) > FACTOR_CACHE:
            self.factors.popitem(last=False)
        return factor

    # -- one step ---------------------------------------------------------------------------
    def _step(
        self,
        formula: StepFormula,
        step: float,
        t0: float,
        t1: float,
        states: list[np.ndarray],
        guess: np.ndarray,
    ) -> _StepResult:
        """Solve one step from ``states`` (newest first)."""
        if self.model.is_linear:
            return self._linear_step(formula, step, t0, t1, states)
        return self._newton_step(formula, step, t0, t1, states, guess)

    def _operator(self, time: float):
        """A(t) with its column sums (1ᵀA, for the heat balance), cached by coefficients."""
        key = self.system.exchange_key(time)
        if key not in self.operators:
            operator = self.system.exchange_operator(time)
            self.operators[key] = (operator, np.asarray(operator.sum(axis=0)).ravel())
            if len(self.operators) > FACTOR_CACHE:
                self.operators.pop(next(iter(self.operators)))
        return self.operators[key]

    def _linear_step(self, formula, step, t0, t1, states) -> _StepResult:
        """One linear step, scaled by h/a0:

            (M + s·A1)·T1 = −Σ (a_j/a0)·M·T_j − (1 − β)(h/a0)·(A0·T0 − b0) + β(h/a0)·b1,

        s = β·h/a0. The matrix is factorised once per (s, coefficients); the explicit part of
        a theta step, M − (1 − β)(h/a0)·A0, is kept beside it, so a step costs one solve, one
        matrix-vector product and a few dot products (the heat balance from column sums)."""
        s = self.system
        a0, beta = formula.a[0], formula.beta
        scale = step / a0
        inside0, inside1 = t0 + 1e-9 * step, t1 - 1e-9 * step
        operator1, column1 = self._operator(inside1)
        load1 = s.load(inside1)
        if formula.history == 1 and beta < 1:
            operator0, column0 = self._operator(inside0)
            load0 = s.load(inside0)
            explicit = self._explicit((1 - beta) * scale, inside0)
            rhs = explicit @ states[0] + scale * ((1 - beta) * load0 + beta * load1)
            inflow_old = load0.sum() - inner(column0, states[0])
        else:  # backward Euler and BDF2: no explicit operator part
            history = -sum(a / a0 * u for a, u in zip(formula.a[1:], states, strict=False))
            rhs = s.capacity @ history + scale * beta * load1
            inflow_old = 0.0
        u = np.empty(s.size)
        free = s.free_dofs
        fixed = self.fixed_all
        known = None
        if len(fixed):
            s.impose_fixed(u, inside1)
            coupling = s.capacity[:, fixed] @ u[fixed] + beta * scale * (
                operator1[:, fixed] @ u[fixed]
            )
            known = rhs[free] - coupling[free]
        factor = self._linear_factor(formula, step, inside1)
        if len(fixed):
            u[free] = factor.solve(known)
        else:  # every degree of freedom is free: no gather and scatter around the solve
            u = factor.solve(rhs)
        self.solves += 1
        self.newton_iterations += 1
        self.max_iterations = max(self.max_iterations, 1)

        reactions = {}
        if len(fixed):  # the unenforced rows of the fixed degrees of freedom, in W
            rows = (
                s.capacity[fixed] @ u + beta * scale * (operator1[fixed] @ u) - rhs[fixed]
            ) / scale
            position = {d: i for i, d in enumerate(fixed)}
            reactions = {
                name: float(rows[[position[d] for d in dofs]].sum())
                for name, dofs in s.fixed_dofs.items()
            }
        inflow = beta * (load1.sum() - inner(column1, u)) + (1 - beta) * inflow_old
        heat = step * (inflow + sum(reactions.values()))
        return _StepResult(u, inner(self.capacity_columns, u), float(heat), reactions)

    def _explicit(self, scale: float, time: float):
        """M − scale·A(time), cached beside the factorisations."""
        key = (float(f"{scale:.12e}"), self.system.exchange_key(time))
        if key not in self.explicit:
            self.explicit[key] = (self.system.capacity - scale * self._operator(time)[0]).tocsr()
            if len(self.explicit) > FACTOR_CACHE:
                self.explicit.pop(next(iter(self.explicit)))
        return self.explicit[key]

    def _newton_step(self, formula, step, t0, t1, states, guess) -> _StepResult:
        s = self.system
        inside0, inside1 = t0 + 1e-9 * step, t1 - 1e-9 * step
        known = sum(a * s.stored(u) for a, u in zip(formula.a[1:], states, strict=False)) / step
        inflow_old = 0.0
        if formula.beta < 1:
            outflow0 = s.net_outflow(states[0], inside0)
            known = known + (1 - formula.beta) * outflow0
            inflow_old = -float(outflow0.sum())
        u = guess.copy()
        s.impose_fixed(u, inside1)
        free = s.free_dofs

        def residual(field):
            return (
                formula.a[0] * s.stored(field) / step
                + known
                + formula.beta * s.net_outflow(field, inside1)
            )

        # Simplified Newton: the factorised tangent is kept across iterations and steps (of the
        # same size and formula) while it still contracts the change by TANGENT_RATE or
        # better; otherwise it is refactorised at the current iterate. A step then costs a
        # few solves instead of a factorisation per iteration.
        key = (float(f"{formula.a[0] / step:.12e}"), formula.beta)
        refresh = self.tangent is None or self.tangent[0] != key
        previous = math.inf
        iteration = 0
        while iteration < self.c.max_newton_iterations:
            iteration += 1
            r = residual(u)
            if refresh:
                jacobian = (formula.a[0] / step) * s.capacity_tangent(u) + formula.beta * (
                    s.outflow_tangent(u, inside1)
                )
                self.tangent = (key, self._factor(jacobian, symmetric=self.symmetric_tangent))
                refresh = False
            change = self.tangent[1].solve(-r[free])
            self.solves += 1
            u[free] += change
            largest = float(np.abs(change).max(initial=0.0))
            if largest <= self.c.newton_tolerance:
                break
            refresh = largest > TANGENT_RATE * previous
            previous = largest
        else:
            raise SolverError(
                f"Newton's method did not converge at t = {t1:.6g} s (step {step:.3g} s) in "
                f"{self.c.max_newton_iterations} iterations; the last change was {largest:.3g} "
                f"K and the residual {float(np.abs(residual(u)[free]).max()):.3g} W. Try a "
                "smaller time step or a looser newton_tolerance"
            )
        self.newton_iterations += iteration
        self.max_iterations = max(self.max_iterations, iteration)
        r = residual(u)
        reactions = {name: float(r[d].sum()) for name, d in s.fixed_dofs.items()}
        inflow = formula.beta * -float(s.net_outflow(u, inside1).sum())
        inflow += (1 - formula.beta) * inflow_old
        heat = step * (inflow + sum(reactions.values()))
        return _StepResult(u, float(s.stored(u).sum()), heat, reactions)

    # -- the loop ---------------------------------------------------------------------------
    def execute(self) -> Solution:
        c, model = self.c, self.model
        started = clock.perf_counter()
        self.system = s = assemble(model)
        # Capacity and radiation tangents are symmetric; k(T) adds k'(T)·δ·∇T, which is not.
        self.symmetric_tangent = all(
            isinstance(m.conductivity, float) for m in model.materials.values()
        )
        self.capacity_columns = np.asarray(s.capacity.sum(axis=0)).ravel()  # 1ᵀM
        fixed = [d for dofs in s.fixed_dofs.values() for d in dofs]
        self.fixed_all = np.array(fixed, dtype=np.int64)
        dof_locations = s.basis.doflocs
        assembled = clock.perf_counter()

        u = initial_field(s)
        self.system_initial = u.copy()
        s.impose_fixed(u, 0.0)
        stored = float(s.stored(u).sum())
        recorder = HistoryRecorder(s, dof_locations, self.fields, stored)
        recorder.record(0.0, u, stored, 0.0, dict.fromkeys(s.fixed_dofs, 0.0))
        recorder.store_field(0.0, u)
        initial_stored = stored
        if c.method == "exponential":
            return self._exponential(recorder, started, assembled, initial_stored)

        breakpoints = _breakpoints(model, c.end_time)
        events = sorted(set(c.output_times) | breakpoints | {c.end_time})
        outputs = set(c.output_times)
        history: list[tuple[float, np.ndarray]] = [(0.0, u)]
        step = c.step
        ladder_base = c.step
        intervals = np.diff((0.0, *c.output_times))
        dyadic = c.adaptive and bool(np.allclose(intervals, intervals[0], rtol=1e-9))
        anchor = 0.0  # the last event passed: steps are aligned from here
        if dyadic:
            # Steps of interval/2^k, changed only where they stay aligned, land on every
            # output time without a one-off step (and a one-off factorisation) to reach it.
            ladder_base = float(intervals[0])
            step = self._on_ladder(step, ladder_base)
        absorbed = 0.0
        steps = rejected = startup_done = 0
        startup_total = c.startup_steps
        smallest, largest = math.inf, 0.0
        previous_step = None
        stop_time = None
        stop_side = None
        stop_value = None
        if c.stop is not None:
            stop_value = self._quantity(u, c.stop.quantity)
            stop_side = np.sign(stop_value - c.stop.target)
        t = 0.0
        event = 0
        retrying = False
        while t < c.end_time * (1 - 1e-12):
            while events[event] <= t * (1 + 1e-12):
                event += 1
            gap = events[event] - t
            startup = startup_done < startup_total
            h = step
            if c.method == "bdf2" and previous_step is not None and not startup:
                h = min(h, 2.0 * previous_step)  # BDF2 is zero-stable for ratios below 1 + √2
            if abs(gap - h) <= 1e-9 * h:
                t1 = events[event]  # the step lands on the event: snap away the round-off
            elif gap < h or (
                c.adaptive
                and not startup
                and not retrying
                and gap <= 1.5 * h
                and gap <= c.max_step
            ):
                h, t1 = gap, events[event]
            else:
                t1 = t + h

            past = [state for _, state in reversed(history[-3:])]
            times_past = [tt for tt, _ in reversed(history[-3:])]
            guess = past[0]
            if not model.is_linear and len(history) >= 3:
                guess = predict((t1, *times_past), past)  # Newton starts from the trend
            if startup and c.method == "crank-nicolson":
                formula = theta_formula(1.0)
                half = self._step(formula, h / 2, t, t + h / 2, past[:1], past[0])
                absorbed += self._multistep(formula, half.heat)
                recorder.record(t + h / 2, half.field, half.stored, absorbed, half.reactions)
                result = self._step(formula, h / 2, t + h / 2, t1, [half.field], half.field)
                steps += 1
            elif startup or c.method == "backward-euler":
                formula = theta_formula(1.0)
                result = self._step(formula, h, t, t1, past[:1], guess)
            elif c.method == "crank-nicolson":
                formula = theta_formula(0.5)
                result = self._step(formula, h, t, t1, past[:1], guess)
            else:
                formula = bdf2_formula(h / previous_step)
                result = self._step(formula, h, t, t1, past[:2], guess)
            u1 = result.field

            if c.adaptive and not startup and len(history) >= 3:
                times = (t1, *[tt for tt, _ in reversed(history[-3:])])
                error = float(
                    np.abs(local_error(formula, times, u1, past)[s.free_dofs]).max(initial=0.0)
                )
                factor = 0.9 * (c.tolerance / max(error, 1e-300)) ** (1 / (formula.order + 1))
                if error > c.tolerance and h > c.min_step * (1 + 1e-9):
                    rejected += 1
                    retrying = True  # no stretching to the next event until a step succeeds
                    step = self._on_ladder(max(h * max(factor, 0.2), c.min_step), ladder_base)
                    continue
                if error > c.tolerance:
                    raise SolverError(
                        f"the local error {error:.3g} K at t = {t1:.6g} s exceeds the tolerance "
                        f"{c.tolerance:.3g} K at the smallest step {c.min_step:.3g} s"
                    )
                proposal = min(max(h * min(factor, 2.0), c.min_step), c.max_step)
                if h < step * (1 - 1e-9):  # shortened to meet an event: keep the step earned
                    proposal = step if factor >= 1 else min(step, proposal)
                proposal = self._on_ladder(proposal, ladder_base)
                if dyadic and proposal > h * (1 + 1e-9) and not _aligned(t1 - anchor, proposal):
                    proposal = self._on_ladder(h, ladder_base)  # grow where it stays aligned
                step = proposal
            elif not c.adaptive:
                step = c.step

            retrying = False
            absorbed += self._multistep(formula, result.heat)
            recorder.record(t1, u1, result.stored, absorbed, result.reactions)
            steps += 1
            if startup:
                startup_done += 1
            smallest, largest = min(smallest, h), max(largest, h)
            previous_step = h
            history.append((t1, u1))
            history = history[-3:]
            t = t1
            if any(abs(t - o) <= 1e-9 * max(h, 1.0) for o in outputs):
                recorder.store_field(t, u1)
            if any(abs(t - e) <= 1e-9 * max(h, 1.0) for e in breakpoints) or any(
                abs(t - o) <= 1e-9 * max(h, 1.0) for o in outputs
            ):
                anchor = t
            if any(abs(t - b) <= 1e-9 * max(h, 1.0) for b in breakpoints):
                # A schedule jumps or kinks here: start again as at t = 0, so BDF2 does not
                # difference across the jump and Crank-Nicolson does not ring after it.
                history = [(t, u1)]
                startup_done = 0
                startup_total = max(c.startup_steps, 1 if c.method == "bdf2" else 0)
                previous_step = None
            if self.progress is not None:
                self.progress(t, c.end_time, steps)
            if c.stop is not None:
                v0, v1 = stop_value, self._quantity(u1, c.stop.quantity)
                stop_value = v1
                if np.sign(v1 - c.stop.target) != stop_side:
                    fraction = 1.0 if v1 == v0 else (c.stop.target - v0) / (v1 - v0)
                    stop_time = float(t - h + h * min(max(fraction, 0.0), 1.0))
                    if not any(abs(t - o) <= 1e-9 * max(h, 1.0) for o in outputs):
                        recorder.store_field(t, u1)
                    break
        finished = clock.perf_counter()

        histories = recorder.histories()
        stats = SolverStats(
            method=c.method,
            adaptive=c.adaptive,
            steps=steps,
            rejected_steps=rejected,
            startup_steps=2 * min(startup_done, startup_total)
            if c.method == "crank-nicolson"
            else min(startup_done, startup_total),
            time_step=float(previous_step if c.adaptive and previous_step else c.step),
            smallest_step=float(smallest if steps else c.step),
            largest_step=float(largest if steps else c.step),
            factorisations=self.factorisations,
            newton_iterations=self.newton_iterations,
            max_newton_iterations=self.max_iterations,
            unknowns=s.size,
            assembly_seconds=assembled - started,
            factorisation_seconds=self.factorisation_seconds,
            stepping_seconds=finished - assembled - self.factorisation_seconds,
            solves=self.solves,
        )
        checks = self._checks(
            histories, initial_stored, smallest if steps else c.step, startup_done
        )
        return Solution(
            model=model,
            stats=stats,
            checks=checks,
            final_state=u1.copy() if steps else u.copy(),
            stop_time=stop_time,
            **histories,
        )

    def _exponential(self, recorder, started, assembled, initial_stored) -> Solution:
        c = self.c
        outcome = run_exponential(
            self,
            recorder,
            sorted(_breakpoints(self.model, c.end_time)),
            c.step,
            _surface_diffusion_time(self.model),
        )
        finished = clock.perf_counter()
        histories = recorder.histories()
        stats = SolverStats(
            method=c.method,
            adaptive=False,
            steps=outcome.steps,
            rejected_steps=0,
            startup_steps=0,
            time_step=float(outcome.largest),
            smallest_step=float(outcome.smallest),
            largest_step=float(outcome.largest),
            factorisations=self.factorisations,
            newton_iterations=0,
            max_newton_iterations=0,
            unknowns=self.system.size,
            assembly_seconds=assembled - started,
            factorisation_seconds=self.factorisation_seconds,
            stepping_seconds=finished - assembled - self.factorisation_seconds,
            solves=outcome.solves,
            krylov_dimension=outcome.dimension,
            error_estimate=outcome.estimate,
        )
        checks = self._checks(histories, initial_stored, outcome.smallest, 0)
        return Solution(
            model=self.model,
            stats=stats,
            checks=checks,
            final_state=outcome.final_state.copy(),
            stop_time=outcome.stop_time,
            **histories,
        )

    # -- bookkeeping ------------------------------------------------------------------------
    def _quantity(self, field: np.ndarray, name: str) -> float:
        if name == "mean":
            return inner(self.system.volume_weights, field)
        if name == "minimum":
            return float(field.min())
        if name == "maximum":
            return float(field.max())
        k = list(self.model.probes).index(name)
        return float((self.system.probe_matrix @ field)[k])

    @staticmethod
    def _on_ladder(step: float, base: float) -> float:
        return base * LADDER ** math.floor(math.log(step / base, LADDER) + 1e-9)

    def _inflow(self, field: np.ndarray, time: float) -> float:
        return -float(self.system.net_outflow(field, time).sum())

    def _multistep(self, formula: StepFormula, heat: float) -> float:
        """The stored-energy increment the scheme's heat balance gives for the step.

        One-step formulas store what came in. BDF2 balances a0·E_n+1 + a1·E_n + a2·E_n−1 =
        h·Q_n+1 (a0 + a1 + a2 = 0), so the store grows by (h·Q_n+1 + a2·ΔE_n) / a0.
        """
        increment = heat
        if formula.history == 2:
            increment = (heat + formula.a[2] * self.last_increment) / formula.a[0]
        self.last_increment = increment
        return increment

    def _checks(self, histories, initial_stored, smallest_step, startup) -> RunChecks:
        c, model = self.c, self.model
        warnings = []
        stored = histories["stored_energy"]
        # Relative to the stored-energy change, or (for a part that only redistributes its
        # heat) to the energy of moving the whole part across the temperature span.
        capacity = float(self.system.capacity_tangent(self.system_initial).sum())
        scale = max(float(np.abs(stored).max()), capacity * _temperature_span(model))
        balance = float(np.abs(stored - histories["absorbed_heat"]).max()) / scale
        limit = (
            # exponential steps balance to their own accuracy, not to round-off
            max(ENERGY_BALANCE_TOLERANCE, c.tolerance / _temperature_span(model))
            if c.method == "exponential"
            else ENERGY_BALANCE_TOLERANCE
            if model.is_linear
            else max(
                ENERGY_BALANCE_TOLERANCE,
                1e3
                * c.newton_tolerance
                * model.section.facts.volume
                * max(m.volumetric_heat_capacity for m in model.materials.values())
                / scale,
            )
        )
        if balance > limit:
            warnings.append(
                f"energy balance is off by {balance:.1e} of the stored energy change "
                f"(expected below {limit:.0e})"
            )

        excursion = 0.0
        if not (model.fluxes or model.heat_sources):
            low, high = model.driving_temperatures(c.end_time)
            excursion = float(
                max(low - histories["minimum"].min(), histories["maximum"].max() - high, 0.0)
            )
            if excursion > EXCURSION_TOLERANCE * max(high - low, 1.0):
                remedy = (
                    "refine the mesh near the heat-exchanging edges"
                    if c.method == "exponential"
                    else "refine the mesh near the heat-exchanging edges or take a larger step"
                )
                warnings.append(
                    f"temperatures left the range of initial and boundary values [{low:.6g}, "
                    f"{high:.6g}] degC by {excursion:.3g} K; consistent-capacity elements "
                    "overshoot at times far below the diffusion time of the surface elements: "
                    + remedy
                )

        ratio = smallest_step / _surface_diffusion_time(model)
        if ratio > 1.0 and startup == 0 and c.method == "crank-nicolson":
            warnings.append(
                f"the time step is {ratio:.3g} times the diffusion time of the smallest surface "
                "element and no start-up steps were taken: Crank-Nicolson may oscillate"
            )
        if (
            c.stop is not None
            and histories["times"][-1] >= c.end_time * (1 - 1e-12)
            and not (_reached(histories, c.stop))
        ):
            warnings.append(
                f"the stop condition ({c.stop.quantity} reaching {c.stop.target:g} degC) was "
                f"not met by end_time = {c.end_time:g} s"
            )
        return RunChecks(balance, excursion, ratio, tuple(warnings))


def _aligned(time: float, step: float) -> bool:
    """True when ``time`` is a whole number of ``step``s from 0."""
    cycles = time / step
    return abs(cycles - round(cycles)) <= 1e-6


def _reached(histories, stop: StopWhen) -> bool:
    values = histories["probes"].get(stop.quantity, histories.get(stop.quantity))
    values = np.asarray(values)
    return bool(np.any(np.sign(values - stop.target) != np.sign(values[0] - stop.target)))


def _breakpoints(model: ThermalModel, end: float) -> set[float]:
    points = model.breakpoints(end)
    # Round-off (k·period against end_time) must not make sliver steps: points closer than
    # 1e-9·end_time to the end or to the previous point are one point.
    merged: list[float] = []
    for point in sorted(points):
        if end - point > 1e-9 * end and (not merged or point - merged[-1] > 1e-9 * end):
            merged.append(point)
    return set(merged)
