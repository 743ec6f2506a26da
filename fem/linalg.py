"""Factorisations of the step matrices and their cache, and what the linear algebra cost.

Step matrices M + s·A are symmetric positive definite (every linear problem, and the tangents
of radiation and c(T)). Two ways to factorise them, both reached through
:meth:`LinearAlgebra.factor` (an object with ``solve(rhs)``):

- ``"cholesky"``: L·Lᵀ from CHOLMOD through ``cholespy`` (a wheel with SuiteSparse inside),
  which orders the matrix itself (METIS nested dissection) and permutes inside its solve. It
  stores one triangle: on the benchmark square's step matrix a solve took 0.29 ms instead of
  0.63 ms at 10k unknowns, 7.6 ms instead of 14.7 ms at 97k and 145 ms instead of 188 ms at
  992k, while its factorisation took longer (39 ms against 26 ms at 10k; 16.1 s against 5.0 s
  of ordering and 7.5 s of LU at 992k), so it pays from about 50 (97k) to 100-150 (10k, 992k)
  solves per factorisation.
  The default for the step matrices of fixed-step runs (one factorisation serves the run's
  steps; the driver chooses, :mod:`fem.transient`) when ``cholespy`` is installed; other
  factorisations (adaptive steps, exponential steps, Newton tangents) take it when asked.
- ``"superlu"``: SuperLU's LU in symmetric mode without pivoting (with partial pivoting,
  minimum degree on AᵀA + A factorised ~100× and solved ~25× slower at 10k unknowns), ordered
  by minimum degree on AᵀA + A for small problems and by nested dissection of the mesh
  (:mod:`fem.ordering`, computed once per run) from ``NESTED_DISSECTION_FROM`` unknowns.

From 200k unknowns, a Cholesky run without fixed temperatures factorises its step matrices and
makes its explicit products in a numbering of its own that keeps neighbours close in memory
(:attr:`LinearAlgebra.numbering`, :mod:`fem.products`).

Newton tangents that k(T) makes unsymmetric keep SuperLU: the symmetric ordering with
threshold pivoting below that size, COLAMD with partial pivoting above.
"""

from __future__ import annotations

import functools
import time as clock
from collections import OrderedDict
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from .errors import ModelError
from .ordering import PermutedFactor, nested_dissection
from .products import RowBlockProduct, local_numbering
from .system import ConductionSystem

FACTOR_CACHE = 4
# Factor entries of nested dissection against minimum degree (symmetric mode, step matrices):
# 0.95 on the 193k-node L-profile, 0.75 on the 97k-node square, 0.66 at 992k nodes; below
# ~50k unknowns minimum degree is as good or better (1.0-1.6 on small L-profiles).
NESTED_DISSECTION_FROM = 50_000
SYMMETRIC_SOLVERS = ("cholesky", "superlu")
# The factorisation of the step matrices; None: "cholesky" when cholespy is installed, else
# "superlu". A setting for comparisons (the benchmarks, the tests).
SYMMETRIC_SOLVER: str | None = None


@functools.cache
def cholesky_available() -> bool:
    """Whether ``cholespy`` can be imported (it is an optional dependency on some platforms)."""
    try:
        import cholespy  # noqa: F401
    except ImportError:
        return False
    return True


def choose_symmetric_solver(choice: str | None = None) -> str:
    """The factorisation of the step matrices: ``choice``, else ``SYMMETRIC_SOLVER``, else
    ``"cholesky"`` when ``cholespy`` is installed.

    Raises
    ------
    ModelError
        For an unknown name, or ``"cholesky"`` without cholespy.
    """
    choice = choice or SYMMETRIC_SOLVER
    if choice is None:
        return "cholesky" if cholesky_available() else "superlu"
    if choice not in SYMMETRIC_SOLVERS:
        raise ModelError(
            f"symmetric solver must be one of {', '.join(SYMMETRIC_SOLVERS)}, got {choice!r}",
            argument="symmetric_solver",
        )
    if choice == "cholesky" and not cholesky_available():
        raise ModelError(
            'the Cholesky solver needs the cholespy package (pip install cholespy); use "superlu"',
            argument="symmetric_solver",
        )
    return choice


