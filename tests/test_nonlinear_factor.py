"""The LU that keeps its ordering across a run's unsymmetric Newton tangents
(``fem.linalg.KeptOrderLU``), against scipy's sparse direct solve computed here.

Tangents of the form a·M + K⁰·diag(k) (freezing: the unit stiffness with its columns scaled by
the nodal conductivity, unsymmetric) on a grid Laplacian: the second and later factorisations
of the same pattern reuse the first one's ordering, and each must solve its own matrix to
round-off (relative residual 1e-12, the LU's backward error times the matrices' condition,
about 1e3 here); a matrix of another pattern is ordered afresh and solved as well. Only the
free block is factorised when some degrees of freedom are held.
"""

from __future__ import annotations

from types import SimpleNamespace

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from fem.linalg import Cost, KeptOrderLU
from fem.ordering import PermutedFactor


def _tangent(n: int, rng: np.random.Generator, extra: bool = False) -> sp.csr_matrix:
    """a·M + K⁰·diag(k) on an n×n grid, k between 0.5 and 1.6 as across a freezing front."""
    one = sp.diags([-1.0, 2.0, -1.0], [-1, 0, 1], shape=(n, n))
    unit = (sp.kron(one, sp.eye(n)) + sp.kron(sp.eye(n), one)).tocsr()
    mass = sp.diags(rng.uniform(1.0, 50.0, n * n))
    tangent = (0.3 * mass + unit @ sp.diags(rng.uniform(0.5, 1.6, n * n))).tocsr()
    if extra:  # another pattern: one long-range coupling
        coupling = sp.csr_matrix(([-0.1], ([n], [n * n - 1])), shape=tangent.shape)
        tangent = (tangent + coupling).tocsr()
    return tangent


def _check(factor, block: sp.csr_matrix, rng: np.random.Generator) -> None:
    rhs = rng.standard_normal(block.shape[0])
    expected = spla.spsolve(block.tocsc(), rhs)
    solved = factor.solve(rhs)
    assert np.linalg.norm(solved - expected) <= 1e-12 * np.linalg.norm(expected) * 1e3
    assert np.linalg.norm(block @ solved - rhs) <= 1e-12 * np.linalg.norm(rhs)


def test_kept_ordering_solves_each_tangent():
    rng = np.random.default_rng(5)
    n = 30
    held = np.arange(n)  # the first grid row held at its temperature
    free = np.setdiff1d(np.arange(n * n), held)
    cost = Cost()
    algebra = SimpleNamespace(system=SimpleNamespace(free_dofs=free), cost=cost)
    lu = KeptOrderLU(algebra)
    for k in range(3):
        tangent = _tangent(n, rng)
        factor = lu.factor(tangent)
        assert isinstance(factor, PermutedFactor) == (k > 0)  # ordered once, then kept
        _check(factor, tangent[free][:, free], rng)
    other = _tangent(n, rng, extra=True)
    factor = lu.factor(other)
    assert not isinstance(factor, PermutedFactor)  # a new pattern is ordered afresh
    _check(factor, other[free][:, free], rng)
    _check(lu.factor(other), other[free][:, free], rng)
    assert cost.factorisations == 5 and cost.factorisation_seconds > 0
