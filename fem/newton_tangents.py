"""The tangents simplified Newton keeps (:mod:`fem.newton`): which factorisation a model's
tangent takes, and the bordered tangents of a model nonlinear only at its surface.

The tangent is kept as J/β = (a₀/(β·h))·C' + G', so one factorisation serves steps of equal
a₀/(β·h) (a backward-Euler half step and a Crank–Nicolson step of the same run). A model
nonlinear only at its surface (h(T_s), radiation; constant k and ρc; fixed steps; at most
``BORDERED_NODES`` surface nodes) keeps J₀, the tangent without the surface's terms, with
C = Eᵀ·J₀⁻¹·E (:class:`fem.tangents.BoundaryCorrection`), one per step size; others keep the
whole tangent, by the factorisation :meth:`TangentMaker.factorised` chooses.
"""

from __future__ import annotations

import numpy as np

from .conditions import Radiation
from .integrators import StepFormula
from .linalg import NESTED_DISSECTION_FROM, KeptOrderLU
from .nonlinear_assembly import nodal_conductivity
from .single_precision import SinglePrecisionLU
from .stepper import RunContext
from .tangents import (
    BoundaryCorrection,
    ScaledFactor,
    SurfaceRestriction,
    bordered_surface,
    symmetric_scaled,
)

# Surface nodes up to which a surface-only nonlinearity is solved by the bordered tangent
# instead of refactorising: each costs one solve per step size, and a factorisation 25-110
# solves (10k-1M unknowns), so 1000 is about what a quench's 30 refactorisations cost.
BORDERED_NODES = 1000
BORDERED_KEPT = 3  # bordered tangents kept: the run's step and a retry's halves
# Bordered tangents built in a run before it returns to kept chords: a coefficient h(t) that
# changes every step (a ramp) would otherwise cost a factorisation and |S| solves a step.
BORDERED_BUILDS = 12