class CholeskyFactor:
    """L·Lᵀ of a symmetric positive definite matrix, as a solver (CHOLMOD through cholespy).

    CHOLMOD orders the matrix itself (nested dissection by METIS) and applies the permutation
    inside its solve, so the caller works in its own numbering. Only the lower triangle is
    handed over.

    Raises
    ------
    ValueError
        When the matrix is not positive definite (from cholespy).
    """

    solver = "cholesky"

    def __init__(self, matrix: sp.spmatrix):
        from cholespy import CholeskySolverD, MatrixType

        lower = sp.tril(matrix, format="csc")
        lower.sort_indices()
        self.shape = lower.shape
        self.lower_entries = int(lower.nnz)
        self._solver = CholeskySolverD(
            lower.shape[0],
            lower.indptr.astype(np.int32),
            lower.indices.astype(np.int32),
            np.ascontiguousarray(lower.data, dtype=np.float64),
            MatrixType.CSC,
        )

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        """x with L·Lᵀ·x = rhs; ``rhs`` of shape (n,) or (n, k)."""
        rhs = np.ascontiguousarray(rhs, dtype=np.float64)
        x = np.empty_like(rhs)
        self._solver.solve(rhs, x)
        return x


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

    def iterated(self, iterations: int, solves: int | None = None) -> None:
        """Count a step's Newton iterations (one solve each, unless ``solves`` says)."""
        self.solves += iterations if solves is None else solves
        self.newton_iterations += iterations
        self.max_newton_iterations = max(self.max_newton_iterations, iterations)


