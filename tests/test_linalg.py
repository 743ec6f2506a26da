"""The factorisations of ``fem.linalg`` and the linear step of ``fem.linear_step``.

References, computed here and not by the code under test:

- ``scipy.sparse.linalg.spsolve`` (SuperLU, COLAMD with partial pivoting) on the same matrix;
- the Crank–Nicolson step written out by hand, (M + h/2·A)·T1 = (M − h/2·A)·T0 + h·b, with the
  fixed temperatures held and the free block solved by ``spsolve`` (Crank & Nicolson 1947,
  from memory); its reactions are the unenforced rows, M·(T1 − T0)/h + A·(T1 + T0)/2 − b.

Tolerances: both solvers are backward stable, so a solve agrees to about the condition number
(~10³ here) times 1e-16; 1e-10 relative is the agreement asked of the Cholesky path against
SuperLU, and 1e-12 of the run's fields against the hand-written step (the two differ only in
the order of floating-point operations, over 40 steps of a contraction).
"""

from __future__ import annotations

import numpy as np
import pytest
import scipy.sparse as sp
import scipy.sparse.linalg as spla

import fem.linalg
import fem.products
from fem import (
    Convection,
    FixedTemperature,
    Insulated,
    Material,
    ModelError,
    ThermalModel,
    assemble,
    solve,
)
from fem.linalg import Cost, LinearAlgebra, cholesky_available, choose_symmetric_solver
from fem.schedules import PiecewiseLinear
from geometries import Rectangle

needs_cholesky = pytest.mark.skipif(
    not cholesky_available(), reason="cholespy is not installed (the Cholesky path is optional)"
)
STEEL = Material(45.0, 7850.0, 475.0)


def slab_model(fixed: bool) -> ThermalModel:
    """A 40 mm × 20 mm plate: held at 20 °C on the left (or cooled there), oil on the right."""
    section = Rectangle(
        0.04,
        0.02,
        edge_names={"left": "held", "right": "oil", "top": "sides", "bottom": "sides"},
    ).mesh(size=0.0015)
    left = FixedTemperature(20.0) if fixed else Convection(800.0, 20.0)
    return ThermalModel(
        section,
        STEEL,
        boundaries={"held": left, "oil": Convection(500.0, 60.0), "sides": Insulated()},
        initial_temperature=850.0,
    )


def step_matrix(model: ThermalModel) -> sp.csr_matrix:
    system = assemble(model)
    return (system.capacity + 2.0 * system.exchange_operator(0.0)).tocsr()


@needs_cholesky
def test_cholesky_factor_solves_like_spsolve():
    matrix = step_matrix(slab_model(fixed=False))
    rhs = np.random.default_rng(5).random((matrix.shape[0], 2))
    factor = fem.linalg.CholeskyFactor(matrix)
    reference = spla.spsolve(matrix.tocsc(), rhs)
    assert np.abs(factor.solve(rhs) - reference).max() <= 1e-10 * np.abs(reference).max()
    single = factor.solve(rhs[:, 0])
    assert single.shape == (matrix.shape[0],)
    assert np.abs(single - reference[:, 0]).max() <= 1e-10 * np.abs(reference[:, 0]).max()


@needs_cholesky
def test_a_matrix_that_is_not_positive_definite_is_solved_by_lu():
    """An indefinite symmetric matrix (the step matrix with one diagonal entry made negative)
    is not positive definite: Cholesky fails and the factorisation falls back to LU."""
    system = assemble(slab_model(fixed=False))
    matrix = (system.capacity + 2.0 * system.exchange_operator(0.0)).tolil()
    matrix[3, 3] = -2.0 * matrix.diagonal().max()
    matrix = matrix.tocsr()
    algebra = LinearAlgebra(system, Cost())
    factor = algebra.factor(matrix, symmetric=True, solver="cholesky")
    assert not isinstance(factor, fem.linalg.CholeskyFactor)
    rhs = np.random.default_rng(2).random(matrix.shape[0])
    reference = spla.spsolve(matrix.tocsc(), rhs)
    assert np.abs(factor.solve(rhs) - reference).max() <= 1e-10 * np.abs(reference).max()


def test_step_matrices_take_cholesky_and_tangents_superlu_by_default():
    system = assemble(slab_model(fixed=False))
    algebra = LinearAlgebra(system, Cost())
    expected = fem.linalg.CholeskyFactor if cholesky_available() else spla.SuperLU
    assert isinstance(algebra.step_factor(2.0, 0.0), expected)
    assert isinstance(algebra.factor(system.capacity, symmetric=True), spla.SuperLU)


