"""A kept Newton tangent factorised in single precision, checked against the double one.

Simplified Newton needs the tangent only as an approximation: the residual, the convergence
test and the energy balance stay in double precision, so the solution reached is the same.
An LU of the tangent in single precision (SuperLU's ``sgstrf`` on the same ordering, the same
fill) halves the bytes a factorisation and a solve move: on the benchmark's freezing tangent at
10k unknowns 12.5 instead of 15.7 ms a factorisation and 0.53 instead of 0.67 ms a solve, with
a relative error of 1e-5 in the solution, far below what a kept tangent misses anyway (its
iterations shrink the change only 2-10× each). Single precision is kept only when a solve
against the double-precision tangent leaves a relative residual below ``SINGLE_RESIDUAL``
(a badly conditioned tangent, a large step on a fine mesh, goes back to double precision): that
residual is what the single-precision factor adds to the iterations' rate of convergence.
"""

from __future__ import annotations

import math

import numpy as np
import scipy.sparse as sp

# Largest relative residual ‖J·x − b‖/‖b‖ of a single-precision solve that is accepted: it adds
# at most this much to the kept tangent's rate (0.1-0.5 an iteration on a moving front).
SINGLE_RESIDUAL = 1e-4


class SinglePrecisionLU:
    """Factorisations of a run's unsymmetric tangents in single precision where they solve
    well enough, in double precision otherwise.

    Parameters
    ----------
    kept_order : fem.linalg.KeptOrderLU
        Factorises the free block of a matrix in the run's kept order (either precision).
    free : ndarray
        The free degrees of freedom (those the factor solves for).
    """

    def __init__(self, kept_order, free: np.ndarray):
        self.kept_order, self.free = kept_order, free
        # A fixed test vector with entries of both signs and many magnitudes.
        self._probe = np.random.default_rng(20_240_611).standard_normal(free.size)
        self.doubles = 0  # tangents that needed double precision

    def factor(self, jacobian: sp.spmatrix):
        """A factorisation of ``jacobian``'s free block (an object with ``solve(rhs)``),
        single precision when it passes the residual check."""
        single = jacobian.astype(np.float32)
        if np.isfinite(single.data).all():
            try:
                factor = _DoubleSolutions(self.kept_order.factor(single))
            except RuntimeError:  # exactly singular once rounded: double precision decides
                factor = None
            if factor is not None and self._residual(jacobian, factor) <= SINGLE_RESIDUAL:
                return factor
        self.doubles += 1
        return self.kept_order.factor(jacobian)

    def _residual(self, jacobian: sp.spmatrix, factor) -> float:
        """‖J·x − b‖/‖b‖ for the solve x of the probe b, J in double precision."""
        b, free = self._probe, self.free
        solution = factor.solve(b)
        if not np.isfinite(solution).all():
            return math.inf
        if free.size == jacobian.shape[0]:
            image = jacobian @ solution
        else:
            full = np.zeros(jacobian.shape[0])
            full[free] = solution
            image = (jacobian @ full)[free]
        image -= b
        return float(np.linalg.norm(image) / np.linalg.norm(b))


class _DoubleSolutions:
    """A single-precision factor taking and giving double precision: the right-hand side is
    scaled to a largest entry of 1 before it is rounded, so no residual, however small or
    large, leaves single precision's range."""

    def __init__(self, factor):
        self.factor = factor

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        scale = float(np.abs(rhs).max(initial=0.0))
        if scale == 0.0 or not math.isfinite(scale):
            return np.zeros_like(rhs) if scale == 0.0 else np.full_like(rhs, np.nan)
        solution = self.factor.solve((rhs * (1.0 / scale)).astype(np.float32))
        return solution.astype(np.float64) * scale