class LinearAlgebra:
    """Factorisations on a system's free degrees of freedom, and caches keyed by (scale,
    coefficients): a linear problem at a given step is factorised once; a factorisation is
    redone only when the step or a coefficient changes."""

    def __init__(self, system: ConductionSystem, cost: Cost, symmetric_solver: str | None = None):
        self.system = system
        self.cost = cost
        self.step_solver = choose_symmetric_solver(symmetric_solver)
        self._ordering: np.ndarray | None = None  # nested dissection of the free unknowns
        self._factors: OrderedDict = OrderedDict()
        self._operators: OrderedDict = OrderedDict()
        self._explicit: OrderedDict = OrderedDict()
        self._fixed_parts: OrderedDict = OrderedDict()
        self._loads: OrderedDict = OrderedDict()
        self._numbered_loads: OrderedDict = OrderedDict()

    @functools.cached_property
    def numbering(self) -> np.ndarray | None:
        """The order in which the steps number the unknowns (``numbering[k]`` is the degree of
        freedom numbered k), or None for the system's own numbering: a numbering that keeps
        neighbours close (:func:`fem.products.local_numbering`) for Cholesky steps on large
        meshes without fixed temperatures. Step factors and explicit products are made in it."""
        system = self.system
        if self.step_solver != "cholesky" or system.free_dofs.size != system.size:
            return None
        return local_numbering(abs(system.capacity) + abs(self.operator(0.0)[0]))

    def factor(self, matrix: sp.spmatrix, symmetric: bool = False, solver: str = "superlu"):
        """A factorisation of the free block of ``matrix``: an object with ``solve(rhs)``.

        Parameters
        ----------
        matrix : scipy.sparse matrix
            The whole matrix (every degree of freedom); its free block is factorised.
        symmetric : bool
            The matrix is symmetric positive definite.
        solver : {"superlu", "cholesky"}
            For symmetric matrices: the factorisation (default SuperLU, cheaper to make; the
            step matrices take ``step_solver``). A matrix Cholesky finds not positive definite
            is factorised by LU with pivoting instead.
        """
        started = clock.perf_counter()
        free = self.system.free_dofs
        every = free.size == matrix.shape[0]
        block = matrix if every else matrix[free][:, free]
        factor = None
        if symmetric and choose_symmetric_solver(solver) == "cholesky":
            try:
                factor = CholeskyFactor(block)
            except ValueError:  # not positive definite after all: LU with pivoting below
                symmetric = False
        if factor is None and symmetric:
            factor = self._symmetric_lu(matrix, block)
        elif factor is None:
            factor = _unsymmetric_lu(block)
        self.cost.factorisations += 1
        self.cost.factorisation_seconds += clock.perf_counter() - started
        return factor

    def _symmetric_lu(self, matrix: sp.spmatrix, block: sp.spmatrix):
        """SuperLU in symmetric mode: minimum degree below NESTED_DISSECTION_FROM unknowns,
        nested dissection of the mesh (computed once per run) from there."""
        free = self.system.free_dofs
        if free.size < NESTED_DISSECTION_FROM:
            return spla.splu(
                block.tocsc(),
                permc_spec="MMD_AT_PLUS_A",
                diag_pivot_thresh=0.0,
                options={"SymmetricMode": True},
            )
        if self._ordering is None:  # every step matrix and tangent has the same pattern
            self._ordering = nested_dissection(block.tocsr(), self.system.basis.doflocs[:, free])
        numbered = free[self._ordering]
        return PermutedFactor(
            spla.splu(
                matrix[numbered][:, numbered].tocsc(),
                permc_spec="NATURAL",
                diag_pivot_thresh=0.0,
                options={"SymmetricMode": True},
            ),
            self._ordering,
        )

    def step_factor(self, scale: float, time: float):
        """The factor of M + scale·A(time) (by ``step_solver``), kept in a small cache (most
        recently used kept)."""
        key = (float(f"{scale:.12e}"), self.system.exchange_key(time))

        def make():
            matrix = self.system.capacity + scale * self.system.exchange_operator(time)
            order = self.numbering
            if order is None:
                return self.factor(matrix, symmetric=True, solver=self.step_solver)
            matrix = sp.csr_matrix(matrix)[order][:, order]
            factor = self.factor(matrix, symmetric=True, solver=self.step_solver)
            return PermutedFactor(factor, order)  # .factor solves in the numbering

        return _remember(self._factors, key, make, recency=True)

    def shifted_solver(self, shift: float, time: float) -> Callable[[np.ndarray], np.ndarray]:
        """x ↦ (M + shift·A(time))⁻¹x on the free degrees of freedom."""
        return self.step_factor(shift, time).solve

    def operator(self, time: float) -> tuple[sp.csr_matrix, np.ndarray]:
        """A(t) with its column sums (1ᵀA, for the heat balance), cached by coefficients."""

        def make():
            operator = self.system.exchange_operator(time)
            return operator, np.asarray(operator.sum(axis=0)).ravel()

        return _remember(self._operators, self.system.exchange_key(time), make)

    def explicit(self, scale: float, time: float) -> RowBlockProduct:
        """x ↦ (M − scale·A(time))·x, the explicit part of a theta step, in the steps'
        :attr:`numbering`, cached beside the factors."""
        key = (float(f"{scale:.12e}"), self.system.exchange_key(time))

        def make():
            matrix = sp.csr_matrix(self.system.capacity - scale * self.operator(time)[0])
            order = self.numbering
            return RowBlockProduct(matrix if order is None else matrix[order][:, order])

        return _remember(self._explicit, key, make)

    @functools.cached_property
    def capacity(self) -> RowBlockProduct:
        """x ↦ M·x in the steps' :attr:`numbering` (the history of backward Euler and BDF2
        steps)."""
        matrix, order = sp.csr_matrix(self.system.capacity), self.numbering
        return RowBlockProduct(matrix if order is None else matrix[order][:, order])

    def fixed_parts(self, scale: float, time: float) -> tuple[sp.csr_matrix, sp.csr_matrix]:
        """The step matrix S = M + scale·A(time) split at the fixed degrees of freedom: its
        free rows on the fixed columns (what the held values add to a free row) and its fixed
        rows (for the reactions), cached beside the factors."""

        def make():
            step_matrix = (self.system.capacity + scale * self.operator(time)[0]).tocsr()
            fixed = _fixed(self.system)
            coupling = step_matrix[self.system.free_dofs].tocsc()[:, fixed].tocsr()
            return coupling, step_matrix[fixed]

        key = (float(f"{scale:.12e}"), self.system.exchange_key(time))
        return _remember(self._fixed_parts, key, make)

    def load(self, time: float) -> tuple[np.ndarray, float]:
        """b(time) and its sum 1ᵀb (W), cached by the loads' coefficients (do not change the
        array in place)."""
        system = self.system

        def make():
            load = system.load(time)
            return load, float(load.sum())

        return _remember(self._loads, self._load_key(time), make)

    def numbered_load(self, time: float) -> np.ndarray:
        """b(time) in the steps' :attr:`numbering` (the same array when there is none)."""
        order = self.numbering
        if order is None:
            return self.load(time)[0]
        return _remember(
            self._numbered_loads, self._load_key(time), lambda: self.load(time)[0][order]
        )

    def _load_key(self, time: float) -> tuple:
        """What the loads at ``time`` depend on: the conditions' and sources' values."""
        system = self.system
        return tuple(c.supplied(time) for _, c in system.flowing()) + tuple(
            q(time) for q in system.model.heat_sources.values()
        )


