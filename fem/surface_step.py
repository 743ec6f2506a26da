"""A step of a model nonlinear only at its surface, iterated on the surface's unknowns alone.

With constant k and ρc the step's residual is affine in the temperatures but for the nonlinear
conditions' outflow q, which depends on the surface temperatures u_S only. Divided by the step
formula's β (the tangent is kept as J/β, :mod:`fem.newton`),

    r(u)/β = r(u⁰)/β + J₀·(u − u⁰) + E·(q(u_S) − q(u⁰_S))

exactly, J₀ being the tangent without the surface's terms and E the columns of the surface
nodes S. Its root is u = u⁰ + y − J₀⁻¹·E·(q(u_S) − q⁰) with y = −J₀⁻¹·r(u⁰)/β, so on S

    F(s) = s − u⁰_S − y_S + C·(q(s) − q⁰) = 0,   C = Eᵀ·J₀⁻¹·E,

|S| equations whose Jacobian is I + C·Δ, Δ = ∂q/∂s (the bordered system of
:class:`fem.tangents.BoundaryCorrection`, which keeps C). Newton's method on F costs surface
evaluations and dense solves on |S| unknowns, its Jacobian's LU kept across iterations and
steps while it converges; the step then costs two solves with J₀ (y, and the field from the
converged surface) and two residuals (at the guess, and at the answer for the heat
bookkeeping), where Newton's method on the whole field took two solves an iteration and two
iterations a step. This is the condensation of the interior onto the surface (the Schur
complement; Golub & Van Loan, *Matrix Computations*, 4th ed., §2.1.4 and §3.2.11, from memory).

The answer's residual is checked: a step whose residual is not affine after all (its
correction, estimated by J₀'s diagonal, above the tolerance) or whose surface iterations run
out returns None, and :class:`fem.newton.NewtonStep` iterates on the whole field from there.
Surface iterations that stall (updates cut short three times running: a falling stretch of a
boiling curve, where the step may have no solution near its start) raise
:class:`SurfaceStallError`, and the step is retried smaller.
"""

from __future__ import annotations

import functools

import numpy as np
from scipy.linalg import lu_factor, lu_solve

from .tangents import BoundaryCorrection, SurfaceRestriction


@functools.cache
def _thread_pools():
    from threadpoolctl import ThreadpoolController  # 4 ms to find the loaded libraries

    return ThreadpoolController()


def one_blas_thread():
    """A context in which BLAS and LAPACK run on one thread: a dense LU of a few hundred
    unknowns took 0.3 ms on one thread and up to 100 ms when OpenBLAS's second thread waited
    for a core busy with another process (SuperLU, single-threaded, took 1–1.5 ms)."""
    return _thread_pools().limit(limits=1, user_api="blas")


SURFACE_SHARE = 0.1  # the surface iterations stop at this share of the step's tolerance
SURFACE_RATE = 0.25  # a kept surface Jacobian must shrink the change at least this much
SHORTEST_LENGTH = 1.0 / 256  # the shortest damped surface update, as a share of Newton's
# Updates this short this many times running: the iterations circle a kink of the curve (a
# falling stretch of a boiling curve), and the step is retried smaller.
STALLED_LENGTH, STALLED_ITERATIONS = 1.0 / 8, 3


class SurfaceStallError(Exception):
    """The surface iterations circle a kink of the curve: the step must be retried smaller.

    Attributes
    ----------
    iterations : int
        Surface iterations made.
    change : float
        The last full update's largest entry, K.
    residual : ndarray
        The step's residual at its guess, W.
    """

    def __init__(self, iterations: int, change: float, residual: np.ndarray):
        super().__init__(f"the surface iterations stalled after {iterations}")
        self.iterations, self.change, self.residual = iterations, change, residual


