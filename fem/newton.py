"""One step of a multistep formula for a nonlinear model, by damped simplified Newton.

The step's residual is a0·C(T1)/h + Σ a_j·C(T_j)/h + β·G(T1, t1) + (1 − β)·G(T0, t0). The
factorised tangent is kept across iterations and steps (of the same size and formula), and the
iterations on it are accelerated by Anderson's mixing (:mod:`fem.nonlinear_acceleration`). A
kept tangent is given ``GRACE`` iterations in a step (unless it makes the change grow); after
that it is refactorised at the current iterate when it shrinks the change by less than
``TANGENT_RATE`` or when the iterations it would still need cost more than a factorisation at
the run's measured prices. A step then costs a few solves instead of a factorisation per
iteration. The tangent is kept as J/β, keyed by a0/(β·h), so steps of equal a0/(β·h) (a
backward-Euler half step and a Crank–Nicolson step) share it. With k(T) and a constant capacity
it is the symmetric chord of :mod:`fem.tangents`, by Cholesky; a model nonlinear only at its
surface (fixed steps) keeps the tangent without the surface's terms and solves each step on
the surface unknowns alone (:mod:`fem.surface_step`: two solves a step); where that hands the
step back, the whole field iterates with the surface's terms added exactly at every iterate
(:class:`fem.tangents.BoundaryCorrection`): Newton's method, no refactorisation. A step takes
the stored heat and outflow of the state it starts from out of the residual the last step ended
with (not across a breakpoint).

A step has converged when the change is below ``newton_tolerance`` or, at the rate the changes
shrink, the changes still to come are (Hairer & Wanner's test), and the heat the residual
leaves unbalanced is within ``BALANCE_SHARE`` of the tolerance times the part's heat capacity,
so that an early stop cannot spoil the run's energy balance. After an update below
``CLOSING_CHANGE`` tolerances the balance is closed by a uniform shift of at most
``CLOSING_SHIFT`` tolerances (:meth:`NewtonStep._close_balance`) rather than by more solves.

Each update is damped by a line search on the residual's norm (Armijo's test, step lengths
halved): a full update that does not lower the residual is first retried with a fresh tangent
(unless the tangent was renewed an iteration ago), then shortened. Latent heat released over
a narrow range, or a coefficient that jumps with the surface temperature, make the full update
overshoot; the shortened one does not. When the iterations still fail,
:class:`NewtonStepError` tells the march to retry the step smaller.
"""

from __future__ import annotations

import math
import time as clock
from typing import NoReturn

import numpy as np

from .errors import SolverError
from .events import near
from .integrators import StepFormula, StepResult
from .newton_tangents import TangentMaker
from .nonlinear_acceleration import AndersonMixing
from .stepper import RunContext
from .surface_step import SurfaceCondensation, SurfaceStallError

BALANCE_SHARE = 1e-3  # an early stop's heat defect per step, in tolerance × heat capacity
BALANCE_SECANTS = 3  # uniform shifts tried to close a step's heat balance
# ... after an update of at most this many tolerances: the balance's own test of convergence
# stays in force for larger ones (an update accepted on the last step's rate alone).
CLOSING_CHANGE = 1e3
CLOSING_SHIFT = 1e-2  # ... by a shift of at most this many tolerances (uniform error it adds)
GRACE = 3  # iterations a kept tangent is given in a step before its rate is judged
DIVERGING = 2.0  # ... unless it grows the change this much
TANGENT_RATE = 0.5  # a kept Newton tangent must shrink the change at least this much per iteration
# Steps a latent-heat tangent has served, from which it is refactorised at its step's second
# iteration: the freezing range's band has moved through it (see NewtonStep._stale).
PHASE_TANGENT_STEPS = 2
SUFFICIENT_DECREASE = 1e-4  # Armijo: the residual norm must fall by this fraction of the length
SHORTEST_UPDATE = 1.0 / 64  # the shortest damped update, as a fraction of Newton's
# Updates this short, this many times running, mean the iterations are stuck (a kink in a
# table they circle around): the step is given up early and retried smaller.
STALLED_LENGTH, STALLED_ITERATIONS = 1.0 / 8, 3


