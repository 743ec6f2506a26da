"""The run of a linear model by exponential steps: one step from breakpoint to breakpoint.

Between breakpoints a linear model whose schedules only jump (:attr:`is_stepwise`) has constant
M, A and b, and :func:`fem.exponential.krylov_exponential` gives its solution at every time of
the interval from one factorisation and a few tens of triangular solves. The histories are
taken on a grid of record times (uniform, refined geometrically after each breakpoint where
the field changes fastest), the fields at the output times, and a stop condition is located by
bisection on the approximation itself.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .boundary import Radiation, conditions
from .errors import ModelError, SolverError
from .exponential import KrylovExponential, krylov_exponential
from .schedules import as_schedule

SHIFT_FRACTION = 1 / 32  # γ ≈ this × the interval (rounded to a power of two seconds)
STARTUP_REFINEMENT = 10  # record times at step/2^k, k = 1..this, after each breakpoint
MAX_DIMENSION = 100
BASIS_MEMORY = 2e9  # bytes the basis may take: caps the dimension on very large meshes
CHUNK = 16  # fields formed at a time: a chunk stays in cache while it is recorded


@dataclass
class ExponentialOutcome:
    steps: int
    solves: int
    dimension: int
    final_state: np.ndarray
    stop_time: float | None
    smallest: float
    largest: float
    estimate: float


def check_exponential(model) -> None:
    """Raise ModelError unless ``model`` can be solved by exponential steps."""
    check_exponential_parts(model.materials, model.boundaries, model.heat_sources)


def check_exponential_parts(materials, boundaries, heat_sources) -> None:
    """The same check on a model's parts: materials (region → Material), boundaries (group →
    condition or conditions) and heat sources (region → value or schedule), before any mesh
    exists."""
    varying = [region for region, m in materials.items() if not m.is_constant]
    radiating = [group for group, c in _each(boundaries) if isinstance(c, Radiation)]
    if varying or radiating:
        reason = (
            f"radiation on {radiating[0]!r}"
            if radiating
            else f"temperature-dependent properties in region {varying[0]!r}"
        )
        raise ModelError(
            "method 'exponential' needs a linear model (constant properties, no radiation), "
            f"not {reason}: use 'crank-nicolson'"
        )
    named = [(region, "heat source", q) for region, q in heat_sources.items()]
    for group, c in _each(boundaries):
        for what in ("heat_transfer_coefficient", "ambient", "flux", "temperature"):
            if hasattr(c, what):
                named.append((group, what, getattr(c, what)))
    for where, what, value in named:
        schedule = as_schedule(value, what)
        if not schedule.is_stepwise:
            raise ModelError(
                f"method 'exponential' needs schedules that only jump; the {what} of "
                f"{where!r} is {type(schedule).__name__}, which changes between its "
                "breakpoints: use 'crank-nicolson'"
            )


def _each(boundaries):
    for group, value in boundaries.items():
        for condition in conditions(value, group):
            yield group, condition


def run_exponential(
    run, recorder, breakpoints, record_step: float, earliest: float
) -> ExponentialOutcome:
    """March ``run`` (a transient ``_Run`` with its system assembled) from breakpoint to
    breakpoint, recording into ``recorder`` every ``record_step`` s and, after each jump, at
    step/2^k down to ``earliest`` s (the surface elements' diffusion time: before it the mesh
    does not resolve the field)."""
    c, s = run.c, run.system
    free = s.free_dofs
    fixed = run.fixed_all
    capacity_ff = s.capacity[free][:, free].tocsr()
    capacity_columns = run.capacity_columns
    max_dimension = int(
        min(MAX_DIMENSION, free.size + 1, max(12, BASIS_MEMORY // (8 * max(free.size, 1))))
    )
    edges = sorted({0.0, *breakpoints, c.end_time})
    outputs = np.array(c.output_times)

    u = np.array(run.system_initial)
    s.impose_fixed(u, 0.0)
    absorbed = 0.0
    steps = solves = dimension = 0
    estimate = 0.0
    smallest, largest = math.inf, 0.0
    stop_time = None
    stop_side = None
    if c.stop is not None:
        stop_side = np.sign(run._quantity(u, c.stop.quantity) - c.stop.target)
    for start, end in zip(edges[:-1], edges[1:], strict=True):
        length = end - start
        inside = start + 1e-9 * length
        operator = s.exchange_operator(inside)
        load = s.load(inside)
        if len(fixed):
            before = u[fixed]
            u = u.copy()
            s.impose_fixed(u, inside)
            # a jump of a fixed temperature stores heat at once: the fixed edge supplies it
            absorbed += float(capacity_columns[fixed] @ (u[fixed] - before))
        held = u[fixed]
        operator_ff = operator[free][:, free].tocsr()
        forcing = load[free] - (operator[free][:, fixed] @ held if len(fixed) else 0.0)
        shift = 2.0 ** round(math.log2(length * SHIFT_FRACTION))
        solve = run._shifted_solver(shift, inside)
        taus = _record_taus(start, end, record_step, earliest, outputs) - start
        approximation, estimate_here, converged = krylov_exponential(
            solve,
            capacity_ff,
            operator_ff,
            forcing,
            u[free],
            shift,
            taus,
            c.tolerance,
            max_dimension,
        )
        if not converged:
            raise SolverError(
                f"the exponential step from t = {start:.6g} s to {end:.6g} s did not reach the "
                f"tolerance {c.tolerance:.3g} K with {approximation.dimension} basis vectors "
                f"(estimate {estimate_here:.3g} K): loosen the tolerance or use 'crank-nicolson'"
            )
        steps += 1
        solves += approximation.solves
        dimension = max(dimension, approximation.dimension)
        estimate = max(estimate, estimate_here)
        smallest, largest = min(smallest, length), max(largest, length)

        if c.stop is not None:
            crossing = _crossing(run, approximation, u, free, taus, c.stop, stop_side)
            if crossing is not None:
                stop_time = start + crossing
                taus = np.append(taus[taus < crossing], crossing)
        ledger = _Ledger(s, approximation, u, free, fixed, operator, load)
        buffer = np.empty((CHUNK, free.size))
        for k in range(0, taus.size, CHUNK):
            chunk = taus[k : k + CHUNK]
            values = approximation.fields(chunk, buffer)
            energy = absorbed + ledger.absorbed(chunk)
            reactions = ledger.reactions(chunk, values)
            if len(fixed):
                states = np.tile(u, (chunk.size, 1))
                states[:, free] = values
            else:
                states = values
            times = start + chunk
            recorder.record_many(
                times,
                states,
                states @ capacity_columns,
                energy,
                reactions,
            )
            for i, time in enumerate(times):
                if np.any(np.abs(outputs - time) <= 1e-9 * length) or (
                    stop_time is not None and i == chunk.size - 1 and k + CHUNK >= taus.size
                ):
                    recorder.store_field(float(time), states[i])
            field = states[-1]
            if run.progress is not None:
                run.progress(start + float(chunk[-1]), c.end_time, steps)
        absorbed += float(ledger.absorbed(taus[-1:])[0])
        u = field.copy()  # the buffer's rows are not the state's to keep
        if stop_time is not None:
            break
    return ExponentialOutcome(
        steps, solves, dimension, u, stop_time, smallest, largest, float(estimate)
    )


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


def _crossing(run, approximation, u, free, taus, stop, side) -> float | None:
    """The first τ in the interval at which the stop quantity crosses its target."""

    def gap(tau: float) -> float:
        field = u.copy()
        field[free] = approximation.fields([tau])[0]
        return run._quantity(field, stop.quantity) - stop.target

    before = 0.0
    for k in range(0, taus.size, CHUNK):
        for tau in taus[k : k + CHUNK]:
            if np.sign(gap(float(tau))) != side:
                low, high = before, float(tau)
                for _ in range(60):  # bisection on the approximation itself
                    middle = 0.5 * (low + high)
                    if np.sign(gap(middle)) != side:
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

    def __init__(self, s, approximation: KrylovExponential, u, free, fixed, operator, load):
        self.approximation = approximation
        columns = np.asarray(operator.sum(axis=0)).ravel()  # 1ᵀA
        self.columns_free = columns[free]
        held = u[fixed]
        # the constant part of the inflow 1ᵀ(b − A·u): load less the fixed nodes' share
        self.constant_inflow = float(load.sum()) - float(columns[fixed] @ held)
        self.start_free = u[free]
        self.groups = {}  # per fixed group: 1ᵀM rows, 1ᵀA rows (free part), constant part
        for name, dofs in s.fixed_dofs.items():
            rows = operator[dofs]
            self.groups[name] = (
                np.asarray(s.capacity[dofs][:, free].sum(axis=0)).ravel(),
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
