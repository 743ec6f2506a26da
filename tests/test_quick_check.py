"""The quick check (no field solve) against the field it stands in for.

The reference is the field itself, solved here at a fine step: the quick check's modal
estimate of the slowest point's time to target uses only the slowest eigenpair, so it is
accurate once the faster modes have died away — within 1 % when the target is reached late
(here θ/θ0 ≈ 0.18). The classical lumped time is the closed form t = τ·ln(θ0/θ) (Incropera
et al., 6th ed., eq. 5.5, from memory), computed here from the inputs.
"""

import math

import pytest

from advisor import assess, quick_check
from fem import Convection, Insulated, Material, ThermalModel, solve
from geometries import Rectangle

STEEL = Material(40.0, 7850.0, 520.0)  # invented round values
OIL = Convection(heat_transfer_coefficient=400.0, ambient=60.0)


@pytest.fixture(scope="module")
def quarter_bar():
    section = Rectangle(0.03, 0.02, edge_names={"left": "symmetry", "bottom": "symmetry"})
    return ThermalModel(
        section.mesh(size=0.001),
        STEEL,
        {"symmetry": Insulated("symmetry"), "right": OIL, "top": OIL},
        850.0,
    )


def test_quick_check_times_against_the_field(quarter_bar):
    check = quick_check(quarter_bar, target=200.0)
    tau = STEEL.density * STEEL.specific_heat * (0.03 * 0.02) / (400.0 * 0.05)
    assert check.time_to_target["classical"] == pytest.approx(
        tau * math.log(790.0 / 140.0), rel=1e-9
    )
    field = assess(solve(quarter_bar, 600.0, time_step=0.5), target=200.0)
    assert check.time_to_target["slowest (modal estimate)"] == pytest.approx(
        field.time_to_target["slowest"], rel=0.01
    )
    # Bi = 0.12: the lumped time is early, and the quick check says so before any solve.
    assert check.time_to_target["classical"] < field.time_to_target["slowest"]
    assert "too early" in check.expected_direction


def test_quick_check_refuses_a_target_beyond_the_ambient(quarter_bar):
    with pytest.raises(ValueError, match="strictly between"):
        quick_check(quarter_bar, target=40.0)
