"""Quench readings against the lumped exponential, computed here in closed form.

T(t) = T∞ + (T0 − T∞)·exp(−t/τ) (Incropera et al., *Fundamentals of Heat and Mass Transfer*,
6th ed., eq. 5.6, from memory) has the cooling rate −dT/dt = (T − T∞)/τ exactly at every
temperature, reaches T at t = τ·ln((T0 − T∞)/(T − T∞)) and passes from T1 to T2 in
τ·ln((T1 − T∞)/(T2 − T∞)).

Tolerances from the methods:
- the local quadratic fit's derivative error is T'''·Δ²·Σ w_j·(j − m)³/6 (Taylor's theorem,
  w the fit's derivative weights on an even grid, m the point's place in its window); for a
  centred window of 7 points that is 7/6·Δ²·|T'''|, so relative to the exact rate
  7/6·(Δ/τ)²·exp(3Δ/τ) at most (T''' varies by exp(3Δ/τ) across a window);
- a crossing interpolated linearly between two records is off by at most Δ²·|T''|/(8·|T'|) =
  Δ²/(8τ) for the exponential, so a difference of two by Δ²/(4τ).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from advisor.analysis.quench import (
    NEIGHBOURS,
    quench_outputs,
    rate_of_change,
    time_through_range,
)
from advisor.errors import AdvisorError

TAU, START, BATH = 40.0, 860.0, 60.0


def exponential(times):
    return BATH + (START - BATH) * np.exp(-np.asarray(times) / TAU)


def stencil_constants(width: int) -> np.ndarray:
    """|Σ_j w_j·(j − m)³| / 6 for each place m of a point in a window of ``width`` evenly
    spaced points, w the weights giving the fitted quadratic's slope at m."""
    j = np.arange(width, dtype=float)
    constants = []
    for m in range(width):
        design = np.stack([np.ones(width), j - m, (j - m) ** 2], axis=1)
        weights = np.linalg.pinv(design)[1]  # slope row of the least-squares solution
        constants.append(abs(weights @ (j - m) ** 3) / 6)
    return np.array(constants)


@pytest.mark.parametrize("points", [201, 801])
def test_cooling_rate_is_the_distance_to_the_bath_over_tau(points):
    times = np.linspace(0.0, 6 * TAU, points)
    step = times[1] - times[0]
    history = exponential(times)
    found = quench_outputs(times, {"slowest": history}, drive=START - BATH)
    curve = found.curves["slowest"]
    exact = (history - BATH) / TAU
    relative = np.abs(curve.rates / exact - 1)
    constants = stencil_constants(2 * NEIGHBOURS + 1)
    growth = math.exp((2 * NEIGHBOURS) * step / TAU)
    assert constants[NEIGHBOURS] == pytest.approx(7 / 6)
    inner = slice(NEIGHBOURS, -NEIGHBOURS)
    assert relative[inner].max() <= constants[NEIGHBOURS] * (step / TAU) ** 2 * growth
    ends = np.r_[relative[:NEIGHBOURS], relative[-NEIGHBOURS:][::-1]]
    allowed = np.r_[constants[:NEIGHBOURS], constants[::-1][:NEIGHBOURS]]
    assert np.all(ends <= allowed * (step / TAU) ** 2 * growth)
    # the largest cooling rate of an exponential is at the start, at T0
    assert curve.largest_rate_time == 0.0
    assert curve.largest_rate_temperature == START
    bound = constants[0] * (step / TAU) ** 2 * growth
    assert curve.largest_rate == pytest.approx((START - BATH) / TAU, rel=bound)


def test_times_to_and_through_a_range_match_the_logarithms():
    times = np.linspace(0.0, 6 * TAU, 481)
    step = times[1] - times[0]
    found = quench_outputs(
        times,
        {"slowest": exponential(times), "probe:core": exponential(times)},
        drive=START - BATH,
        times_to=(500.0, 300.0, 20.0),
        cooling_range=(800.0, 500.0),
    )
    assert set(found.curves) == {"slowest", "probe:core"} and found.cooling
    curve = found.curves["slowest"]
    for target in (500.0, 300.0):
        exact = TAU * math.log((START - BATH) / (target - BATH))
        assert abs(curve.times_to[target] - exact) <= step**2 / (8 * TAU)
    assert curve.times_to[20.0] is None  # below the bath: never reached
    exact = TAU * math.log((800.0 - BATH) / (500.0 - BATH))
    assert abs(curve.range_time - exact) <= step**2 / (4 * TAU)


def test_heating_rates_are_positive_and_ranges_rise():
    times = np.linspace(0.0, 5 * TAU, 401)
    rising = 20.0 + 480.0 * (1 - np.exp(-times / TAU))
    found = quench_outputs(times, {"slowest": rising}, drive=-480.0, cooling_range=(100.0, 400.0))
    curve = found.curves["slowest"]
    assert not found.cooling
    assert np.all(curve.rates > 0)
    exact = TAU * math.log((500.0 - 100.0) / (500.0 - 400.0))
    assert abs(curve.range_time - exact) <= (times[1] ** 2) / (4 * TAU)
    with pytest.raises(AdvisorError, match="must rise"):
        quench_outputs(times, {"slowest": rising}, drive=-480.0, cooling_range=(400.0, 100.0))


def test_smoothing_passes_less_noise_than_a_central_difference():
    """On an even grid the 7-point quadratic slope has noise gain √(Σw²) = 1/√28·(1/Δ) against
    1/√2·(1/Δ) for a central difference: a ratio of 0.27. Seeded noise; we allow 0.4."""
    rng = np.random.default_rng(20261204)
    times = np.linspace(0.0, 6 * TAU, 2001)
    clean = exponential(times)
    noisy = clean + rng.normal(0.0, 0.05, times.size)
    exact = -(clean - BATH) / TAU
    smooth = rate_of_change(times, noisy) - exact
    central = np.gradient(noisy, times) - exact
    inner = slice(10, -10)
    ratio = np.sqrt(np.mean(smooth[inner] ** 2) / np.mean(central[inner] ** 2))
    assert ratio < 0.4


def test_uneven_steps_are_exact_for_a_quadratic():
    times = np.cumsum(np.r_[0.0, np.geomspace(0.01, 5.0, 60)])
    history = 700.0 - 3.0 * times + 0.02 * times**2
    assert np.allclose(rate_of_change(times, history), -3.0 + 0.04 * times, atol=1e-9)
    assert time_through_range(times, history, 1000.0, 500.0) is None
    with pytest.raises(AdvisorError, match="increase strictly"):
        rate_of_change([0.0, 1.0, 1.0], [1.0, 2.0, 3.0])
