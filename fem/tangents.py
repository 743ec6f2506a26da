"""Newton tangents that need no LU or no refactorisation: the symmetric chord for k(T), and
the surface's exact terms bordered onto a kept factorisation (:class:`BoundaryCorrection`).

With k(T) by product approximation (:mod:`fem.nonlinear_assembly`) the step's tangent is

    J = a·M + β·(K⁰·D + E),   D = diag(k(T_j)),

a the formula's a₀/h, M the capacity, K⁰ the unit stiffness and E the symmetric exchange and
capacity tangents: the columns of the conduction are scaled by the nodal conductivity, so J is
not symmetric and wants LU. Scaled on the right by D⁻¹ (the Kirchhoff variable δΦ = k·δT as
unknown), J·D⁻¹ = a·M·D⁻¹ + β·K⁰ + β·E·D⁻¹ is symmetric but for the capacity and exchange
terms, whose entries couple neighbouring nodes only, where k differs by k'·ΔT over one element.
Its symmetric part P = (J·D⁻¹ + D⁻¹·Jᵀ)/2 then differs from J·D⁻¹ only by
M_ij·(1 − k_j/k_i)/2 in the capacity (and alike in E), so the chord δ = D⁻¹·P⁻¹·r converges
nearly as Newton's, and P takes the Cholesky factorisation, whose solves cost a third of the
LU's. (Taking the symmetric part of J itself errs by K⁰_ij·(k_j − k_i)/2 in the conduction, the
dominant term, and was measured to need 40 % more iterations.)
"""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp


class ScaledFactor:
    """The solve δ = D⁻¹·P⁻¹·r with P = sym(J·D⁻¹) factorised (see the module).

    Parameters
    ----------
    factor : object with ``solve(rhs)``
        The factorisation of the free block of P.
    scale : ndarray
        The nodal conductivity on the free degrees of freedom, W/(m·K).
    """

    def __init__(self, factor, scale: np.ndarray):
        self.factor, self.scale = factor, scale
        self.solver = getattr(factor, "solver", "superlu")

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        """δ with P·(D·δ) = ``rhs`` (W), K."""
        return self.factor.solve(rhs) / self.scale


def symmetric_scaled(jacobian: sp.spmatrix, scale: np.ndarray) -> sp.csr_matrix:
    """P = (J·D⁻¹ + D⁻¹·Jᵀ)/2 for D = diag(``scale``), the nodal conductivity."""
    right = sp.csr_matrix(jacobian) @ sp.diags(1.0 / scale)
    return (0.5 * (right + right.T)).tocsr()


class BoundaryCorrection:
    """The exact tangent J = J₀ + E·Δ·Eᵀ of a step whose only nonlinearity is at the surface
    (h(T_s), radiation), solved with J₀'s factorisation kept for the run.

    J₀ is the tangent without the nonlinear conditions' terms (capacity, conduction and the
    linear exchange: constant for a step size), E the columns of the surface nodes S where
    those conditions act, and Δ = β·∂q/∂T on S×S, which changes every iteration. With
    C = Eᵀ·J₀⁻¹·E (|S| solves, once per step size), the bordered system gives

        (I + C·Δ)·x_S = y_S,   y = J₀⁻¹·r,   x = y − J₀⁻¹·E·Δ·x_S

    (the Sherman–Morrison–Woodbury identity; Golub & Van Loan, *Matrix Computations*, 4th ed.,
    §2.1.4, from memory): each Newton iteration is two solves and a dense |S|×|S| LU, no
    refactorisation, so the iterations converge as Newton's however far the coefficient moves
    along its curve.

    Parameters
    ----------
    factor : object with ``solve(rhs)``
        J₀'s factorisation on the free degrees of freedom.
    surface : ndarray of int
        Positions of S among the free degrees of freedom.
    size : int
        Free degrees of freedom.
    diagonal : ndarray, optional
        J₀'s diagonal on the free degrees of freedom (W/K): a step's correction estimated
        from its residual (:mod:`fem.surface_step`).
    """

    # right-hand sides per solve while C is built: CHOLMOD took 25 ms for C at 183 surface
    # nodes and 10k unknowns in blocks of 4 or 8, 43 ms in blocks of 64, 58 ms one by one
    BLOCK = 8

    def __init__(self, factor, surface: np.ndarray, size: int, diagonal=None):
        self.factor, self.surface, self.diagonal = factor, surface, diagonal
        self.solver = getattr(factor, "solver", "superlu")
        self.coupling = np.empty((surface.size, surface.size))  # C
        for start in range(0, surface.size, self.BLOCK):
            columns = surface[start : start + self.BLOCK]
            unit = np.zeros((size, columns.size))
            unit[columns, np.arange(columns.size)] = 1.0
            self.coupling[:, start : start + columns.size] = factor.solve(unit)[surface]
        self._delta: np.ndarray | None = None
        self._bordered = None

    def linearise(self, delta: sp.spmatrix) -> None:
        """Take Δ (|S|×|S|, sparse, W/K) of the current iterate."""
        self._delta = sp.csr_matrix(delta)

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        """x with (J₀ + E·Δ·Eᵀ)·x = ``rhs``."""
        y = self.factor.solve(rhs)
        on_surface = bordered_solve(self.coupling, self._delta, y[self.surface])
        load = np.zeros_like(y)
        load[self.surface] = self._delta @ on_surface
        return y - self.factor.solve(load)