class NewtonStepError(SolverError):
    """Newton's method did not converge in one step (the march retries it smaller).

    Attributes
    ----------
    time, step : float
        End of the step and its size, s.
    change : float
        The last full Newton update's largest entry, K.
    residual : float
        The last residual's largest entry on the free degrees of freedom, W.
    how : str
        "stalled after n iterations" (the line search made no headway) or "not converged in
        n iterations".
    """

    def __init__(
        self, message: str, time: float, step: float, change: float, residual: float, how: str
    ):
        super().__init__(message)
        self.time, self.step, self.change, self.residual = time, step, change, residual
        self.how = how


class NewtonStep:
    """Solves nonlinear steps of a run (radiation, k(T), c(T), latent heat, h(T_s))."""

    def __init__(self, run: RunContext):
        self.run = run
        self.tangent = None  # (key, factor of J/β, 1ᵀ·J·1/β) kept for simplified Newton
        self.beta = 1.0  # the step formula's β: the tangent kept is J/β
        self.tangents = TangentMaker(run)
        if self.tangents.surface is not None:
            self.condensation = SurfaceCondensation(run.system, self.tangents.surface)
        self.mixing = AndersonMixing()
        self.tangent_steps = 0  # steps begun on the kept tangent since it was factorised
        # The free degrees of freedom as an index: a slice when every one is free (no held
        # temperature), which reads and updates in place instead of gathering a copy.
        every = run.system.free_dofs.size == run.system.size
        self.free = slice(None) if every else run.system.free_dofs
        self.heat_capacity = float(run.capacity_columns.sum())  # the part's, J/K
        self.rate: float | None = None  # the kept tangent's last rate of convergence
        self._closing: tuple | None = None  # (t1, field, stored, outflow) of the last step

    def solve(
        self,
        formula: StepFormula,
        step: float,
        t0: float,
        t1: float,
        states: list[np.ndarray],
        guess: np.ndarray,
    ) -> StepResult:
        """The state at ``t1`` from ``states`` (newest first), iterating from ``guess``."""
        system = self.run.system
        inside0, inside1 = t0 + 1e-9 * step, t1 - 1e-9 * step
        kept = self._kept(states[0], t0, step)
        stored = [kept[0] if kept and j == 0 else system.stored(u) for j, u in enumerate(states)]
        known = sum(a * w for a, w in zip(formula.a[1:], stored, strict=False)) / step
        inflow_old = 0.0
        if formula.beta < 1:
            outflow0 = kept[1] if kept else system.net_outflow(states[0], inside0)
            known = known + (1 - formula.beta) * outflow0
            inflow_old = -float(outflow0.sum())

        last: list = []  # (field, stored heat, outflow, residual) of the latest evaluation

        def residual(field):
            stored, outflow = system.stored(field), system.net_outflow(field, inside1)
            r = formula.a[0] * stored / step + known + formula.beta * outflow
            last[:] = [field.copy(), stored, outflow, r]
            return r

        u = guess.copy()
        system.impose_fixed(u, inside1)
        self._iterate(u, residual, formula, step, t1)
        if not (last and np.array_equal(last[0], u)):  # the converged field's is kept
            residual(u)
        _, stored1, outflow1, r = last
        reactions = {name: float(r[d].sum()) for name, d in system.fixed_dofs.items()}
        inflow = formula.beta * -float(outflow1.sum())
        inflow += (1 - formula.beta) * inflow_old
        heat = step * (inflow + sum(reactions.values()))
        self._closing = (t1, u, stored1, outflow1)
        return StepResult(u, float(stored1.sum()), heat, reactions)

    def _kept(self, state: np.ndarray, t0: float, step: float) -> tuple | None:
        """(stored heat, outflow) of ``state`` as the step that ended with it at ``t0``
        evaluated them, or None: a residual fewer a step. Not across a breakpoint, where a
        schedule may jump between the end of one step and the start of the next."""
        closing = self._closing
        if closing is None or closing[1] is not state or closing[0] != t0:
            return None
        if near(t0, self.run.breakpoints, step):
            return None
        return closing[2], closing[3]

    def _factor(self, u: np.ndarray, formula: StepFormula, step: float, t1: float, key) -> None:
        """Factorise the tangent at ``u`` and keep it under ``key``."""
        self.tangent = self.tangents.make(u, formula, step, t1, key)
        self.rate = None  # not known for the new tangent
        self.tangent_steps = 0

    def _iterate(self, u, residual, formula: StepFormula, step: float, t1: float) -> None:
        """Damped, accelerated simplified Newton iterations on the free degrees of freedom of
        ``u`` (in place), until the change left is below the tolerance and the step's heat
        balance closes."""
        controls, cost = self.run.controls, self.run.cost
        free = self.free
        started, factoring = clock.perf_counter(), cost.factorisation_seconds
        key = (float(f"{formula.a[0] / (formula.beta * step):.12e}"),)
        self.beta = formula.beta  # the tangent is factorised divided by β
        if self.tangents.end_bordering_if_ramped():  # h(t) keeps changing: chords instead
            self.tangent = None
        if self.tangents.surface is not None:  # J₀ holds the linear conditions' h(t) exactly
            key += self.run.system.exchange_key(t1 - 1e-9 * step)
        if self.tangent is None or self.tangent[0] != key:
            self.tangent = self.tangents.bordered.get(key)  # a step size seen before (a retry)
        if self.tangent is None:
            self._factor(u, formula, step, t1, key)
        else:
            self.tangent_steps += 1
        if self.tangents.surface is not None and self._condensed(u, residual, formula, step, t1):
            cost.iteration_seconds += clock.perf_counter() - started
            cost.iteration_seconds -= cost.factorisation_seconds - factoring
            return
        self.mixing.reset()
        fresh = True  # the kept tangent was factorised at the current iterate
        previous = math.inf
        r = residual(u)
        norm = float(np.linalg.norm(r[free]))
        largest = math.inf
        stalled = iteration = kept = 0  # kept: iterations on the tangent since it was refreshed
        tolerance = controls.newton_tolerance  # K
        while iteration < controls.max_newton_iterations:
            iteration += 1
            if self.tangents.surface is not None:  # Newton's tangent, exactly, at every iterate
                self.tangents.linearise(self.tangent[1], u, t1 - 1e-9 * step)
                self.mixing.reset()
                fresh, kept = True, 0
            change = self.tangent[1].solve(-r[free]) / self.beta
            largest = float(np.abs(change).max(initial=0.0))
            if not math.isfinite(previous) and self.rate:
                previous = largest / self.rate  # a step's first change: the last step's rate
            if self._converged(largest, previous, tolerance):  # if the heat balance closes
                u[free] += change  # (unmixed: the mixing's least squares would not move it)
                r = residual(u)
                if largest <= CLOSING_CHANGE * tolerance and not self._balanced(r, formula, step):
                    r = self._close_balance(u, r, residual, formula, step)
                if self._balanced(r, formula, step):
                    self.rate = largest / previous if math.isfinite(previous) else None
                    break
                stagnant = largest > TANGENT_RATE * previous  # (the kept tangent's fault)
                norm, previous, kept = float(np.linalg.norm(r[free])), largest, 0
                fresh = stagnant and self._renew(u, formula, step, t1, key)
                continue
            if not fresh and self._stale(largest, previous, tolerance, kept):
                change, largest = self._refresh(u, r, formula, step, t1, key)
                fresh, kept = True, 0
            direction = self.mixing.update(u[free], change)
            length, trial, trial_norm = self._search(u, direction, residual, norm, free)
            if length < 1 and kept >= 2:  # an older tangent: try the exact one before damping
                change, largest = self._refresh(u, r, formula, step, t1, key)
                fresh, kept = True, 0
                direction = self.mixing.update(u[free], change)
                length, trial, trial_norm = self._search(u, direction, residual, norm, free)
            if length < 1:
                cost.damped_iterations += 1
                self.mixing.reset()  # a shortened update is no pair of the fixed-point map
            u[free] += length * direction
            r, norm = trial, trial_norm
            fresh, kept = False, kept + 1
            previous = largest
            stalled = stalled + 1 if length <= STALLED_LENGTH else 0
            if stalled >= STALLED_ITERATIONS:
                self._fail(iteration, r, largest, stalled, step, t1)
        else:
            self._fail(iteration, r, largest, stalled, step, t1)
        cost.iterated(iteration)
        spent = clock.perf_counter() - started
        cost.iteration_seconds += spent - (cost.factorisation_seconds - factoring)

    def _condensed(self, u, residual, formula: StepFormula, step: float, t1: float) -> bool:
        """Solve the step on the surface's unknowns (:mod:`fem.surface_step`): True when done
        with the heat balance closed, else False, ``u`` then being where the whole field's
        iterations start."""
        controls = self.run.controls
        try:
            solved = self.condensation.step(
                u,
                residual,
                self.tangent[1],
                self.beta,
                t1 - 1e-9 * step,
                controls.newton_tolerance,
                controls.max_newton_iterations,
            )
        except SurfaceStallError as stall:
            self._fail(
                stall.iterations, stall.residual, stall.change, STALLED_ITERATIONS, step, t1
            )
        if solved is None or not self._balanced(solved[1], formula, step):
            return False
        self.run.cost.iterated(solved[0], solves=2)  # iterations on S, two solves with J₀
        return True

    def _fail(
        self, iteration: int, r, largest: float, stalled: int, step: float, t1: float
    ) -> NoReturn:
        """Raise :class:`NewtonStepError` for a step whose iterations stalled or ran out."""
        self.run.cost.iterated(iteration)
        free = self.free
        residual_norm = float(np.abs(r[free]).max(initial=0.0))
        how = "stalled after" if stalled >= STALLED_ITERATIONS else "not converged in"
        how = f"{how} {iteration} iterations"
        raise NewtonStepError(
            f"Newton's method {how} at t = {t1:.6g} s (step {step:.3g} s); the last change "
            f"was {largest:.3g} K and the residual {residual_norm:.3g} W",
            t1,
            step,
            largest,
            residual_norm,
            how,
        )

    def _renew(self, u, formula: StepFormula, step: float, t1: float, key) -> bool:
        """Refactorise the tangent at ``u``; the mixing starts again, since its updates came
        from the old tangent. True (the tangent is fresh)."""
        if self.tangents.surface is not None:  # renewed at every iterate anyway
            self.mixing.reset()
            return True
        self._factor(u, formula, step, t1, key)
        self.mixing.reset()
        return True

    def _refresh(self, u, r, formula: StepFormula, step: float, t1: float, key):
        """Refactorise the tangent at ``u`` and return Newton's update there with its largest
        entry (K)."""
        self._renew(u, formula, step, t1, key)
        change = self.tangent[1].solve(-r[self.free]) / self.beta
        return change, float(np.abs(change).max(initial=0.0))

    @staticmethod
    def _converged(change: float, previous: float, tolerance: float) -> bool:
        """Whether the iterate plus ``change`` (K) is within ``tolerance`` of the step's
        solution: the change is below it, or, at the rate θ shown since the ``previous``
        change, the changes still to come, θ/(1 − θ) of this one, are (Hairer & Wanner,
        *Solving Ordinary Differential Equations II*, 2nd ed., §IV.8, from memory)."""
        if change <= tolerance:
            return True
        if not math.isfinite(previous):
            return False
        rate = change / previous
        return rate < 1 and rate / (1 - rate) * change <= tolerance

    def _balanced(self, r: np.ndarray, formula: StepFormula, step: float) -> bool:
        """Whether the heat the residual ``r`` (W) leaves unbalanced over the step is within
        ``BALANCE_SHARE`` of the tolerance times the part's heat capacity: the error an early
        stop puts into the run's energy balance stays far below its 1e-6 check."""
        defect = abs(float(r[self.free].sum())) * step / formula.a[0]
        tolerance = self.run.controls.newton_tolerance
        return defect <= BALANCE_SHARE * tolerance * self.heat_capacity

    def _close_balance(self, u, r, residual, formula: StepFormula, step: float) -> np.ndarray:
        """Close the step's heat balance by a uniform shift of the free temperatures, the
        residual's sum being the heat left unbalanced: the coarse correction on the constant
        vector (Nicolaides, "Deflation of conjugate gradients with applications to boundary
        value problems", *SIAM J. Numer. Anal.* 24, 1987, from memory), by secants on
        Σr(u + δ·1) from the kept tangent's 1ᵀ·J·1. The shift is far below the tolerance (it
        is the defect over the whole capacity), and a few residuals replace the several solves
        the kept tangent would need to close the balance by itself. The residual at ``u``
        (shifted in place) is returned."""
        free = self.free
        slope, shift = self.beta * self.tangent[2], 0.0
        defect = float(r[free].sum())
        for _ in range(BALANCE_SECANTS):
            if (
                not slope > 0
                or abs(defect / slope) > CLOSING_SHIFT * self.run.controls.newton_tolerance
            ):
                break  # a shift that large would be an error of its own: iterate on
            move = -defect / slope
            u[free] += move
            shift += move
            r = residual(u)
            if self._balanced(r, formula, step):
                break
            remaining = float(r[free].sum())
            slope = (defect - remaining) / -move if move else slope
            defect = remaining
        return r

    def _stale(self, change: float, previous: float, tolerance: float, kept: int) -> bool:
        """Whether to refactorise a kept tangent that shrank the update from ``previous`` to
        ``change`` K: when it shrinks it by less than ``TANGENT_RATE``, or when the iterations
        it would still need (at that rate, to the tolerance) cost more than a factorisation at
        this run's measured prices (a fresh tangent converges in about two).

        A latent-heat tangent that has served ``PHASE_TANGENT_STEPS`` steps is refactorised
        at its step's second iteration: on the freezing benchmark such a tangent shrank the
        change by only 0.5-0.6 an iteration after the first, and refactorising took 4.8 instead of
        6.1 iterations a step for 119 instead of 102 factorisations, 22.7 instead of 24.0 ms a
        step (1k nodes: 3.05 against 3.20 ms; 38k: 169 against 173 ms)."""
        served = self.tangent_steps
        if (
            self.tangents.phase_change
            and kept >= 1
            and change > tolerance
            and served >= PHASE_TANGENT_STEPS
        ):
            return True
        rate = change / previous
        if kept < GRACE:
            return rate > DIVERGING
        if rate > TANGENT_RATE:
            return True
        if change <= tolerance or rate <= 0:
            return False
        cost = self.run.cost
        iteration = cost.iteration_seconds / max(cost.newton_iterations, 1)
        factorisation = cost.factorisation_seconds / max(cost.factorisations, 1)
        remaining = math.log(tolerance / change) / math.log(rate)
        return remaining * iteration > factorisation + 2 * iteration

    def _search(self, u, change, residual, norm, free):
        """The update's length (1, ½, ¼ … down to ``SHORTEST_UPDATE``) that lowers the
        residual's norm enough, with the residual there and its norm."""
        length = 1.0
        while True:
            trial_field = u.copy()
            trial_field[free] += length * change
            trial = residual(trial_field)
            trial_norm = float(np.linalg.norm(trial[free]))
            if trial_norm <= (1 - SUFFICIENT_DECREASE * length) * norm:
                return length, trial, trial_norm
            if length <= SHORTEST_UPDATE:
                return length, trial, trial_norm  # no decrease found: take the shortest
            length /= 2
