"""Round trips of the fit: readings made by the solver from a known coefficient (constant,
against time, against surface temperature), Gaussian noise of a stated size added here with a
fixed seed, fitted back within the confidence interval the fit reports; and the interval's
width growing in proportion to the noise.

References: for a model linear in its parameters (nearly so near the optimum) with independent
noise of standard deviation σ, the estimate's covariance is σ²(JᵀJ)⁻¹, so its standard error
scales with σ, and the interval ± t·s.e. holds the true value with 95 % probability (Beck and
Arnold, Parameter Estimation in Engineering and Science, Wiley 1977, ch. 6, from memory). The
readings are made on the same mesh and time step as the fit, so the noise is the only error
and the check is of the statistics, not of the discretisation (which test_fit_lumped.py
covers against the exact series). With a fixed seed each check is deterministic; at 95 % one
seed in twenty would put a value outside its interval.

Every case is small (a quarter of a 40 mm square bar on a 4–5 mm mesh, 100 steps), so each
fit takes about a second or a few.
"""

import dataclasses
from pathlib import Path

import numpy as np
import pytest

from advisor.fitting.estimate import fit
from advisor.fitting.measured import read_measured
from advisor.fitting.parameters import build_parameters, parse_request
from advisor.fitting.problem import FitProblem
from fem import (
    Convection,
    Insulated,
    Material,
    PiecewiseLinear,
    SurfaceCurve,
    SurfaceTemperatureConvection,
    ThermalModel,
    solve,
)
from geometries import Rectangle

END, STEP, LOG = 600.0, 10.0, 10.0  # s: run, solver step, logging interval
STEEL = Material(40.0, 7850.0, 500.0)
AMBIENT = 20.0


def bar(size: float = 0.005) -> ThermalModel:
    section = Rectangle(
        0.02,
        0.02,
        edge_names={"left": "cut", "bottom": "cut", "right": "air", "top": "air"},
    ).mesh(size=size)
    return ThermalModel(
        section,
        STEEL,
        {"cut": Insulated("symmetry"), "air": Convection(100.0, AMBIENT)},
        800.0,
        probes={"core": (0.0, 0.0), "skin": (0.018, 0.0)},
    )


def readings(model, condition, noise: float, tmp_path: Path, seed: int = 7) -> Path:
    """A measured file made by the solver with ``condition`` on "air", plus noise."""
    conditions = condition if isinstance(condition, tuple) else (condition,)
    truth = dataclasses.replace(model, boundaries={**model.boundaries, "air": conditions})
    solution = solve(truth, END, time_step=STEP, output_times=(END,))
    times = np.arange(LOG, END + 1, LOG)
    draws = np.random.default_rng(seed).standard_normal((times.size, 2))
    columns = [
        np.interp(times, solution.times, solution.probes[name]) + noise * draws[:, i]
        for i, name in enumerate(("core", "skin"))
    ]
    path = tmp_path / f"measured-{noise:g}.csv"
    rows = "".join(f"{t:g},{a:.17g},{b:.17g}\n" for t, a, b in zip(times, *columns, strict=True))
    path.write_text("time [s], core [degC], skin [degC]\n" + rows)
    return path


def fitted(model, request: str, path: Path, noise: float):
    measured = read_measured(path, model.probes)
    data = measured.stacked()
    parameters = build_parameters(
        [parse_request(request)],
        dict(model.boundaries),
        end_time=END,
        temperature_range=(float(data.min()), 800.0),
    )
    problem = FitProblem(model, parameters, measured, time_step=STEP)
    return fit(problem, uncertainty=noise), parameters


def test_constant_coefficient_round_trip_over_seeds(tmp_path):
    # Ten seeds: a 95 % interval holds the truth at least 8 times in 10 with probability
    # 0.988 (binomial), so the check fails by chance about once in a hundred runs of it with
    # new seeds; with these fixed seeds it is deterministic.
    model, true_h, noise = bar(), 400.0, 0.5
    held, scatter = 0, []
    for seed in range(10):
        path = readings(model, Convection(true_h, AMBIENT), noise, tmp_path, seed=seed)
        result, _ = fitted(model, "h:air", path, noise)
        low, high = result.band[0]
        held += bool(low <= true_h <= high)
        scatter.append(result.scatter)
        assert result.verdict.rating == "identified"
    assert held >= 8, held
    # the residual scatter estimates the noise (10 x 120 readings: within 5 %)
    assert np.mean(scatter) == pytest.approx(noise, rel=0.05)


