"""Valid input that works: the two-node model's time to target solved rather than read off a
grid, and the smallest adaptive step set by the model's own time scale, not the run's length.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from advisor.analysis.lumped_fits import TwoNodeModel
from fem import Convection, Material, ThermalModel, solve
from fem.arguments import check_arguments
from fem.scales import surface_diffusion_time
from geometries import Rectangle


def core_excess(t, c1, c2, g, h):
    """The core's temperature above the ambient over the initial excess, θc(t)/θ0, of the
    two-node network C1·θc' = G(θs − θc), C2·θs' = G(θc − θs) − H·θs, both nodes at θ0 at
    t = 0. Derived here: θc = a1·e^(r1·t) + a2·e^(r2·t) with r1, r2 the roots of
    r² + (G/C1 + (G + H)/C2)·r + G·H/(C1·C2) = 0; θc(0) = θ0 and θc'(0) = 0 (the nodes start
    equal) give a1 = r2/(r2 − r1), a2 = −r1/(r2 − r1)."""
    b = g / c1 + (g + h) / c2
    c = g * h / (c1 * c2)
    root = math.sqrt(b * b - 4 * c)
    r1, r2 = (-b + root) / 2, (-b - root) / 2
    return (r2 * math.exp(r1 * t) - r1 * math.exp(r2 * t)) / (r2 - r1)


def bisect(f, low, high):
    """The root of f in [low, high] by plain bisection to the last bit (independent of scipy)."""
    for _ in range(200):
        middle = 0.5 * (low + high)
        if middle in (low, high):
            break
        if (f(low) > 0) == (f(middle) > 0):
            low = middle
        else:
            high = middle
    return 0.5 * (low + high)


@pytest.mark.parametrize(
    ("c1", "c2", "g", "h", "horizon"),
    [
        (0.6, 0.4, 150.0, 60.0, 600.0),  # a fast part: crossing within the first 0.75 s sample
        (3.0e5, 1.0e5, 400.0, 150.0, 7200.0),  # a slow one: crossing after many samples
    ],
)
def test_two_node_time_to_target_is_the_root_of_the_closed_form(c1, c2, g, h, horizon):
    initial, ambient, target = 850.0, 50.0, 200.0
    model = TwoNodeModel(c1, c2, g, h, ambient, initial)
    wanted = (target - ambient) / (initial - ambient)

    def f(t):
        return core_excess(t, c1, c2, g, h) - wanted

    high = 1.0
    while f(high) > 0:
        high *= 2
    reference = bisect(f, 0.0, high)
    found = model.time_to(target, horizon)
    # Brent's method to 1e-13 of the bracket against bisection to the last bit: both are the
    # root to round-off of the exponentials (~1e-15 relative).
    assert found == pytest.approx(reference, rel=1e-9)
    # the model's own states agree with the closed form (the same network)
    excess = (model.states([found])[0][0] - ambient) / (initial - ambient)
    assert excess == pytest.approx(core_excess(found, c1, c2, g, h), rel=1e-12)


def test_two_node_time_beyond_the_horizon_is_none():
    model = TwoNodeModel(3.0e5, 1.0e5, 400.0, 150.0, 50.0, 850.0)
    assert model.time_to(200.0, 10.0) is None
    assert model.time_to(200.0) is None


def test_the_smallest_step_follows_the_surface_diffusion_time_on_a_long_run():
    air = Convection(heat_transfer_coefficient=20.0, ambient=25.0)
    model = ThermalModel(
        Rectangle(0.02, 0.01).mesh(size=0.005),
        Material(200.0, 2700.0, 900.0),
        boundaries={side: air for side in ("left", "right", "top", "bottom")},
        initial_temperature=180.0,
    )
    diffusion = surface_diffusion_time(model)
    ten_years = 10 * 365.25 * 86400.0
    long = check_arguments(model, ten_years)
    assert long.min_step == pytest.approx(1e-6 * diffusion)
    assert long.min_step < 1e-9 * ten_years
    short = check_arguments(model, 60.0)  # a short run keeps 1e-9 of its length
    assert short.min_step == pytest.approx(1e-9 * 60.0)
    given = check_arguments(model, ten_years, min_step=2.0)
    assert given.min_step == 2.0


def test_a_ten_year_run_with_a_plunge_solves():
    # A 20 mm x 10 mm aluminium plate plunged into water for ten years: the first transient
    # lasts seconds; the floor of 1e-9 of the run (0.3 s) is not the floor any more.
    water = Convection(heat_transfer_coefficient=5000.0, ambient=20.0)
    model = ThermalModel(
        Rectangle(0.02, 0.01).mesh(size=0.005),
        Material(200.0, 2700.0, 900.0),
        boundaries={side: water for side in ("left", "right", "top", "bottom")},
        initial_temperature=500.0,
    )
    ten_years = 10 * 365.25 * 86400.0
    result = solve(model, ten_years, output_interval=ten_years / 4)
    assert result.stats.smallest_step < 1e-9 * ten_years
    # After ten years the plate is at the water's temperature, within the run's tolerance
    # (1e-4 of the 480 K span).
    assert np.max(np.abs(result.final_state - 20.0)) < 1e-4 * 480.0
