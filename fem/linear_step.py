"""One step of a multistep formula for a linear model: one solve with a cached factorisation.

Scaled by h/a0, the step solves

    (M + s·A1)·T1 = −Σ (a_j/a0)·M·T_j − (1 − β)(h/a0)·(A0·T0 − b0) + β(h/a0)·b1,

s = β·h/a0. The matrix is factorised once per (s, coefficients); the explicit part of a theta
step, M − (1 − β)(h/a0)·A0, is kept beside it as one matrix, and so are the loads and, with
fixed temperatures, the step matrix's columns and rows at the fixed degrees of freedom. A step
costs one solve, one matrix-vector product that adds the loads as it goes (on two threads for
large meshes; two more products with fixed temperatures: the coupling of the held values and
the reactions) and a few dot products (the heat balance from column sums).
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
        # (field, column sums, 1ᵀA·T) of the last step: the next theta step needs it again
        self._outflow: tuple[np.ndarray, np.ndarray, float] | None = None
        # (field, the same field in the algebra's numbering) of the last step
        self._numbered: tuple[np.ndarray, np.ndarray] | None = None

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
        system, fixed, algebra = self.run.system, self.run.fixed, self.run.algebra
        scale = step / formula.a[0]
        implicit = formula.matrix_scale(step)  # β·h/a0
        inside1 = t1 - 1e-9 * step
        _, column1 = algebra.operator(inside1)
        total1 = algebra.load(inside1)[1]
        factor = algebra.step_factor(implicit, inside1)
        order = algebra.numbering  # None with fixed temperatures
        inside0 = t0 + 1e-9 * step
        rhs, inflow_old = self._right_side(formula, scale, inside0, inside1, states, order)
        reactions: dict[str, float] = {}
        if len(fixed):
            u = np.empty(system.size)
            system.impose_fixed(u, inside1)
            coupling, fixed_rows = algebra.fixed_parts(implicit, inside1)
            free = system.free_dofs
            u[free] = factor.solve(rhs[free] - coupling @ u[fixed])
            reactions = self._reactions((fixed_rows @ u - rhs[fixed]) / scale)
        elif order is not None:  # solved in the numbering; the field goes back once
            numbered = factor.factor.solve(rhs)
            u = np.empty(system.size)
            u[order] = numbered
            self._numbered = (u, numbered)
        else:  # every degree of freedom is free: no gather and scatter around the solve
            u = factor.solve(rhs)
        self.run.cost.iterated(1)
        beta = formula.beta
        outflow = inner(column1, u)
        self._outflow = (u, column1, outflow)
        inflow = beta * (total1 - outflow) + (1 - beta) * inflow_old
        heat = step * (inflow + sum(reactions.values()))
        return StepResult(u, inner(self.run.capacity_columns, u), float(heat), reactions)

    def _right_side(self, formula, scale, inside0, inside1, states, order):
        """The right-hand side (in the algebra's numbering ``order``, if any), and the old
        state's inflow 1ᵀ(b0 − A0·T0) (theta steps)."""
        algebra = self.run.algebra
        a0, beta = formula.a[0], formula.beta
        load1 = algebra.numbered_load(inside1)
        if formula.history == 1 and beta < 1:
            _, column0 = algebra.operator(inside0)
            total0 = algebra.load(inside0)[1]
            load0 = algebra.numbered_load(inside0)
            explicit = algebra.explicit((1 - beta) * scale, inside0)
            if load0 is load1:  # the same loads (cached by their coefficients)
                loads = scale * load1
            else:
                loads = scale * ((1 - beta) * load0 + beta * load1)
            # (M − (1 − β)·s·A0)·T0 plus the loads, in one product
            rhs = explicit.add_to(self._in_numbering(states[0], order), loads)
            return rhs, total0 - self._old_outflow(column0, states[0])
        # backward Euler and BDF2: no explicit operator part
        history = -sum(a / a0 * u for a, u in zip(formula.a[1:], states, strict=False))
        if order is not None:
            history = history[order]
        return algebra.capacity.add_to(history, scale * beta * load1), 0.0

    def _in_numbering(self, field: np.ndarray, order: np.ndarray | None) -> np.ndarray:
        """``field`` in the numbering ``order``: the last step's own copy when it is that
        step's field (the march passes it back unchanged), else gathered."""
        if order is None:
            return field
        last = self._numbered
        if last is not None and last[0] is field:
            return last[1]
        return field[order]

    def _old_outflow(self, column: np.ndarray, field: np.ndarray) -> float:
        """1ᵀA·T of the old state: the last step's when it is the same field and operator
        (both cached objects, so identity is equality)."""
        last = self._outflow
        if last is not None and last[0] is field and last[1] is column:
            return last[2]
        return inner(column, field)

    def _reactions(self, rows: np.ndarray) -> dict[str, float]:
        """Each fixed group's heat flow into the part (W), from the unenforced rows of the
        fixed degrees of freedom (in the order of ``run.fixed``: group after group)."""
        reactions, start = {}, 0
        for name, dofs in self.run.system.fixed_dofs.items():
            reactions[name] = float(rows[start : start + len(dofs)].sum())
            start += len(dofs)
        return reactions
