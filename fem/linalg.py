"""Factorisations of the step matrices and their cache, and what the linear algebra cost.

Step matrices M + s·A are symmetric positive definite (every linear problem, and the tangents
of radiation and c(T)): they need no pivoting, and SuperLU's symmetric mode keeps a symmetric
ordering intact (with partial pivoting, minimum degree on AᵀA + A factorised ~100× and solved
~25× slower at 10k unknowns). The ordering is minimum degree on AᵀA + A for small problems and
nested dissection of the mesh (:mod:`fem.ordering`, computed once per run) from
``NESTED_DISSECTION_FROM`` unknowns. Newton tangents that k(T) makes unsymmetric keep the
symmetric ordering with threshold pivoting below that size, COLAMD with partial pivoting above.
"""

from __future__ import annotations

import time as clock
from collections import OrderedDict
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from .ordering import PermutedFactor, nested_dissection
from .system import ConductionSystem

FACTOR_CACHE = 4
# Factor entries of nested dissection against minimum degree (symmetric mode, step matrices):
# 0.95 on the 193k-node L-profile, 0.75 on the 97k-node square, 0.66 at 992k nodes; below
# ~50k unknowns minimum degree is as good or better (1.0-1.6 on small L-profiles).
NESTED_DISSECTION_FROM = 50_000


@dataclass
class Cost:
    """What a run spent on linear algebra and iterations (the counters of SolverStats)."""

    factorisations: int = 0
    factorisation_seconds: float = 0.0
    solves: int = 0
    newton_iterations: int = 0
    max_newton_iterations: int = 0
    damped_iterations: int = 0  # Newton updates shortened by the line search
    iteration_seconds: float = 0.0  # Newton iterations of converged steps, factorisations in

    def iterated(self, iterations: int) -> None:
        """Count a step's Newton iterations (one solve each)."""
        self.solves += iterations
        self.newton_iterations += iterations
        self.max_newton_iterations = max(self.max_newton_iterations, iterations)


class LinearAlgebra:
    """Factorisations on a system's free degrees of freedom, and caches keyed by (scale,
    coefficients): a linear problem at a given step is factorised once; a factorisation is
    redone only when the step or a coefficient changes."""

    def __init__(self, system: ConductionSystem, cost: Cost):
        self.system = system
        self.cost = cost
        self._ordering: np.ndarray | None = None  # nested dissection of the free unknowns
        self._factors: OrderedDict = OrderedDict()
        self._operators: OrderedDict = OrderedDict()
        self._explicit: OrderedDict = OrderedDict()

    def factor(self, matrix: sp.spmatrix, symmetric: bool = False):
        """LU of the free block of ``matrix``; ``symmetric`` for positive definite ones."""
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
            if self._ordering is None:  # every step matrix and tangent has the same pattern
                self._ordering = nested_dissection(
                    matrix[free][:, free].tocsr(), self.system.basis.doflocs[:, free]
                )
            numbered = free[self._ordering]
            factor = PermutedFactor(
                spla.splu(
                    matrix[numbered][:, numbered].tocsc(),
                    permc_spec="NATURAL",
                    diag_pivot_thresh=0.0,
                    options={"SymmetricMode": True},
                ),
                self._ordering,
            )
        elif free.size < NESTED_DISSECTION_FROM:
            # Nearly symmetric (k(T) adds k'(T)·δ·∇T): the symmetric ordering, diagonal pivots
            # unless one is below a tenth of its column, so pivoting happens only where needed.
            # On freezing tangents at 10k unknowns: factorised 1.3-2× and solved 1.2-2× faster
            # than COLAMD with partial pivoting, residuals alike (~1e-15).
            factor = spla.splu(
                matrix[free][:, free].tocsc(),
                permc_spec="MMD_AT_PLUS_A",
                diag_pivot_thresh=0.1,
                options={"SymmetricMode": True},
            )
        else:
            factor = spla.splu(matrix[free][:, free].tocsc(), permc_spec="COLAMD")
        self.cost.factorisations += 1
        self.cost.factorisation_seconds += clock.perf_counter() - started
        return factor

    def step_factor(self, scale: float, time: float):
        """The LU of M + scale·A(time), kept in a small cache (most recently used kept)."""
        key = (float(f"{scale:.12e}"), self.system.exchange_key(time))
        return _remember(
            self._factors,
            key,
            lambda: self.factor(
                self.system.capacity + scale * self.system.exchange_operator(time),
                symmetric=True,
            ),
            recency=True,
        )

    def shifted_solver(self, shift: float, time: float) -> Callable[[np.ndarray], np.ndarray]:
        """x ↦ (M + shift·A(time))⁻¹x on the free degrees of freedom."""
        return self.step_factor(shift, time).solve

    def operator(self, time: float) -> tuple[sp.csr_matrix, np.ndarray]:
        """A(t) with its column sums (1ᵀA, for the heat balance), cached by coefficients."""

        def make():
            operator = self.system.exchange_operator(time)
            return operator, np.asarray(operator.sum(axis=0)).ravel()

        return _remember(self._operators, self.system.exchange_key(time), make)

    def explicit(self, scale: float, time: float) -> sp.csr_matrix:
        """M − scale·A(time), the explicit part of a theta step, cached beside the factors."""
        key = (float(f"{scale:.12e}"), self.system.exchange_key(time))
        return _remember(
            self._explicit,
            key,
            lambda: (self.system.capacity - scale * self.operator(time)[0]).tocsr(),
        )


def _remember(cache: OrderedDict, key, make: Callable, recency: bool = False):
    """``cache[key]``, made when missing; the oldest (or least recently used) entry goes when
    the cache holds more than FACTOR_CACHE."""
    if key in cache:
        if recency:
            cache.move_to_end(key)
        return cache[key]
    value = cache[key] = make()
    if len(cache) > FACTOR_CACHE:
        cache.popitem(last=False)
    return value