class SurfaceCondensation:
    """Solves fixed-size steps of a surface-only nonlinear model on its surface unknowns.

    Parameters
    ----------
    system : fem.system.ConductionSystem
        The assembled model (constant k and ρc).
    surface : ndarray of int
        Positions of the surface nodes S among the free degrees of freedom.
    """

    def __init__(self, system, surface: np.ndarray):
        self.system, self.surface = system, surface
        self.free = system.free_dofs
        self.nodes = self.free[surface]  # degrees of freedom of S
        self._restricted = SurfaceRestriction(self.nodes)
        # (the BoundaryCorrection whose C it holds, LU of I + C·Δ, fresh at the current s)
        self._jacobian: tuple | None = None

    def step(
        self,
        u: np.ndarray,
        residual,
        correction: BoundaryCorrection,
        beta: float,
        time: float,
        tolerance: float,
        limit: int,
    ) -> tuple[int, np.ndarray] | None:
        """Solve the step from the guess ``u`` (updated in place): (surface iterations, the
        residual at the answer), or None when the whole field must iterate on. Raises
        :class:`SurfaceStallError` when the iterations circle a kink: the whole field's Newton
        iterations, on the same equations with the same tangent, would too.

        ``residual(u)`` is the step's residual (W), ``correction`` keeps J₀'s factorisation,
        its diagonal and C; ``time`` is where the conditions are evaluated, s; ``tolerance``
        (K) and ``limit`` (iterations) are the run's Newton settings."""
        free, on_surface = self.free, self.surface
        r0 = residual(u)
        q0 = self.system.surface_outflow(u, time)[self.nodes]
        y = correction.factor.solve(-r0[free] / beta)
        work = u.copy()
        start = u[self.nodes]
        s, iterations = self._surface_root(
            work, start + y[on_surface], start, q0, correction, time, tolerance, limit
        )
        if isinstance(s, float):  # the last change of stalled iterations, K
            raise SurfaceStallError(iterations, s, r0)
        if s is None:
            return None
        load = np.zeros(free.size)
        load[on_surface] = self._outflow(work, s, time) - q0
        u[free] += y - correction.factor.solve(load)
        r = residual(u)
        if np.abs(r[free] / (beta * correction.diagonal)).max(initial=0.0) > tolerance:
            return None  # not affine off the surface: the whole field iterates on
        return iterations, r

    def _surface_root(self, work, linear, start, q0, correction, time, tolerance, limit):
        """Newton's method on F(s) = s − ``linear`` + C·(q(s) − q0) from s = ``start``, its
        Jacobian I + C·Δ factorised when first needed and kept while each iteration shrinks
        the change at least by ``SURFACE_RATE`` (a chord: Δ moves little from one step to the
        next), damped by halving on |F|: (s, iterations); (None, iterations) without
        convergence, (the last change in K, iterations) when the updates stall."""
        coupling = correction.coupling
        s = start.copy()
        defect = s - linear + coupling @ (self._outflow(work, s, time) - q0)
        norm, previous, stalled = float(np.linalg.norm(defect)), np.inf, 0
        if self._jacobian is None or self._jacobian[0] is not correction:
            self._factorise(work, correction, time)
        for iteration in range(1, limit + 1):
            change = lu_solve(self._jacobian[1], -defect, check_finite=False)
            largest = float(np.abs(change).max(initial=0.0))
            if largest > SURFACE_RATE * previous and not self._jacobian[2]:
                self._factorise(work, correction, time)  # at s: the kept one fell behind
                change = lu_solve(self._jacobian[1], -defect, check_finite=False)
                largest = float(np.abs(change).max(initial=0.0))
            rate = largest / previous  # the changes still to come: θ/(1 − θ) of this one
            if largest <= SURFACE_SHARE * tolerance or (
                0 < rate < 1 and rate / (1 - rate) * largest <= SURFACE_SHARE * tolerance
            ):
                work[self.nodes] = s + change
                return s + change, iteration
            length = 1.0
            while True:
                trial = s + length * change
                trial_defect = trial - linear + coupling @ (self._outflow(work, trial, time) - q0)
                trial_norm = float(np.linalg.norm(trial_defect))
                if trial_norm < norm or length <= SHORTEST_LENGTH:
                    break
                length /= 2
            s, defect, norm, previous = trial, trial_defect, trial_norm, length * largest
            self._jacobian = (*self._jacobian[:2], False)
            stalled = stalled + 1 if length <= STALLED_LENGTH else 0
            if stalled >= STALLED_ITERATIONS:  # circling a kink of the curve
                return largest, iteration
        return None, limit

    def _factorise(self, work, correction: BoundaryCorrection, time: float) -> None:
        """Factorise I + C·Δ with Δ at the surface temperatures in ``work``."""
        slope = self._restricted(self.system.surface_tangent(work, time).tocsr())
        jacobian = np.eye(self.nodes.size) + (slope.T @ correction.coupling.T).T
        with one_blas_thread():
            lu = lu_factor(jacobian, check_finite=False)
        self._jacobian = (correction, lu, True)

    def _outflow(self, work: np.ndarray, s: np.ndarray, time: float) -> np.ndarray:
        """q on S with the surface at ``s`` (``work`` holds the field; its S entries are set)."""
        work[self.nodes] = s
        return self.system.surface_outflow(work, time)[self.nodes]
