"""The quench-probe and freezing starters, at reduced size, through the whole pipeline: their
reports show the curve used with the surface temperatures passed through, the rate plot and
the freezing comparison, and summary.json carries the same figures as the Assessment.

The curve drawn is checked against the starter's own table, interpolated here with numpy
(h = q/(T_s − T∞) from the piecewise-linear heat flux); the band of surface temperatures is
checked against the stored fields read back directly.
"""

from __future__ import annotations

import json

import numpy as np
import pytest
from test_writers import parse_page

from advisor import write_results
from advisor.casefile.case import case_from_toml
from advisor.casefile.starters import starter_text
from advisor.pipeline import run_case
from advisor.writers.plots import PLOTS
from advisor.writers.process_plots import PROCESS_PLOTS, surface_curve_figure
from advisor.writers.report_content import HEADINGS

# The quench-probe starter's quenchant, as written in the file (°C, kW/m²), bath 40 °C.
TABLE_T = (40, 100, 120, 200, 300, 400, 500, 550, 650, 850, 900)
TABLE_Q = (0, 90, 300, 2500, 3500, 2500, 900, 450, 420, 500, 520)
BATH = 40.0


def reduced(scenario: str, *replacements: tuple[str, str]) -> str:
    text = starter_text(scenario)
    for old, new in replacements:
        assert old in text, old
        text = text.replace(old, new)
    return text


@pytest.fixture(scope="module")
def probe(tmp_path_factory):
    text = reduced(
        "quench-probe", ('mesh_size = "0.5 mm"', 'mesh_size = "1 mm"'), ('"30 s"', '"20 s"')
    )
    assessment = run_case(case_from_toml(text)).assessment
    out = tmp_path_factory.mktemp("probe") / "results"
    write_results(assessment, out, animation=False, vtk=False)
    return assessment, out


def test_the_starter_states_the_table_checked_here():
    text = starter_text("quench-probe")
    temperatures = ", ".join(f'"{t} degC"' for t in TABLE_T)
    fluxes = ", ".join(f'"{q} kW/m^2"' for q in TABLE_Q)
    assert text.count(f"surface_temperatures = [{temperatures}], values = [{fluxes}]") == 2


def test_the_quench_probe_report_shows_the_rates_and_the_curve_used(probe):
    assessment, out = probe
    page = parse_page(out / "report.html")
    wanted = [h for k, h in HEADINGS.items() if k != "freezing"]
    assert page.headings == wanted
    titles = [attrs["alt"] for tag, attrs in page.tags if tag == "img"]
    assert len(titles) == len(PLOTS) + 2
    for stem in ("cooling_rates", "surface_curves"):
        assert PROCESS_PLOTS[stem][0] in titles
    assert assessment.solution.checks.energy_balance_error < 1e-6
    assert assessment.quench.curves["slowest"].range_time is not None


def test_the_curve_drawn_is_the_table_and_the_band_the_fields(probe):
    """The solid line is h = q/(T_s − T∞) of the table to 1e-9 relative (the same arithmetic
    in another order); the shaded band spans the lowest and highest node of the group over
    the stored fields."""
    assessment, out = probe
    figure = surface_curve_figure(assessment)
    axes = figure.axes[0]
    line = axes.get_lines()[0]
    t, h = np.asarray(line.get_xdata()), np.asarray(line.get_ydata())
    inside = (t >= TABLE_T[0] + 1.0) & (t <= TABLE_T[-1])
    expected = 1e3 * np.interp(t[inside], TABLE_T, TABLE_Q) / (t[inside] - BATH)
    np.testing.assert_allclose(h[inside], expected, rtol=1e-9)
    solution = assessment.solution
    mesh = solution.model.section.mesh
    summary = json.loads((out / "summary.json").read_text(encoding="utf-8"))["surface_curves"]
    assert set(summary) == {"mantle", "end_face"}
    for group, written in summary.items():
        nodes = np.unique(mesh.facets[:, mesh.boundaries[group]])
        fields = np.array([solution.fields[i][nodes] for i in range(len(solution.fields))])
        assert written["lowest_degC"] == fields.min() and written["highest_degC"] == fields.max()
        assert written["highest_degC"] == 850.0  # the initial field is the first output
        assert BATH < written["lowest_degC"] < 200.0
    band = axes.patches[0].get_extents()  # the shaded band, in display units
    low, high = axes.transData.inverted().transform([[band.x0, 0], [band.x1, 0]])[:, 0]
    union = (min(s["lowest_degC"] for s in summary.values()), 850.0)
    np.testing.assert_allclose([low, high], union, rtol=1e-6)


@pytest.fixture(scope="module")
def frozen(tmp_path_factory):
    text = reduced("freezing", ('mesh_size = "2 mm"', 'mesh_size = "4 mm"'), ('"30 s"', '"60 s"'))
    assessment = run_case(case_from_toml(text)).assessment
    out = tmp_path_factory.mktemp("frozen") / "results"
    write_results(assessment, out, animation=False, vtk=False)
    return assessment, out


def test_the_freezing_report_sets_the_field_beside_plank_and_pham(frozen):
    """Plank's equation leaves out the sensible heat, so it must come out shorter than the
    field (Singh & Heldman, *Introduction to Food Engineering*, 4th ed., §7.6, from memory);
    Pham's method adds it and must lie nearer the field."""
    assessment, out = frozen
    f = assessment.freezing
    assert f.field_time is not None and f.error("plank") < 0
    assert abs(f.error("pham")) < abs(f.error("plank"))
    page = parse_page(out / "report.html")
    assert HEADINGS["freezing"] in page.headings and HEADINGS["curves"] not in page.headings
    text = " ".join(" ".join(page.text).split())
    assert " ".join(f.wording.split()) in text
    summary = json.loads((out / "summary.json").read_text(encoding="utf-8"))
    written, stats = summary["freezing"], assessment.solution.stats
    assert written["field_time_s"] == f.field_time and written["plank_s"] == f.plank
    for key in ("retried_steps", "subdivided_steps", "damped_iterations"):
        assert summary["solver"][key] == getattr(stats, key)
    assert assessment.solution.checks.energy_balance_error < 1e-6