def test_an_unknown_symmetric_solver_is_refused():
    with pytest.raises(ModelError, match="cholesky, superlu") as error:
        choose_symmetric_solver("pardiso")
    assert error.value.argument == "symmetric_solver"


@needs_cholesky
@pytest.mark.parametrize("numbered", [False, True])
@pytest.mark.parametrize("fixed", [False, True])
def test_cholesky_run_agrees_with_superlu(monkeypatch, fixed, numbered):
    """The same run (40 Crank–Nicolson steps with start-up) with each symmetric solver; the
    Cholesky steps also in a numbering of their own (backward-Euler start-up included)."""
    if numbered:
        number_every_run(monkeypatch)
    model = slab_model(fixed)
    runs = {}
    for solver in ("superlu", "cholesky"):
        monkeypatch.setattr(fem.linalg, "SYMMETRIC_SOLVER", solver)
        runs[solver] = solve(model, end_time=400.0, time_step=10.0, output_interval=100.0)
    a, b = runs["superlu"], runs["cholesky"]
    span = 850.0 - 20.0
    assert np.abs(a.final_state - b.final_state).max() <= 1e-10 * span
    assert np.abs(a.mean - b.mean).max() <= 1e-10 * span
    for name in a.heat_flow:
        flow = np.abs(a.heat_flow[name]).max()
        assert np.abs(a.heat_flow[name] - b.heat_flow[name]).max() <= 1e-10 * flow


def hand_crank_nicolson(model: ThermalModel, step: float, steps: int):
    """Plain Crank–Nicolson written out with spsolve; the final field and the held group's
    reaction (W) at every step."""
    system = assemble(model)
    M, A, b = system.capacity.tocsr(), system.exchange_operator(0.0).tocsr(), system.load(0.0)
    fixed = np.concatenate([np.asarray(d) for d in system.fixed_dofs.values()] or [[]])
    fixed = fixed.astype(int)
    free = np.setdiff1d(np.arange(system.size), fixed)
    left = (M + 0.5 * step * A).tocsr()
    right = (M - 0.5 * step * A).tocsr()
    u = np.full(system.size, 850.0)
    u[fixed] = 20.0
    reactions = []
    for _ in range(steps):
        rhs = right @ u + step * b
        new = u.copy()
        new[free] = spla.spsolve(
            left[free][:, free].tocsc(), rhs[free] - left[free][:, fixed] @ new[fixed]
        )
        rows = M @ (new - u) / step + A @ (new + u) / 2 - b
        reactions.append(rows[fixed].sum())
        u = new
    return u, np.array(reactions)


def number_every_run(monkeypatch) -> None:
    """Make the steps of every Cholesky run without fixed temperatures take a numbering of
    their own (reverse Cuthill–McKee), as large meshes do."""
    monkeypatch.setattr(fem.products, "LOCAL_NUMBERING_FROM", 0)
    monkeypatch.setattr(fem.products, "LOCALITY_GAIN", 0.0)


@pytest.mark.parametrize("numbered", [False, True])
@pytest.mark.parametrize("threads", [1, 2])
@pytest.mark.parametrize("fixed", [False, True])
def test_linear_steps_match_crank_nicolson_written_out(monkeypatch, fixed, threads, numbered):
    """With the explicit products on one thread, and cut into two row blocks on two threads;
    in the mesh's numbering and in one of the steps' own (what large meshes get)."""
    monkeypatch.setattr(fem.products, "PRODUCT_THREADS", threads)
    if numbered:
        number_every_run(monkeypatch)
    model = slab_model(fixed)
    steps, step = 40, 10.0
    expected, reactions = hand_crank_nicolson(model, step, steps)
    run = solve(
        model, end_time=steps * step, time_step=step, startup_steps=0, output_interval=100.0
    )
    assert run.stats.steps == steps and run.stats.factorisations == 1
    span = 850.0 - 20.0
    assert np.abs(run.final_state - expected).max() <= 1e-12 * span
    if fixed:
        recorded = run.heat_flow["held"]
        assert recorded.size == steps + 1  # every step and t = 0
        scale = np.abs(reactions).max()
        assert np.abs(recorded[1:] - reactions).max() <= 1e-10 * scale


@pytest.mark.parametrize("threads", [1, 2, 3, 7])
def test_row_block_products_match_scipy(threads):
    """E·x and c + E·x on row blocks against scipy's own product: the same sums row by row,
    so round-off alike (1e-14 relative); a block left out or taken twice would be off by a
    whole row. The matrix has empty rows and a long dense row (blocks of unequal rows)."""
    rng = np.random.default_rng(11)
    matrix = sp.random(300, 200, density=0.05, random_state=rng, format="lil")
    matrix[7, :] = rng.random(200)
    matrix[40:60, :] = 0.0
    matrix = matrix.tocsr()
    x, c = rng.random(200), rng.random(300)
    product = fem.products.RowBlockProduct(matrix, threads=threads)
    assert product.cuts[0] == 0 and product.cuts[-1] == 300
    assert np.all(np.diff(product.cuts) > 0)
    reference = matrix @ x
    assert np.abs(product(x) - reference).max() <= 1e-14 * np.abs(reference).max()
    into = c.copy()
    summed = product.add_to(x, into)
    assert summed is into
    assert np.abs(summed - (c + reference)).max() <= 1e-14 * np.abs(c + reference).max()


