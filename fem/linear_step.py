"""One step of a multistep formula for a linear model: one solve with a cached factorisation.

Scaled by h/a0, the step solves

    (M + s·A1)·T1 = −Σ (a_j/a0)·M·T_j − (1 − β)(h/a0)·(A0·T0 − b0) + β(h/a0)·b1,

s = β·h/a0. The matrix is factorised once per (s, coefficients); the explicit part of a theta
step, M − (1 − β)(h/a0)·A0, is kept beside it, so a step costs one solve, one matrix-vector
product and a few dot products (the heat balance from column sums).
"""

from __future__ import annotations

import numpy as np

from .integrators import StepFormula, StepResult
from .stepper import RunContext
from .system import inner


class LinearStep:
    """Solves linear steps of a run (constant properties, linear conditions)."""

    def __init__(self, run: RunContext):
        self.run = run

    def solve(
        self,
        formula: StepFormula,
        step: float,
        t0: float,
        t1: float,
        states: list[np.ndarray],
        guess: np.ndarray,
    ) -> StepResult:
        """The state at ``t1`` from ``states`` (newest first, at t0 and before); ``guess`` is
        not needed by a linear step."""
        system, fixed = self.run.system, self.run.fixed
        scale = step / formula.a[0]
        inside1 = t1 - 1e-9 * step
        operator1, column1 = self.run.algebra.operator(inside1)
        load1 = system.load(inside1)
        rhs, inflow_old = self._right_side(formula, scale, t0 + 1e-9 * step, load1, states)
        factor = self.run.algebra.step_factor(formula.matrix_scale(step), inside1)
        u = np.empty(system.size)
        if len(fixed):
            system.impose_fixed(u, inside1)
            coupling = system.capacity[:, fixed] @ u[fixed] + formula.beta * scale * (
                operator1[:, fixed] @ u[fixed]
            )
            u[system.free_dofs] = factor.solve(rhs[system.free_dofs] - coupling[system.free_dofs])
        else:  # every degree of freedom is free: no gather and scatter around the solve
            u = factor.solve(rhs)
        self.run.cost.iterated(1)
        reactions = self._reactions(u, rhs, operator1, formula.beta * scale, scale)
        beta = formula.beta
        inflow = beta * (load1.sum() - inner(column1, u)) + (1 - beta) * inflow_old
        heat = step * (inflow + sum(reactions.values()))
        return StepResult(u, inner(self.run.capacity_columns, u), float(heat), reactions)

    def _right_side(self, formula, scale, inside0, load1, states) -> tuple[np.ndarray, float]:
        """The right-hand side, and the old state's inflow 1ᵀ(b0 − A0·T0) (theta steps)."""
        system = self.run.system
        a0, beta = formula.a[0], formula.beta
        if formula.history == 1 and beta < 1:
            _, column0 = self.run.algebra.operator(inside0)
            load0 = system.load(inside0)
            explicit = self.run.algebra.explicit((1 - beta) * scale, inside0)
            rhs = explicit @ states[0] + scale * ((1 - beta) * load0 + beta * load1)
            return rhs, load0.sum() - inner(column0, states[0])
        # backward Euler and BDF2: no explicit operator part
        history = -sum(a / a0 * u for a, u in zip(formula.a[1:], states, strict=False))
        return system.capacity @ history + scale * beta * load1, 0.0

    def _reactions(self, u, rhs, operator1, implicit, scale) -> dict[str, float]:
        """The unenforced rows of the fixed degrees of freedom: each fixed group's heat flow
        into the part, W."""
        system, fixed = self.run.system, self.run.fixed
        if not len(fixed):
            return {}
        rows = (
            system.capacity[fixed] @ u + implicit * (operator1[fixed] @ u) - rhs[fixed]
        ) / scale
        position = {d: i for i, d in enumerate(fixed)}
        return {
            name: float(rows[[position[d] for d in dofs]].sum())
            for name, dofs in system.fixed_dofs.items()
        }