def bordered_surface(system, adaptive: bool, largest: int) -> np.ndarray | None:
    """Positions among the free degrees of freedom of the surface nodes whose tangent a
    :class:`BoundaryCorrection` corrects, or None: for fixed steps (not ``adaptive``: a step
    size of its own every step would cost |S| solves each) of a model nonlinear only at its
    surface (constant k and ρc), with at most ``largest`` such nodes."""
    constant_k = all(isinstance(m.conductivity, float) for m in system.model.materials.values())
    if adaptive or not (system.constant_capacity and constant_k):
        return None
    position = np.full(system.size, -1, dtype=np.int64)
    position[system.free_dofs] = np.arange(system.free_dofs.size)
    surface = position[system.nonlinear_surface_nodes]
    surface = surface[surface >= 0]
    if surface.size == 0 or surface.size > largest:
        return None
    return surface


class SurfaceRestriction:
    """A matrix on the surface nodes S × S, its entries picked by positions found once for
    its pattern (the edge's, the same every call), not by sparse slicing.

    Parameters
    ----------
    nodes : ndarray of int
        The degrees of freedom of S, in the order of the bordered system.
    """

    def __init__(self, nodes: np.ndarray):
        self.nodes = nodes
        self._known = None  # (indptr, indices, picked positions, the S × S pattern)

    def __call__(self, matrix: sp.csr_matrix) -> sp.csr_matrix:
        known = self._known
        if known is None or not (
            np.array_equal(known[0], matrix.indptr) and np.array_equal(known[1], matrix.indices)
        ):
            numbered = sp.csr_matrix(
                (np.arange(1, matrix.nnz + 1, dtype=float), matrix.indices, matrix.indptr),
                shape=matrix.shape,
            )[self.nodes][:, self.nodes]
            numbered.sort_indices()
            pick = numbered.data.astype(np.int64) - 1
            known = (matrix.indptr.copy(), matrix.indices.copy(), pick, numbered)
            self._known = known
        _, _, pick, numbered = known
        entries = (matrix.data[pick], numbered.indices, numbered.indptr)
        return sp.csr_matrix(entries, shape=numbered.shape)


INNER_TOLERANCE = 1e-13  # relative residual of the bordered |S|×|S| system
INNER_ITERATIONS = 60


def bordered_solve(coupling: np.ndarray, delta: sp.csr_matrix, rhs: np.ndarray) -> np.ndarray:
    """x with (I + C·Δ)·x = ``rhs`` by GMRES with Givens rotations (Saad & Schultz 1986,
    from memory). C·Δ is the surface's coupling through the part times the coefficient's
    slope: near the identity (its size is about h·ℓ/k of one element), so a few iterations
    reach round-off. The products are einsum and a sparse product, not BLAS: a threaded BLAS
    call waits for a busy core (measured 16 ms instead of 0.4 ms for a 183×183 LU beside
    CHOLMOD's solves)."""
    size = rhs.size
    norm = float(np.sqrt(np.einsum("i,i->", rhs, rhs)))
    if norm == 0.0:
        return np.zeros(size)
    limit = min(INNER_ITERATIONS, size)
    basis = np.zeros((limit + 1, size))
    upper = np.zeros((limit + 1, limit))
    cosines, sines = np.zeros(limit), np.zeros(limit)
    target = np.zeros(limit + 1)
    target[0] = norm
    basis[0] = rhs / norm
    for j in range(limit):
        w = basis[j] + np.einsum("ij,j->i", coupling, delta @ basis[j])
        column = np.einsum("ki,i->k", basis[: j + 1], w)  # classical Gram-Schmidt, twice
        w -= np.einsum("ki,k->i", basis[: j + 1], column)
        again = np.einsum("ki,i->k", basis[: j + 1], w)
        w -= np.einsum("ki,k->i", basis[: j + 1], again)
        column += again
        length = float(np.sqrt(np.einsum("i,i->", w, w)))
        for i in range(j):  # the earlier rotations on the new column
            a, b = column[i], column[i + 1]
            column[i], column[i + 1] = cosines[i] * a + sines[i] * b, cosines[i] * b - sines[i] * a
        radius = float(np.hypot(column[j], length))
        cosines[j], sines[j] = column[j] / radius, length / radius
        column[j] = radius
        upper[: j + 1, j] = column
        target[j + 1] = -sines[j] * target[j]
        target[j] = cosines[j] * target[j]
        if abs(target[j + 1]) <= INNER_TOLERANCE * norm or length <= 1e-300:
            break
        basis[j + 1] = w / length
    steps = j + 1
    coefficients = _back_substitution(upper[:steps, :steps], target[:steps])
    return np.einsum("ki,k->i", basis[:steps], coefficients)


def _back_substitution(upper: np.ndarray, right: np.ndarray) -> np.ndarray:
    """x with upper·x = right, ``upper`` upper triangular (small: a loop, no LAPACK)."""
    x = np.zeros(right.size)
    for i in range(right.size - 1, -1, -1):
        x[i] = (right[i] - upper[i, i + 1 :] @ x[i + 1 :]) / upper[i, i]
    return x