def _fixed(system: ConductionSystem) -> np.ndarray:
    """Every fixed degree of freedom, group after group (the order of the reactions)."""
    groups = [np.asarray(dofs, dtype=np.int64) for dofs in system.fixed_dofs.values()]
    return np.concatenate(groups) if groups else np.zeros(0, dtype=np.int64)


def _unsymmetric_lu(block: sp.spmatrix):
    """SuperLU with pivoting, for tangents that k(T) makes unsymmetric."""
    if block.shape[0] < NESTED_DISSECTION_FROM:
        # Nearly symmetric (k(T) adds k'(T)·δ·∇T): the symmetric ordering, diagonal pivots
        # unless one is below a tenth of its column, so pivoting happens only where needed.
        # On freezing tangents at 10k unknowns: factorised 1.3-2× and solved 1.2-2× faster
        # than COLAMD with partial pivoting, residuals alike (~1e-15).
        return spla.splu(
            block.tocsc(),
            permc_spec="MMD_AT_PLUS_A",
            diag_pivot_thresh=0.1,
            options={"SymmetricMode": True},
        )
    return spla.splu(block.tocsc(), permc_spec="COLAMD")


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


class KeptOrderLU:
    """LU of the unsymmetric Newton tangents of a run (k(T) with latent heat or ρc(T)), whose
    free blocks share one sparsity pattern: ordered by minimum degree on AᵀA + A at the first
    factorisation (:func:`_unsymmetric_lu`), then factorised in that order with the ordering
    step skipped and supernodes unrelaxed (``relax=1, panel_size=1``: on freezing tangents
    14.5 ms instead of 25 ms at 10k unknowns, 0.8 ms instead of 1.1 ms at 1k, 122 ms instead
    of 149 ms at 38k, the same fill and solves; scipy's SuperLU crashed with both at 40). A
    block of another pattern is ordered afresh; from ``NESTED_DISSECTION_FROM`` unknowns
    COLAMD orders each.

    Parameters
    ----------
    algebra : LinearAlgebra
        Whose free degrees of freedom are factorised and whose cost counts the factorisations.
    """

    def __init__(self, algebra: LinearAlgebra):
        self.algebra = algebra
        self._kept: tuple | None = None  # the block's pattern, the order, the permuted pattern

    def factor(self, matrix: sp.spmatrix):
        """A factorisation of the free block of ``matrix``: an object with ``solve(rhs)``."""
        started = clock.perf_counter()
        free = self.algebra.system.free_dofs
        block = (matrix if free.size == matrix.shape[0] else matrix[free][:, free]).tocsr()
        block.sort_indices()
        kept = self._kept
        if block.shape[0] >= NESTED_DISSECTION_FROM:
            factor = _unsymmetric_lu(block)
        elif kept is not None and _same_pattern(block, kept[0], kept[1]):
            indptr, indices, order, pick, permuted_indptr, permuted_indices = kept
            permuted = sp.csc_matrix(
                (block.data[pick], permuted_indices, permuted_indptr), shape=block.shape
            )
            factor = PermutedFactor(
                spla.splu(
                    permuted,
                    permc_spec="NATURAL",
                    diag_pivot_thresh=0.1,
                    relax=1,
                    panel_size=1,
                    options={"SymmetricMode": True},
                ),
                order,
            )
        else:
            factor = _unsymmetric_lu(block)
            order = np.argsort(factor.perm_c)  # the columns in the order they were factorised
            pattern = (block.indptr.copy(), block.indices.copy())
            self._kept = (*pattern, order, *_permuted(block, order))
        self.algebra.cost.factorisations += 1
        self.algebra.cost.factorisation_seconds += clock.perf_counter() - started
        return factor


def _same_pattern(block: sp.csr_matrix, indptr: np.ndarray, indices: np.ndarray) -> bool:
    return np.array_equal(block.indptr, indptr) and np.array_equal(block.indices, indices)


def _permuted(block: sp.csr_matrix, order: np.ndarray):
    """Where each entry of the CSC matrix ``block[order][:, order]`` comes from in
    ``block.data``, and that matrix's pattern: a block of the same pattern is then permuted by
    one gather instead of two slicings."""
    numbered = sp.csr_matrix(
        (np.arange(1, block.nnz + 1, dtype=float), block.indices, block.indptr),
        shape=block.shape,
    )[order][:, order].tocsc()
    numbered.sort_indices()
    return numbered.data.astype(np.int64) - 1, numbered.indptr, numbered.indices
