"""Newton tangents factorised in single precision (``fem.single_precision``), against scipy's
sparse direct solve in double precision computed here.

A well-conditioned tangent a·M + K⁰·diag(k) on a grid (condition about 1e2, as a freezing
tangent at a moderate step) is factorised in single precision: its solutions must match the
double-precision solve to single precision's rounding (2⁻²⁴ ≈ 6e-8) times the condition, with
room for the LU's growth (1e-4 relative). A nearly singular one (a grid Laplacian with a
capacity of 1e-9 of its conduction, condition about 1e10) fails the check solve and must be
factorised in double precision: its residual then is a backward-stable solve's, below
1e-12·‖J‖·‖x‖ (double precision's 1e-16 with room for the LU's growth). Only the free block is
factorised when some degrees of freedom are held.
"""

from __future__ import annotations

from types import SimpleNamespace

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from fem.linalg import Cost, KeptOrderLU
from fem.single_precision import SinglePrecisionLU


def _grid(n: int) -> sp.csr_matrix:
    one = sp.diags([-1.0, 2.0, -1.0], [-1, 0, 1], shape=(n, n)).tolil()
    one[0, 0] = one[-1, -1] = 1.0  # insulated ends: the Laplacian alone is singular
    one = one.tocsr()
    return (sp.kron(one, sp.eye(n)) + sp.kron(sp.eye(n), one)).tocsr()


def _lu(free: np.ndarray) -> SinglePrecisionLU:
    algebra = SimpleNamespace(system=SimpleNamespace(free_dofs=free), cost=Cost())
    return SinglePrecisionLU(KeptOrderLU(algebra), free)


def test_well_conditioned_tangent_is_solved_in_single_precision():
    rng = np.random.default_rng(3)
    n = 30
    unit = _grid(n)
    capacity = sp.diags(rng.uniform(0.3, 15.0, n * n))
    tangent = (capacity + unit @ sp.diags(rng.uniform(0.5, 1.6, n * n))).tocsr()
    free = np.setdiff1d(np.arange(n * n), np.arange(n))  # the first grid row held
    lu = _lu(free)
    for _ in range(2):  # ordered once, then in the kept order
        factor = lu.factor(tangent)
        rhs = rng.standard_normal(free.size)
        expected = spla.spsolve(tangent[free][:, free].tocsc(), rhs)
        solved = factor.solve(rhs)
        assert solved.dtype == np.float64
        assert np.linalg.norm(solved - expected) <= 1e-4 * np.linalg.norm(expected)
        assert np.linalg.norm(solved - expected) > 1e-12 * np.linalg.norm(expected)  # single
    assert lu.doubles == 0


def test_badly_conditioned_tangent_falls_back_to_double_precision():
    rng = np.random.default_rng(4)
    n = 30
    tangent = (1e-9 * sp.eye(n * n) + _grid(n)).tocsr()
    free = np.arange(n * n)
    lu = _lu(free)
    factor = lu.factor(tangent)
    assert lu.doubles == 1
    rhs = rng.standard_normal(n * n)
    solved = factor.solve(rhs)
    # A backward-stable solve: residual ≤ (round-off × growth room) · ‖J‖ · ‖x‖.
    size = spla.norm(tangent, 1)
    assert np.linalg.norm(tangent @ solved - rhs) <= 1e-12 * size * np.linalg.norm(solved)


def test_tangent_singular_once_rounded_is_factorised_in_double_precision():
    # [[1, 1], [1, 1 + 1e-10]] rounds to a singular matrix in single precision (2⁻²⁴ ≈ 6e-8);
    # in double precision its determinant 1e-10 is kept, and x = [1, 1] solves it for
    # b = [2, 2 + 1e-10] (by hand), to its condition 4e10 times 1e-16 (1e-4 with room).
    tangent = sp.csr_matrix(np.array([[1.0, 1.0], [1.0, 1.0 + 1e-10]]))
    lu = _lu(np.arange(2))
    factor = lu.factor(tangent)
    assert lu.doubles == 1
    solved = factor.solve(np.array([2.0, 2.0 + 1e-10]))
    assert np.allclose(solved, [1.0, 1.0], rtol=0.0, atol=1e-4)