class TangentMaker:
    """Makes the tangents of a run's nonlinear steps.

    Attributes
    ----------
    surface : ndarray of int or None
        Positions among the free degrees of freedom of the surface nodes whose tangent is
        bordered, or None (the whole tangent is factorised).
    bordered : dict
        key → (key, BoundaryCorrection, 1ᵀ·J₀·1): the bordered tangents kept, one per step size.
    phase_change : bool
        Some region releases latent heat.
    """

    def __init__(self, run: RunContext):
        self.run = run
        # Capacity, radiation and h(T_s) tangents are symmetric; k(T) adds k'(T)·δ·∇T, which
        # is not.
        self.symmetric = all(
            isinstance(m.conductivity, float) for m in run.system.model.materials.values()
        )
        self.surface = bordered_surface(run.system, run.controls.adaptive, BORDERED_NODES)
        # Capacity, conduction and radiation (4εσT³ ≥ 0) keep the chord positive definite. A
        # c(T) without latent heat keeps the chord's capacity error small (k varies little
        # between neighbours); latent heat does not (see factorised).
        self.phase_change = any(m.has_phase_change for m in run.system.model.materials.values())
        self.definite_chord = not self.phase_change and all(
            c.linear or isinstance(c, Radiation) for _, c in run.system.flowing()
        )
        if self.surface is not None:
            self._restricted = SurfaceRestriction(run.system.free_dofs[self.surface])
        self.bordered_builds = 0
        self.bordered: dict = {}
        self.kept_order = KeptOrderLU(run.algebra)  # unsymmetric tangents: ordered once
        self.single = SinglePrecisionLU(self.kept_order, run.system.free_dofs)
        self._free_ones = np.zeros(run.system.size)  # 1 on the free degrees of freedom
        self._free_ones[run.system.free_dofs] = 1.0

    def end_bordering_if_ramped(self) -> bool:
        """Whether the bordered tangents are given up at this step: after ``BORDERED_BUILDS``
        of them (a coefficient h(t) that changes every step) the run returns to kept chords of
        the whole tangent, for good."""
        if self.surface is not None and self.bordered_builds >= BORDERED_BUILDS:
            self.surface = None
            self.bordered.clear()
            return True
        return False

    def linearise(self, correction: BoundaryCorrection, u: np.ndarray, time: float) -> None:
        """Give the bordered tangent ``correction`` the surface terms Δ at ``u``."""
        tangent = self.run.system.surface_tangent(u, time).tocsr()
        correction.linearise(self._restricted(tangent))

    def make(self, u: np.ndarray, formula: StepFormula, step: float, t1: float, key) -> tuple:
        """(``key``, the factorisation of J/β at ``u``, 1ᵀ·J·1/β in W/K)."""
        system = self.run.system
        free = system.free_dofs
        # J/β = (a₀/(β·h))·C' + G': one factorisation serves steps of equal a₀/(β·h), as a
        # backward-Euler half step and a Crank–Nicolson step of the same run.
        scale = formula.a[0] / (formula.beta * step)
        if self.surface is not None:  # the surface's terms come each iteration
            interior = scale * system.capacity_tangent(u) + system.outflow_tangent(
                u, t1 - 1e-9 * step, remainders=False
            )
            factor = self.run.algebra.factor(interior, True, "cholesky")
            slope = float(interior[free][:, free].sum())  # 1ᵀ·J₀·1/β (a secant corrects it)
            diagonal = interior.diagonal()[free]
            tangent = (key, BoundaryCorrection(factor, self.surface, free.size, diagonal), slope)
            self.bordered[key] = tangent
            self.bordered_builds += 1
            while len(self.bordered) > BORDERED_KEPT:
                self.bordered.pop(next(iter(self.bordered)))
            return tangent
        jacobian = scale * system.capacity_tangent(u) + system.outflow_tangent(u, t1 - 1e-9 * step)
        slope = float(self._free_ones @ (jacobian @ self._free_ones))  # 1ᵀ·J·1/β, W/K
        return (key, self.factorised(jacobian, u), slope)

    def factorised(self, jacobian, u: np.ndarray):
        """The tangent's factorisation: with k(T), no latent heat and no surface term that
        can fall with temperature the symmetric chord of :mod:`fem.tangents` by Cholesky (a
        run of such steps factorises once or twice; with c(T) too, measured 8.1 against 9.5 ms
        a step for LU at 10k nodes, the same iterations); otherwise SuperLU's LU in
        the order kept from the run's first tangent (:class:`fem.linalg.KeptOrderLU`), or its
        symmetric mode on nested dissection for a symmetric tangent from
        ``NESTED_DISSECTION_FROM`` unknowns. The kept order's LU is in single precision where
        a check solve shows it close enough (:mod:`fem.single_precision`: on the freezing
        benchmark 25.7 against 28.0 ms a step, the same iterations).

        Latent heat stays with LU: a symmetric approximate tangent by Cholesky (sym(J), or the
        chord above) was measured slower on the benchmark's freezing block at 10k nodes, since
        a front refactorises every second step (about 13 solves a factorisation) and CHOLMOD's
        factorisation, ordering included every time, took 38 ms against 14.5 ms for the kept
        order's LU, which its solves (0.3 against 0.65 ms) do not repay; sym(J) also took
        16 % more iterations. And the chord's capacity error is large at the front, where
        CHOLMOD reports an indefinite matrix on the standard output before it fails."""
        algebra, system = self.run.algebra, self.run.system
        single = self.single  # the kept order's LU, single precision where it may
        if self.symmetric and system.free_dofs.size >= NESTED_DISSECTION_FROM:
            return algebra.factor(jacobian, True)  # SuperLU's symmetric mode, dissected
        if self.symmetric:  # LU in the kept order: h(T_s) may make it indefinite
            return single.factor(jacobian)
        if self.definite_chord:
            scale = nodal_conductivity(system, u)
            factor = algebra.factor(symmetric_scaled(jacobian, scale), True, "cholesky")
            if getattr(factor, "solver", None) == "cholesky":  # else P was not definite
                return ScaledFactor(factor, scale[system.free_dofs])
        return single.factor(jacobian)
