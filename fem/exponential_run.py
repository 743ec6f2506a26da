"""Exponential steps: a linear model marched from breakpoint to breakpoint in one step each.

Between breakpoints a linear model whose schedules only jump has constant M, A and b, and
:func:`fem.exponential.krylov_exponential` gives its solution at every time of the interval
from one factorisation and a few tens of triangular solves. The histories are taken on a grid
of record times (uniform, refined geometrically after each breakpoint where the field changes
fastest), the fields at the output times, and a stop condition is located by bisection on the
approximation itself.
"""

from __future__ import annotations

import math
from collections.abc import Iterator

import numpy as np

from .conditions import Condition, conditions
from .errors import ModelError, SolverError
from .events import StopWatch
from .exponential import KrylovExponential, krylov_exponential
from .model import ThermalModel
from .schedules import as_schedule
from .stepper import March, RunContext, Stepper

SHIFT_FRACTION = 1 / 32  # γ ≈ this × the interval (rounded to a power of two seconds)
STARTUP_REFINEMENT = 10  # record times at step/2^k, k = 1..this, after each breakpoint
MAX_DIMENSION = 100
BASIS_MEMORY = 2e9  # bytes the basis may take: caps the dimension on very large meshes
CHUNK = 16  # fields formed at a time: a chunk stays in cache while it is recorded
DEFAULT_RECORDS = 200  # history records over the run (plus the start-up ones)


def check_exponential_parts(materials, boundaries, heat_sources) -> None:
    """Raise ModelError (``argument="method"``) unless a model of these parts can be solved
    by exponential steps: constant properties, linear conditions, schedules that only jump.

    Parameters
    ----------
    materials : dict of str to Material
        Per region.
    boundaries : dict of str to condition or tuple of conditions
        Per edge group.
    heat_sources : dict of str to float or schedule
        Per region, W/m³.
    """
    sources = heat_sources.items()
    varying = [region for region, m in materials.items() if not m.is_constant]
    nonlinear = [(group, item) for group, item in _each(boundaries) if not item.linear]
    if varying or nonlinear:
        reason = (
            f"{nonlinear[0][1].label} on {nonlinear[0][0]!r}"
            if nonlinear
            else f"temperature-dependent properties in region {varying[0]!r}"
        )
        raise ModelError(
            "method 'exponential' needs a linear model (constant properties, no radiation or "
            f"other nonlinear condition), not {reason}: use 'crank-nicolson'",
            argument="method",
        )
    named = [(region, "heat source", as_schedule(q, "heat source")) for region, q in sources]
    named += [
        (group, what, schedule)
        for group, condition in _each(boundaries)
        for what, schedule in condition.named_schedules().items()
    ]
    for where, what, schedule in named:
        if not schedule.is_stepwise:
            raise ModelError(
                f"method 'exponential' needs schedules that only jump; the {what} of "
                f"{where!r} is {type(schedule).__name__}, which changes between its "
                "breakpoints: use 'crank-nicolson'",
                argument="method",
            )


def _each(boundaries) -> Iterator[tuple[str, Condition]]:
    for group, value in boundaries.items():
        for condition in conditions(value, group):
            yield group, condition


class Exponential(Stepper):
    """Exponential steps (:mod:`fem.exponential`) for linear models whose schedules jump."""

    name = "exponential"
    title = "Exponential"
    adapts = False  # exact in time between breakpoints: there is no step to adapt
    default_steps = DEFAULT_RECORDS
    exact_in_time = True

    def check_model(self, model: ThermalModel) -> None:
        check_exponential_parts(model.materials, model.boundaries, model.heat_sources)

    def march(self, run: RunContext) -> March:
        return _ExponentialMarch(run).march()


