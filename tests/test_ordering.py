"""Nested dissection (``fem.ordering``) against SuperLU's own orderings and solver.

References: ``scipy.sparse.linalg.spsolve`` (SuperLU with COLAMD and partial pivoting) for the
solution, and SuperLU's minimum degree on AᵀA + A for the fill. On a 2-D mesh, nested
dissection's fill grows as n·log n (George, "Nested dissection of a regular finite element
mesh", SIAM J. Numer. Anal. 10 (1973); from memory), the natural order of a k × k grid as k³.
"""

from __future__ import annotations

import numpy as np
import pytest
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from fem import Convection, Material, ThermalModel, assemble
from fem.linalg import NESTED_DISSECTION_FROM
from fem.ordering import PermutedFactor, nested_dissection
from geometries import Circle, Rectangle


def grid_laplacian(k: int) -> tuple[sp.csr_matrix, np.ndarray]:
    """The 5-point matrix of a k × k grid plus the identity (positive definite), and the
    grid points."""
    line = sp.diags([-1.0, 2.0, -1.0], [-1, 0, 1], shape=(k, k))
    matrix = sp.kron(sp.eye(k), line) + sp.kron(line, sp.eye(k)) + sp.eye(k * k)
    x, y = np.meshgrid(np.arange(k, dtype=float), np.arange(k, dtype=float))
    return matrix.tocsr(), np.vstack([x.ravel(), y.ravel()])


def factor_entries(matrix: sp.spmatrix, order: np.ndarray | None) -> int:
    if order is None:
        lu = spla.splu(
            matrix.tocsc(),
            permc_spec="MMD_AT_PLUS_A",
            diag_pivot_thresh=0.0,
            options={"SymmetricMode": True},
        )
    else:
        lu = spla.splu(
            matrix.tocsr()[order][:, order].tocsc(),
            permc_spec="NATURAL",
            diag_pivot_thresh=0.0,
            options={"SymmetricMode": True},
        )
    return lu.L.nnz + lu.U.nnz


def step_matrix(section, order: int = 1) -> tuple[sp.csr_matrix, np.ndarray]:
    model = ThermalModel(
        section,
        Material(30.0, 7800.0, 480.0),
        {group: Convection(300.0, 20.0) for group in section.edge_groups},
        600.0,
        element_order=order,
    )
    system = assemble(model)
    return (system.capacity + 2.0 * system.exchange_operator(0.0)).tocsr(), system.basis.doflocs


@pytest.mark.parametrize("order", [1, 2])
def test_permuted_factor_solves_like_spsolve(order):
    section = (Rectangle(0.04, 0.03) - Circle(0.006, centre=(0.02, 0.015))).mesh(
        0.002, order=order
    )
    matrix, points = step_matrix(section, order)
    numbering = nested_dissection(matrix, points)
    assert np.array_equal(np.sort(numbering), np.arange(matrix.shape[0]))
    factor = PermutedFactor(
        spla.splu(
            matrix[numbering][:, numbering].tocsc(),
            permc_spec="NATURAL",
            diag_pivot_thresh=0.0,
            options={"SymmetricMode": True},
        ),
        numbering,
    )
    rhs = np.random.default_rng(3).random(matrix.shape[0])
    reference = spla.spsolve(matrix.tocsc(), rhs)
    # the agreement between solvers: 1e-10 relative
    assert np.abs(factor.solve(rhs) - reference).max() <= 1e-10 * np.abs(reference).max()


def test_separators_leave_the_parts_unconnected():
    """The first cut of a square grid is across x at the median: the left half is numbered
    first, the right nodes touching it (the separator) last, and the left half has no entry
    in common with the rest of the right half."""
    matrix, points = grid_laplacian(40)
    numbering = nested_dissection(matrix, points, leaf=8)
    n = matrix.shape[0]
    left = points[0] < np.median(points[0])
    coo = matrix.tocoo()
    touching = np.zeros(n, dtype=bool)
    touching[coo.row[~left[coo.row] & left[coo.col]]] = True
    assert set(numbering[: left.sum()]) == set(np.flatnonzero(left))
    assert set(numbering[n - touching.sum() :]) == set(np.flatnonzero(touching))
    rest = ~left & ~touching
    assert not np.any(left[coo.row] & rest[coo.col])
    assert 0 < touching.sum() <= 40  # one grid line


def test_fill_is_far_below_the_natural_order_of_a_grid():
    matrix, points = grid_laplacian(120)
    dissected = factor_entries(matrix, nested_dissection(matrix, points))
    natural = factor_entries(matrix, np.arange(matrix.shape[0]))
    # natural order fills the band: about 2·k³ entries in L and U; measured 0.24 of it
    assert dissected < 0.35 * natural


def test_fill_on_a_large_mesh_is_below_minimum_degree():
    """From NESTED_DISSECTION_FROM unknowns the solver uses nested dissection instead of
    SuperLU's minimum degree on AᵀA + A: on a square of that size its factor is smaller
    (measured 0.81 at 29k unknowns, 0.75 at 97k)."""
    section = Rectangle(0.05, 0.05).mesh(0.05 / 210)
    matrix, points = step_matrix(section)
    assert matrix.shape[0] >= NESTED_DISSECTION_FROM
    assert factor_entries(matrix, nested_dissection(matrix, points)) < 0.9 * factor_entries(
        matrix, None
    )


def test_fill_grows_like_n_log_n_on_refined_meshes():
    """Doubling k multiplies n by 4 and n·log n by a little more; the natural order's k³ by
    8. Measured ratios are checked against 4·log(4n)/log(n) with a margin."""
    sizes = (40, 80, 160)
    fills = []
    for k in sizes:
        matrix, points = grid_laplacian(k)
        fills.append(factor_entries(matrix, nested_dissection(matrix, points)))
    for i in range(len(sizes) - 1):
        n0, n1 = sizes[i] ** 2, sizes[i + 1] ** 2
        f0, f1 = fills[i], fills[i + 1]
        expected = n1 * np.log(n1) / (n0 * np.log(n0))
        assert f1 / f0 == pytest.approx(expected, rel=0.25)
        assert f1 / f0 < 6.0  # far from the natural order's 8


@pytest.mark.parametrize("leaf", [1, 4, 16])
def test_every_node_is_numbered_once_on_an_irregular_graph(leaf):
    """A Delaunay graph (scipy.spatial) of scattered points with a line of equal x (ties at
    the median) and three isolated nodes: the order is a permutation for any leaf size, and
    the factor is far below the natural order's."""
    from scipy.spatial import Delaunay

    rng = np.random.default_rng(7)
    points = rng.random((2, 3000))
    points[0, :200] = 0.5
    triangles = Delaunay(points.T).simplices
    i = np.concatenate([triangles[:, a] for a in (0, 1, 2)])
    j = np.concatenate([triangles[:, b] for b in (1, 2, 0)])
    n = points.shape[1] + 3
    adjacency = sp.coo_matrix((np.ones(i.size), (i, j)), shape=(n, n)).tocsr()
    adjacency = ((adjacency + adjacency.T) > 0).astype(float)
    matrix = (sp.diags(np.asarray(adjacency.sum(axis=1)).ravel() + 1.0) - adjacency).tocsr()
    points = np.hstack([points, [[2.0, 3.0, 4.0], [2.0, 3.0, 4.0]]])
    numbering = nested_dissection(matrix, points, leaf=leaf)
    assert np.array_equal(np.sort(numbering), np.arange(n))
    natural = factor_entries(matrix, np.arange(n))
    assert factor_entries(matrix, numbering) < 0.5 * natural
