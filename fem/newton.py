"""One step of a multistep formula for a nonlinear model, by simplified Newton.

The step's residual is a0·C(T1)/h + Σ a_j·C(T_j)/h + β·G(T1, t1) + (1 − β)·G(T0, t0). The
factorised tangent is kept across iterations and steps (of the same size and formula) while it
still shrinks the change by ``TANGENT_RATE`` or better; otherwise it is refactorised at the
current iterate. A step then costs a few solves instead of a factorisation per iteration.
"""

from __future__ import annotations

import math

import numpy as np

from .errors import SolverError
from .integrators import StepFormula, StepResult
from .stepper import RunContext

TANGENT_RATE = 0.5  # a kept Newton tangent must shrink the change at least this much per iteration


class NewtonStep:
    """Solves nonlinear steps of a run (radiation, k(T), c(T))."""

    def __init__(self, run: RunContext):
        self.run = run
        # Capacity and radiation tangents are symmetric; k(T) adds k'(T)·δ·∇T, which is not.
        self.symmetric = all(
            isinstance(m.conductivity, float) for m in run.system.model.materials.values()
        )
        self.tangent = None  # (key, factor) of the tangent kept for simplified Newton

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
        known = (
            sum(a * system.stored(u) for a, u in zip(formula.a[1:], states, strict=False)) / step
        )
        inflow_old = 0.0
        if formula.beta < 1:
            outflow0 = system.net_outflow(states[0], inside0)
            known = known + (1 - formula.beta) * outflow0
            inflow_old = -float(outflow0.sum())

        def residual(field):
            return (
                formula.a[0] * system.stored(field) / step
                + known
                + formula.beta * system.net_outflow(field, inside1)
            )

        u = guess.copy()
        system.impose_fixed(u, inside1)
        self._iterate(u, residual, formula, step, t1)
        r = residual(u)
        reactions = {name: float(r[d].sum()) for name, d in system.fixed_dofs.items()}
        inflow = formula.beta * -float(system.net_outflow(u, inside1).sum())
        inflow += (1 - formula.beta) * inflow_old
        heat = step * (inflow + sum(reactions.values()))
        return StepResult(u, float(system.stored(u).sum()), heat, reactions)

    def _iterate(self, u, residual, formula: StepFormula, step: float, t1: float) -> None:
        """Newton's iterations on the free degrees of freedom of ``u`` (in place)."""
        system, controls = self.run.system, self.run.controls
        inside1 = t1 - 1e-9 * step
        free = system.free_dofs
        key = (float(f"{formula.a[0] / step:.12e}"), formula.beta)
        refresh = self.tangent is None or self.tangent[0] != key
        previous = math.inf
        for iteration in range(1, controls.max_newton_iterations + 1):
            r = residual(u)
            if refresh:
                jacobian = (formula.a[0] / step) * system.capacity_tangent(u) + formula.beta * (
                    system.outflow_tangent(u, inside1)
                )
                self.tangent = (key, self.run.algebra.factor(jacobian, self.symmetric))
            change = self.tangent[1].solve(-r[free])
            u[free] += change
            largest = float(np.abs(change).max(initial=0.0))
            if largest <= controls.newton_tolerance:
                self.run.cost.iterated(iteration)
                return
            refresh = largest > TANGENT_RATE * previous
            previous = largest
        raise SolverError(
            f"Newton's method did not converge at t = {t1:.6g} s (step "
            f"{step:.3g} s) in {controls.max_newton_iterations} iterations; the last change "
            f"was {largest:.3g} K and the residual "
            f"{float(np.abs(residual(u)[free]).max()):.3g} W. Try a smaller time step or a "
            "looser newton_tolerance"
        )
