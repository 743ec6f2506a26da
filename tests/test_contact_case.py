"""Contact resistance from a case file: ``[interfaces.<name>]`` read, solved and reported (the
report's line, summary.json, the VTK files of the cut mesh), and its mistakes refused at their
key path and line.

The run goes to steady state (exponential steps, exact in time for a linear model), where the
series resistances of a plane wall give the jump exactly: q = ΔT / (1/h + L1/k1 + R_c +
L2/k2 + 1/h) and jump = q·R_c (Incropera, DeWitt, Bergman & Lavine, Fundamentals of Heat and
Mass Transfer, 6th ed., §3.1.4, from memory).
"""

from __future__ import annotations

import json
import pickle
from pathlib import Path

import numpy as np
import pytest

from advisor.casefile.case import CaseError, case_from_toml
from advisor.pipeline import run_case, write_results
from fem.interface_mesh import SplitSectionMesh

CASE = """\
title = "Two bonded layers"

[section]
mesh_size = "1 mm"

[[section.shape]]
kind = "rectangle"
width = "10 mm"
height = "2 mm"
edges = { left = "hot", top = "sides", bottom = "sides", right = "joint" }
region = "layer_a"

[[section.shape]]
kind = "rectangle"
width = "20 mm"
height = "2 mm"
corner = ["10 mm", "0 mm"]
edges = { left = "joint", top = "sides", bottom = "sides", right = "cold" }
region = "layer_b"

[[section.shape]]
kind = "rectangle"
width = "5 mm"
height = "2 mm"
corner = ["40 mm", "0 mm"]
edges = { left = "cold", top = "cold", bottom = "cold", right = "cold" }
region = "apart"

[materials.layer_a]
conductivity = "10 W/(m*K)"
density = "2000 kg/m^3"
specific_heat = "900 J/(kg*K)"

[materials.layer_b]
conductivity = "2 W/(m*K)"
density = "1500 kg/m^3"
specific_heat = "1200 J/(kg*K)"

[materials.apart]
conductivity = "2 W/(m*K)"
density = "1500 kg/m^3"
specific_heat = "1200 J/(kg*K)"

[interfaces.bond]
regions = ["layer_a", "layer_b"]
resistance = "2e-3 m^2*K/W"

[boundaries.hot]
convection = { coefficient = "100 W/(m^2*K)", ambient = "100 degC" }

[boundaries.cold]
convection = { coefficient = "50 W/(m^2*K)", ambient = "0 degC" }

[boundaries.sides]
insulated = true

[initial]
temperature = "0 degC"

[probes]
on_bond = ["10 mm", "1 mm"]

[run]
end_time = "5 h"
method = "exponential"

[advisor]
target = "10 degC"
quantity = "mean"
"""

K1, K2, H_HOT, H_COLD, L1, L2, R = 10.0, 2.0, 100.0, 50.0, 0.01, 0.02, 2e-3


@pytest.fixture(scope="module")
def written(tmp_path_factory):
    folder = tmp_path_factory.mktemp("contact") / "results"
    results = run_case(case_from_toml(CASE, "bond.toml"))
    write_results(results, folder, vtk=True, report=True, animation=False)
    return results, folder


def test_the_summary_and_the_report_give_the_largest_jump(written):
    results, folder = written
    q = 100.0 / (1 / H_HOT + L1 / K1 + R + L2 / K2 + 1 / H_COLD)
    summary = json.loads((folder / "summary.json").read_text())
    bond = summary["interfaces"]["bond"]
    assert bond["regions"] == ["layer_a", "layer_b"]
    assert bond["resistance_m2K_per_W"] == pytest.approx(R)
    solution = results.assessment.solution
    # at the end of the run (steady) the jump is q·R_c and the flow q times the height
    assert solution.interface_jump["bond"][-1] == pytest.approx(q * R, rel=1e-6)
    assert solution.interface_heat_flow["bond"][-1] == pytest.approx(q * 0.002, rel=1e-6)
    # on the way there it overshoots (layer_b is still cold): the largest, and when
    at = int(np.argmax(np.abs(solution.interface_jump["bond"])))
    assert bond["largest_jump_K"] == solution.interface_jump["bond"][at] > q * R
    assert bond["largest_jump_time_s"] == solution.times[at] < 5 * 3600.0
    report = (folder / "report.md").read_text()
    line = next(text for text in report.splitlines() if text.startswith("| bond"))
    assert f"+{bond['largest_jump_K']:.4g} K" in line and "layer\\_a \\| layer\\_b" in line
    assert "Probe 'on\\_bond' lies on interface 'bond' and reads the 'layer\\_a' side" in report
    # mean h ≈ 55.6 W/(m²·K) over the exposed edges: h·R ≈ 0.11, at the common-practice limit
    biot = results.assessment.biot[0]
    contact = biot.heat_transfer_coefficient * R
    assert contact >= 0.1
    assert f"At 'bond', h·R = {contact:.3g}: " in report
    assert "reaches the common-practice limit of 0.1" in report