class _ExponentialMarch:
    """One run by exponential steps, interval by interval."""

    def __init__(self, run: RunContext):
        controls, system = run.controls, run.system
        self.run, self.controls = run, controls
        free = system.free_dofs
        self.capacity_free = system.capacity[free][:, free].tocsr()
        self.max_dimension = int(
            min(MAX_DIMENSION, free.size + 1, max(12, BASIS_MEMORY // (8 * max(free.size, 1))))
        )
        self.outputs = np.array(controls.output_times)
        self.watch = (
            None if controls.stop is None else StopWatch(controls.stop, run.quantity, run.initial)
        )
        self.u = np.array(run.initial)
        self.absorbed = 0.0
        self.steps = self.dimension = 0
        self.estimate = 0.0
        self.smallest, self.largest = math.inf, 0.0
        self.stop_time: float | None = None

    def march(self) -> March:
        edges = sorted({0.0, *self.run.breakpoints, self.controls.end_time})
        for start, end in zip(edges[:-1], edges[1:], strict=True):
            self._interval(start, end)
            if self.stop_time is not None:
                break
        return March(
            steps=self.steps,
            rejected_steps=0,
            startup_steps=0,
            time_step=float(self.largest),
            smallest_step=float(self.smallest),
            largest_step=float(self.largest),
            final_state=self.u.copy(),
            stop_time=self.stop_time,
            krylov_dimension=self.dimension,
            error_estimate=float(self.estimate),
        )

    def _interval(self, start: float, end: float) -> None:
        """One exponential step from ``start`` to ``end`` (or the stop), recorded."""
        system, fixed, free = self.run.system, self.run.fixed, self.run.system.free_dofs
        length = end - start
        inside = start + 1e-9 * length
        operator, load = system.exchange_operator(inside), system.load(inside)
        u = self.u
        if len(fixed):
            before = u[fixed]
            u = u.copy()
            system.impose_fixed(u, inside)
            # a jump of a fixed temperature stores heat at once: the fixed edge supplies it
            self.absorbed += float(self.run.capacity_columns[fixed] @ (u[fixed] - before))
        forcing = load[free] - (operator[free][:, fixed] @ u[fixed] if len(fixed) else 0.0)
        shift = 2.0 ** round(math.log2(length * SHIFT_FRACTION))
        taus = (
            _record_taus(
                start, end, self.controls.step, self.run.surface_diffusion_time, self.outputs
            )
            - start
        )
        approximation, estimate, converged = krylov_exponential(
            self.run.algebra.shifted_solver(shift, inside),
            self.capacity_free,
            operator[free][:, free].tocsr(),
            forcing,
            u[free],
            shift,
            taus,
            self.controls.tolerance,
            self.max_dimension,
        )
        if not converged:
            raise SolverError(
                f"the exponential step from t = {start:.6g} s to {end:.6g} s did not reach the "
                f"tolerance {self.controls.tolerance:.3g} K with {approximation.dimension} basis "
                f"vectors (estimate {estimate:.3g} K): loosen the tolerance or use "
                "'crank-nicolson'"
            )
        self.steps += 1
        self.run.cost.solves += approximation.solves
        self.dimension = max(self.dimension, approximation.dimension)
        self.estimate = max(self.estimate, estimate)
        self.smallest, self.largest = min(self.smallest, length), max(self.largest, length)
        if self.watch is not None:
            crossing = _crossing(approximation, u, free, taus, self.watch.is_across)
            if crossing is not None:
                self.stop_time = start + crossing
                taus = np.append(taus[taus < crossing], crossing)
        ledger = _Ledger(system, approximation, u, free, fixed, operator, load)
        self._record(start, length, u, approximation, ledger, taus)

    def _record(self, start, length, u, approximation, ledger, taus) -> None:
        """Record the interval's states at ``taus`` after ``start``, a chunk at a time."""
        run, fixed, free = self.run, self.run.fixed, self.run.system.free_dofs
        buffer = np.empty((CHUNK, free.size))
        for k in range(0, taus.size, CHUNK):
            chunk = taus[k : k + CHUNK]
            values = approximation.fields(chunk, buffer)
            if len(fixed):
                states = np.tile(u, (chunk.size, 1))
                states[:, free] = values
            else:
                states = values
            times = start + chunk
            run.recorder.record_many(
                times,
                states,
                states @ run.capacity_columns,
                self.absorbed + ledger.absorbed(chunk),
                ledger.reactions(chunk, values),
            )
            last_chunk = k + CHUNK >= taus.size
            for i, time in enumerate(times):
                if np.any(np.abs(self.outputs - time) <= 1e-9 * length) or (
                    self.stop_time is not None and i == chunk.size - 1 and last_chunk
                ):
                    run.recorder.store_field(float(time), states[i])
            field = states[-1]
            run.report(start + float(chunk[-1]), self.steps)
        self.absorbed += float(ledger.absorbed(taus[-1:])[0])
        self.u = field.copy()  # the buffer's rows are not the state's to keep


def _record_taus(
    start: float, end: float, step: float, earliest: float, outputs: np.ndarray
) -> np.ndarray:
    """The record times in (start, end]: a uniform grid of ``step`` from 0, the outputs, the
    end, and start + step/2^k (not before start + earliest) for the fast change after a
    jump."""
    length = end - start
    uniform = step * np.arange(math.floor(start / step) + 1, math.ceil(end / step) + 1)
    early = min(step, length) * 0.5 ** np.arange(1, STARTUP_REFINEMENT + 1)
    early = start + early[early >= earliest]
    times = np.concatenate([uniform, outputs, early, [end]])
    times = np.unique(times[(times > start + 1e-12 * length) & (times <= end * (1 + 1e-12))])
    keep = np.diff(times, prepend=start) > 1e-9 * length  # no near-duplicates
    times = times[keep]
    times[-1] = end
    return times


def _crossing(approximation, u, free, taus, across) -> float | None:
    """The first τ in the interval at which ``across(field)`` turns true (the stop quantity
    crosses its target), by bisection on the approximation itself."""

    def crossed(tau: float) -> bool:
        field = u.copy()
        field[free] = approximation.fields([tau])[0]
        return across(field)

    before = 0.0
    for tau in taus:
        if crossed(float(tau)):
            low, high = before, float(tau)
            for _ in range(60):
                middle = 0.5 * (low + high)
                if crossed(middle):
                    high = middle
                else:
                    low = middle
                if high - low <= 1e-12 * max(high, 1.0):
                    break
            return high
        before = float(tau)
    return None


class _Ledger:
    """The heat taken in over the step and the fixed groups' reactions, from the
    approximation in closed form: the φ2 integral of u gives ∫(b − A·u) dt exactly, so the
    energy balance measures the approximation's own error."""

    def __init__(self, system, approximation: KrylovExponential, u, free, fixed, operator, load):
        self.approximation = approximation
        columns = np.asarray(operator.sum(axis=0)).ravel()  # 1ᵀA
        self.columns_free = columns[free]
        held = u[fixed]
        # the constant part of the inflow 1ᵀ(b − A·u): load less the fixed nodes' share
        self.constant_inflow = float(load.sum()) - float(columns[fixed] @ held)
        self.start_free = u[free]
        self.groups = {}  # per fixed group: 1ᵀM rows, 1ᵀA rows (free part), constant part
        for name, dofs in system.fixed_dofs.items():
            rows = operator[dofs]
            self.groups[name] = (
                np.asarray(system.capacity[dofs][:, free].sum(axis=0)).ravel(),
                np.asarray(rows[:, free].sum(axis=0)).ravel(),
                float(np.asarray(rows[:, fixed].sum(axis=0)).ravel() @ held)
                - float(load[dofs].sum()),
            )

    def absorbed(self, taus: np.ndarray) -> np.ndarray:
        """∫ [1ᵀ(b − A·u) + Σ reactions] dt from the start, J, for each τ."""
        a = self.approximation
        heat = taus * self.constant_inflow - a.functional(self.columns_free, taus, "integral")
        for capacity_row, operator_row, constant in self.groups.values():
            # a reaction is 1ᵀ(M·u' + A·u − b) over the group's rows
            heat = heat + (
                a.functional(capacity_row, taus)
                - float(capacity_row @ self.start_free)
                + a.functional(operator_row, taus, "integral")
                + taus * constant
            )
        return heat

    def reactions(self, taus: np.ndarray, values: np.ndarray) -> dict[str, np.ndarray]:
        """Each fixed group's heat flow into the part at each τ, W."""
        a = self.approximation
        return {
            name: a.functional(capacity_row, taus, "rate") + values @ operator_row + constant
            for name, (capacity_row, operator_row, constant) in self.groups.items()
        }