def test_a_local_numbering_brings_neighbours_together():
    """A 60 × 60 grid's five-point graph numbered at random: reverse Cuthill–McKee must give a
    permutation whose neighbours are on average far closer (a band of about one grid line,
    against a third of the nodes apart at random; George & Liu, "Computer Solution of Large
    Sparse Positive Definite Systems", 1981, ch. 4, from memory); an already banded numbering
    is left alone."""
    k = 60
    line = sp.diags([-1.0, 2.0, -1.0], [-1, 0, 1], shape=(k, k))
    grid = (sp.kron(line, sp.eye(k)) + sp.kron(sp.eye(k), line)).tocsr()
    shuffle = np.random.default_rng(4).permutation(k * k)
    shuffled = grid[shuffle][:, shuffle].tocsr()
    with pytest.MonkeyPatch.context() as patch:
        patch.setattr(fem.products, "LOCAL_NUMBERING_FROM", 0)
        order = fem.products.local_numbering(shuffled)
        assert order is not None and np.array_equal(np.sort(order), np.arange(k * k))
        rank = np.empty(k * k, dtype=int)
        rank[order] = np.arange(k * k)
        coo = shuffled.tocoo()
        assert np.abs(rank[coo.row] - rank[coo.col]).mean() <= 2 * k
        assert np.abs(coo.row - coo.col).mean() >= k * k / 4
        assert fem.products.local_numbering(grid) is None  # banded already: |i − j| ≤ k
    assert fem.products.local_numbering(shuffled) is None  # small: the mesh's numbering


def test_steps_keep_the_mesh_numbering_with_fixed_temperatures_or_superlu(monkeypatch):
    """The steps' own numbering is for Cholesky runs where every unknown is free (the fixed
    temperatures' coupling and reactions are kept in the mesh's numbering)."""
    number_every_run(monkeypatch)
    held = LinearAlgebra(assemble(slab_model(fixed=True)), Cost(), "superlu")
    assert held.numbering is None
    free = assemble(slab_model(fixed=False))
    assert LinearAlgebra(free, Cost(), "superlu").numbering is None
    if cholesky_available():
        order = LinearAlgebra(free, Cost(), "cholesky").numbering
        assert order is not None and np.array_equal(np.sort(order), np.arange(free.size))
        held = LinearAlgebra(assemble(slab_model(fixed=True)), Cost(), "cholesky")
        assert held.numbering is None


@needs_cholesky
@pytest.mark.parametrize("method", ["crank-nicolson", "bdf2"])
def test_numbered_steps_with_changing_loads_agree_with_superlu(monkeypatch, method):
    """Loads that change every step (an ambient ramped up and down) and BDF2's history, in
    the steps' own numbering with Cholesky, against SuperLU in the mesh's numbering (a
    different factorisation and order of operations: 1e-10 of the span, as above)."""
    section = Rectangle(
        0.04, 0.02, edge_names={"left": "a", "right": "b", "top": "c", "bottom": "c"}
    ).mesh(size=0.0015)
    ramp = PiecewiseLinear([0.0, 200.0, 400.0], [20.0, 300.0, 100.0])
    model = ThermalModel(
        section,
        STEEL,
        boundaries={"a": Convection(800.0, ramp), "b": Convection(500.0, 60.0), "c": Insulated()},
        initial_temperature=850.0,
    )
    runs = {}
    for solver in ("superlu", "cholesky"):
        monkeypatch.setattr(fem.linalg, "SYMMETRIC_SOLVER", solver)
        if solver == "cholesky":
            number_every_run(monkeypatch)
        runs[solver] = solve(
            model, end_time=400.0, time_step=10.0, output_interval=100.0, method=method
        )
    a, b = runs["superlu"], runs["cholesky"]
    span = 850.0 - 20.0
    assert np.abs(a.final_state - b.final_state).max() <= 1e-10 * span
    assert np.abs(a.mean - b.mean).max() <= 1e-10 * span
    flow = np.abs(a.heat_flow["a"]).max()
    assert np.abs(a.heat_flow["a"] - b.heat_flow["a"]).max() <= 1e-10 * flow
