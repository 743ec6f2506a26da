"""The benchmark's other tools solve the same plunge as soakwise.

Reference: the square bar's temperature is the product of two plane-wall series (Incropera,
DeWitt, Bergman & Lavine, Fundamentals of Heat and Mass Transfer, 6th ed., §5.8, eq. 5.64;
Carslaw & Jaeger, Conduction of Heat in Solids, 2nd ed., §3.10; from memory), summed here by
``tests/exact_series.py`` (its own roots and tail bound), not by the benchmark's own series.

Tolerances: on 1k nodes the spatial error at the centre is below 0.1 % of the drop; the time
error of Crank–Nicolson falls as Δt² and that of FiPy's backward Euler as Δt. Measured with
200 steps to the 99 % time: soakwise 0.31 %, the scikit-fem script 0.10 %, FiPy 0.54 %;
the bounds below are about twice those. Halving the step cut the script's error 3.5×
(second order: 4×, less the spatial part) and FiPy's 1.65× (first order: 2×).
"""

from __future__ import annotations

import numpy as np
import pytest
from exact_series import plane_wall_profile

from benchmarks import models, peers
from benchmarks.cases import plunge_end_time


@pytest.fixture(scope="module")
def section():
    return models.mesh("square", models.HALF_SIDE / 20)


def test_the_exact_centre_agrees_with_the_reference_series():
    times = np.array([300.0, 1500.0, 3000.0])
    drop = models.INITIAL - models.AMBIENT
    reference = [
        models.AMBIENT
        + drop
        * float(plane_wall_profile(models.BIOT, t / models.DIFFUSION_TIME, 0.0, terms=200)) ** 2
        for t in times
    ]
    # both series converge geometrically at these Fourier numbers: 1e-6 K is round-off
    assert np.abs(peers.centre_exact(times) - reference).max() < 1e-6


def test_soakwise_and_the_scikit_fem_script_solve_the_plunge(section):
    end = plunge_end_time()
    ours = peers.run_soakwise(section, end, 200)
    script = peers.run_skfem_script(section, end, 200)
    assert ours["error"] < 0.006
    assert script["error"] < 0.002
    coarse = peers.run_skfem_script(section, end, 100)
    assert coarse["error"] / script["error"] > 2.5  # second order in time (4x less space)


def test_fipy_solves_the_plunge(section):
    pytest.importorskip("fipy", reason="FiPy is in the optional peers extra, not in test")
    end = plunge_end_time()
    cells = section.mesh.p.shape[1]
    fine = peers.run_fipy(cells, end, 200)
    coarse = peers.run_fipy(cells, end, 100)
    assert fine["error"] < 0.011
    assert 1.4 < coarse["error"] / fine["error"] < 2.2  # first order in time