def test_interval_width_scales_with_the_noise(tmp_path):
    # The same draws scaled by 4: the standard error scales by 4 (s·(JᵀJ)^-1/2, J nearly fixed).
    model, true_h = bar(), 400.0
    results = {}
    for noise in (0.25, 1.0):
        path = readings(model, Convection(true_h, AMBIENT), noise, tmp_path)
        results[noise], _ = fitted(model, "h:air", path, noise)
    ratio = results[1.0].standard_errors[0] / results[0.25].standard_errors[0]
    assert ratio == pytest.approx(4.0, rel=0.2)
    width = np.diff(results[1.0].band[0])[0] / np.diff(results[0.25].band[0])[0]
    assert width == pytest.approx(4.0, rel=0.2)


def within_three_errors(result, expected) -> None:
    """Each node within three standard errors (99.7 % for a Gaussian estimate): the nodes of
    a regularised table move together, so a per-node 95 % check would fail as often as one
    single value does."""
    z = np.abs(result.values - expected) / result.standard_errors
    assert np.all(z < 3.0), (result.values, expected, result.standard_errors)
    inside = (result.band[:, 0] <= expected) & (expected <= result.band[:, 1])
    assert inside.any(), (result.values, result.band)


def test_coefficient_against_time_round_trip(tmp_path):
    # A straight line in time: the curvature penalty costs it nothing, so the regularised
    # estimate carries no bias and every node's interval must hold the truth.
    model, noise = bar(), 0.5
    truth = PiecewiseLinear((0.0, END), (600.0, 250.0))
    path = readings(model, Convection(truth, AMBIENT), noise, tmp_path)
    result, parameters = fitted(model, "h(t):air:nodes=4", path, noise)
    nodes = parameters.blocks[0].knots
    expected = np.interp(nodes, (0.0, END), (600.0, 250.0))
    within_three_errors(result, expected)
    assert result.regularisation > 0
    assert "discrepancy" in result.regularisation_rule
    # the discrepancy principle leaves a residual of the stated size (within 20 %)
    assert result.rms_residual == pytest.approx(noise, rel=0.2)


def test_coefficient_against_surface_temperature_round_trip(tmp_path):
    model, noise = bar(), 0.5
    # h rising linearly with surface temperature from 150 at 20 °C to 550 W/(m²·K) at 800 °C
    truth = SurfaceCurve((20.0, 800.0), (150.0, 550.0))
    path = readings(model, SurfaceTemperatureConvection(truth, AMBIENT), noise, tmp_path)
    result, parameters = fitted(model, "h(T):air:nodes=4", path, noise)
    nodes = parameters.blocks[0].knots
    expected = np.interp(nodes, (20.0, 800.0), (150.0, 550.0))
    # Nodes below the lowest surface temperature the run reaches are not seen by the data;
    # the check covers the nodes inside the range the surface passed through.
    assert nodes[0] >= 20.0
    within_three_errors(result, expected)


def test_emissivity_round_trip(tmp_path):
    # A hot bar cooling mostly by radiation (ε = 0.7) beside weak convection (h = 10, known).
    from fem import Radiation

    model, noise = bar(), 0.5
    base = dataclasses.replace(
        model,
        boundaries={
            **model.boundaries,
            "air": (Convection(10.0, AMBIENT), Radiation(0.5, AMBIENT)),
        },
    )
    path = readings(
        base, (Convection(10.0, AMBIENT), Radiation(0.7, AMBIENT)), noise, tmp_path, seed=3
    )
    result, _ = fitted(base, "emissivity:air", path, noise)
    assert abs(result.values[0] - 0.7) < 3.0 * result.standard_errors[0], result.values
    assert result.standard_errors[0] < 0.01