def test_the_vtk_files_show_the_jump_on_the_cut_mesh(written):
    meshio = pytest.importorskip("meshio")
    results, folder = written
    last = sorted((folder / "fields").glob("*.vtu"))[-1]
    grid = meshio.read(last)
    section = results.assessment.solution.model.section
    assert len(grid.points) == section.mesh.nvertices  # the copies are written too
    temperature = grid.point_data["temperature"]
    at_joint = np.flatnonzero(np.isclose(grid.points[:, 0], L1, atol=1e-12))
    # two points at each place on the joint, one per side; the jump between them
    places = np.round(grid.points[at_joint, 1], 9)
    q = 100.0 / (1 / H_HOT + L1 / K1 + R + L2 / K2 + 1 / H_COLD)
    for place in np.unique(places):
        pair = temperature[at_joint[places == place]]
        assert len(pair) == 2
        assert abs(pair[0] - pair[1]) == pytest.approx(q * R, rel=1e-5)


def mistaken(old: str, new: str) -> str:
    assert old in CASE
    return CASE.replace(old, new)


@pytest.mark.parametrize(
    ("text", "key_path", "phrase", "line"),
    [
        (
            mistaken('["layer_a", "layer_b"]', '["layer_a", "layer_c"]'),
            "interfaces.bond.regions",
            "did you mean 'layer_b'",
            45,
        ),
        (
            mistaken('["layer_a", "layer_b"]', '["layer_a", "apart"]'),
            "interfaces.bond.regions",
            "do not touch",
            45,
        ),
        (
            mistaken('["layer_a", "layer_b"]', '["layer_a", "layer_a"]'),
            "interfaces.bond.regions",
            "two different regions",
            45,
        ),
        (
            mistaken('["layer_a", "layer_b"]', '"layer_a"'),
            "interfaces.bond.regions",
            "two region names",
            45,
        ),
        (
            mistaken('resistance = "2e-3', 'conductance = "500 W/(m^2*K)"\nresistance = "2e-3'),
            "interfaces.bond.resistance",
            "not both",
            47,
        ),
        (
            mistaken('resistance = "2e-3 m^2*K/W"', ""),
            "interfaces.bond.conductance",
            "is missing",
            None,
        ),
        (
            mistaken('resistance = "2e-3 m^2*K/W"', 'resistance = "2e-3 W/m^2"'),
            "interfaces.bond.resistance",
            "a contact resistance such as",
            46,
        ),
        (
            mistaken('resistance = "2e-3 m^2*K/W"', 'conductance = "-5 W/(m^2*K)"'),
            "interfaces.bond.conductance",
            "> 0",
            46,
        ),
        (
            mistaken('resistance = "2e-3 m^2*K/W"', 'resistence = "2e-3 m^2*K/W"'),
            "interfaces.bond.resistence",
            "did you mean 'resistance'",
            46,
        ),
        (
            mistaken(
                "[boundaries.hot]",
                '[interfaces.again]\nregions = ["layer_b", "layer_a"]\nconductance = 5.0\n\n'
                "[boundaries.hot]",
            ),
            "interfaces.again.regions",
            "already joins",
            49,
        ),
    ],
    ids=[
        "unknown-region",
        "not-touching",
        "same-region-twice",
        "one-name",
        "both-values",
        "no-value",
        "wrong-unit",
        "negative",
        "misspelt-key",
        "pair-twice",
    ],
)
def test_mistakes_name_the_key_path_and_line(text, key_path, phrase, line):
    with pytest.raises(CaseError) as caught:
        case_from_toml(text, Path("bond.toml"))
    message = str(caught.value)
    where = "bond.toml" + (f", line {line}" if line else "")
    assert message.startswith(f"{where}: {key_path}: "), message
    assert phrase in message, message


def test_results_with_interfaces_pickle_whole(written):
    results, _ = written
    again = pickle.loads(pickle.dumps(results))
    solution = again.assessment.solution
    assert isinstance(solution.model.section, SplitSectionMesh)
    assert np.array_equal(
        solution.interface_jump["bond"], results.assessment.solution.interface_jump["bond"]
    )


def test_an_override_changes_the_resistance():
    resistance = 5e-4  # m²·K/W
    case = case_from_toml(
        CASE, "bond.toml", {"interfaces.bond.resistance": f"{resistance} m^2*K/W"}
    )
    assert case.interfaces["bond"].resistance == pytest.approx(resistance)
    solution = run_case(case).assessment.solution
    q = 100.0 / (1 / H_HOT + L1 / K1 + resistance + L2 / K2 + 1 / H_COLD)
    assert solution.interface_jump["bond"][-1] == pytest.approx(q * resistance, rel=1e-6)
