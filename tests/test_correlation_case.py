"""A flow correlation from a case file: the characteristic length derived from the section
(a round group's diameter, a plate's height), the surface range from the initial and fluid
temperatures, messages that name the key, and the one-line error without the extra.

References are closed-form geometry: a circle of radius R meshed with straight edges has a
bounding box of 2R across (nodes lie on the circle), within the mesh's own node spacing; a
rectangle's side is exact."""

from __future__ import annotations

import sys

import pytest

from advisor.casefile import CaseError
from advisor.casefile.case import case_from_toml
from fem import CorrelationConvection, ModelError

pytest.importorskip("ht", reason="the correlations extra (ht, CoolProp) is not installed")
pytest.importorskip("CoolProp", reason="the correlations extra is not installed")

ROUND = """
title = "round bar in still air"
[section]
mesh_size = "5 mm"
[[section.shape]]
kind = "circle"
radius = "40 mm"
edge = "outside"
[material]
conductivity = "45 W/(m*K)"
density = "7850 kg/m^3"
specific_heat = "480 J/(kg*K)"
[boundaries.outside.correlation]
kind = "{kind}"
fluid = "air"
fluid_temperature = "20 degC"
{extra}
[initial]
temperature = "300 degC"
[run]
end_time = "10 min"
"""

PLATE = """
title = "a plate standing in still air"
[section]
mesh_size = "5 mm"
[[section.shape]]
kind = "rectangle"
width = "20 mm"
height = "250 mm"
edges = { left = "face", right = "face", top = "ends", bottom = "ends" }
[material]
conductivity = "45 W/(m*K)"
density = "7850 kg/m^3"
specific_heat = "480 J/(kg*K)"
[boundaries.face.correlation]
kind = "natural-vertical-plate"
fluid_temperature = "25 degC"
[boundaries.ends]
insulated = true
[initial]
temperature = "180 degC"
[run]
end_time = "10 min"
"""


def bound_condition(model, group: str) -> CorrelationConvection:
    (condition,) = [c for c in model.boundaries[group] if isinstance(c, CorrelationConvection)]
    return condition


def test_round_group_gives_the_diameter():
    model = case_from_toml(ROUND.format(kind="natural-horizontal-cylinder", extra="")).model()
    condition = bound_condition(model, "outside")
    assert condition.length == pytest.approx(0.08, rel=0.01)  # 2R within the node spacing
    assert "derived" in condition.length_origin
    low, high = condition.surface_range
    assert low == pytest.approx(20.0) and 300.0 < high < 330.0  # fluid to beyond the start
    assert "derived" in condition.describe(600.0)


def test_plate_height_and_width_from_the_group():
    """Two vertical faces 250 mm high form the group 'face': the plate's height is 250 mm (not
    their summed length); the 20 mm ends (one group, taken here as faces looking up): the
    area/perimeter of a long strip, half the width, 10 mm."""
    text = PLATE.replace(
        "[boundaries.ends]\ninsulated = true",
        '[boundaries.ends.correlation]\nkind = "natural-plate-facing-up"\n'
        'fluid_temperature = "25 degC"',
    )
    model = case_from_toml(text).model()
    assert bound_condition(model, "face").length == pytest.approx(0.25, rel=1e-9)
    assert bound_condition(model, "ends").length == pytest.approx(0.01, rel=1e-9)
    assert "height" in bound_condition(model, "face").length_origin


def test_given_length_is_kept():
    case = case_from_toml(
        ROUND.format(kind="forced-cylinder", extra='velocity = "3 m/s"\nlength = "70 mm"')
    )
    condition = bound_condition(case.model(), "outside")
    assert condition.length == pytest.approx(0.07)
    assert condition.length_origin == ""


@pytest.mark.parametrize(
    "kind, extra, key, words",
    [
        ("natural-cylinder", "", "kind", "known:"),
        ("forced-cylinder", "", "velocity", "needs a velocity"),
        ("forced-cylinder", 'velocity = "3 kg"', "velocity", "a speed such as"),
        ("jet-round-nozzle", 'velocity = "30 m/s"', "nozzle", "needs a nozzle"),
        ("natural-horizontal-cylinder", 'velocity = "3 m/s"', "velocity", "still fluid"),
    ],
)
def test_bad_keys_are_named(kind, extra, key, words):
    with pytest.raises(CaseError) as caught:
        case_from_toml(ROUND.format(kind=kind, extra=extra))
    message = str(caught.value)
    assert f"boundaries.outside.correlation.{key}" in message and words in message


def test_boiling_water_is_refused_with_the_group():
    text = ROUND.format(kind="natural-horizontal-cylinder", extra="").replace(
        'fluid = "air"', 'fluid = "water"'
    )
    with pytest.raises(ModelError, match="edge group 'outside'.*boiling curve"):
        case_from_toml(text).model()


def test_without_the_extra_the_error_names_it(monkeypatch):
    monkeypatch.setitem(sys.modules, "CoolProp", None)  # import CoolProp now fails
    monkeypatch.setitem(sys.modules, "CoolProp.CoolProp", None)
    with pytest.raises(ModelError, match=r"pip install soakwise\[correlations\]"):
        CorrelationConvection(
            "natural-horizontal-cylinder", "air", 20.0, length=0.1, surface_range=(20, 90)
        )


def test_report_table_follows_the_band_passed_through():
    """The report's rows run from the hottest to the coolest surface temperature of the run,
    and h there is the correlation's (the table's value, read here from the condition's own
    table by numpy's interpolation)."""
    import numpy as np

    from advisor.writers.report_correlations import correlation_blocks
    from fem import solve

    case = case_from_toml(ROUND.format(kind="natural-horizontal-cylinder", extra=""))
    solution = solve(case.model(), 120.0, output_times=[60.0, 120.0])
    (table,) = correlation_blocks(solution)
    temperatures = [float(row[1].split()[0]) for row in table.rows]
    coefficients = [float(row[4].split()[0]) for row in table.rows]
    assert temperatures[0] == pytest.approx(300.0, abs=0.01)  # the initial surface
    assert temperatures[-1] < temperatures[0]
    condition = bound_condition(solution.model, "outside")
    expected = np.interp(temperatures, condition.table.surface_temperatures,
                         condition.table.coefficients)  # fmt: skip
    assert np.allclose(coefficients, expected, rtol=2e-3)  # 3 significant digits shown
    assert all(row[2].startswith("Ra = ") for row in table.rows)


def test_warm_part_in_water_stays_single_phase():
    """A part starting at 90 degC in water at 20 degC: the table stops at water's boiling point
    at 1 atm (99.97 degC, IAPWS-95 through CoolProp) rather than widening past it."""
    text = (
        ROUND.format(kind="forced-cylinder", extra='velocity = "0.2 m/s"')
        .replace('fluid = "air"', 'fluid = "water"')
        .replace('temperature = "300 degC"', 'temperature = "90 degC"')
    )
    condition = bound_condition(case_from_toml(text).model(), "outside")
    low, high = condition.surface_range
    assert low == pytest.approx(20.0) and 90.0 < high <= 99.98
