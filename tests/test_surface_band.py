"""The band of surface temperatures a run passed through on an edge group, against the exact
series of a plane wall cooled on both faces (Incropera et al., *Fundamentals of Heat and Mass
Transfer*, 6th ed., §5.5.1, from memory; summed with ``tests/exact_series.py``)."""

from __future__ import annotations

import numpy as np
import pytest
from exact_series import plane_wall_profile

from advisor.analysis.surface_band import surface_band
from advisor.errors import AdvisorError
from fem import Convection, Insulated, Material, ThermalModel, solve
from geometries import Rectangle

HALF, K, RHO, C, H, START, AMBIENT = 0.02, 20.0, 8000.0, 500.0, 1000.0, 800.0, 50.0


@pytest.fixture(scope="module")
def wall():
    """A strip 2L wide cooled on its left and right edges (Bi = hL/k = 1), insulated above and
    below: a plane wall."""
    bath = Convection(heat_transfer_coefficient=H, ambient=AMBIENT)
    model = ThermalModel(
        Rectangle(2 * HALF, 0.004).mesh(size=0.001),
        Material(K, RHO, C),
        boundaries={"left": bath, "right": bath, "top": Insulated(), "bottom": Insulated()},
        initial_temperature=START,
    )
    return solve(model, end_time=400.0, time_step=1.0, output_interval=50.0)


def test_the_band_follows_the_exact_surface_temperature(wall):
    """P1 on 1 mm (L/20) and Crank–Nicolson at 1 s: the surface temperature is within 0.05 % of
    the initial drive of the series (measured 0.007 %); the top and bottom corners of the
    face are the same point of the wall, so lowest and highest agree too."""
    band = surface_band(wall, "right")
    np.testing.assert_allclose(band.times, np.arange(0.0, 401.0, 50.0))
    alpha = K / (RHO * C)
    exact = np.array(
        [
            AMBIENT
            + (START - AMBIENT)
            * plane_wall_profile(H * HALF / K, alpha * t / HALF**2, 1.0, terms=80)
            for t in band.times[1:]
        ]
    )
    drive = START - AMBIENT
    assert band.lowest[0] == band.highest[0] == START  # the initial field is the first output
    for values in (band.lowest[1:], band.highest[1:]):
        assert np.max(np.abs(values - exact)) < 5e-4 * drive
    assert band.high == START and band.low == pytest.approx(exact[-1], abs=5e-4 * drive)


def test_an_unknown_group_is_named_with_the_valid_ones(wall):
    with pytest.raises(AdvisorError, match="'outside'.*'bottom', 'left', 'right', 'top'"):
        surface_band(wall, "outside")
