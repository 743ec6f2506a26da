"""What a quench or freezing engineer reads in the results folder: the report's process parts
and pictures, and summary.json's and histories.csv's process values, read back with ``json``
and ``csv`` and compared with the Assessment they were written from (the writers only
format, so the Assessment is the reference; the readings themselves are checked against closed
forms in ``test_quench_outputs.py`` and ``test_freezing_estimates.py``)."""

from __future__ import annotations

import csv
import json
from pathlib import Path

import numpy as np
import pytest
from test_report_browser import _Dom, run_browser
from test_writers import parse_page

from advisor import assess, write_results
from advisor.analysis.freezing import FreezingProduct
from advisor.casefile.case import case_from_toml
from advisor.casefile.starters import starter_text
from advisor.pipeline import run_case
from advisor.writers.plots import PLOTS
from advisor.writers.process_plots import PROCESS_PLOTS
from advisor.writers.report_content import HEADINGS
from advisor.writers.report_document import PROCESS_PARTS
from fem import Convection, Insulated, Material, ThermalModel, solve
from geometries import Rectangle

QUENCH_KEYS = (
    'cooling_rates = true\ntimes_to = ["500 degC", "300 degC", "20 degC"]\n'
    'cooling_range = ["800 degC", "500 degC"]'
)


@pytest.fixture(scope="module")
def quench(tmp_path_factory):
    """The quench-bar starter on a coarse mesh with the quench keys: its Assessment and the
    results folder (no animation, no fields)."""
    text = starter_text("quench-bar").replace('mesh_size = "1 mm"', 'mesh_size = "4 mm"')
    text = text.replace('time_step = "1 s"', 'time_step = "2 s"')
    text = text.replace('quantity = "slowest"', 'quantity = "slowest"\n' + QUENCH_KEYS)
    assessment = run_case(case_from_toml(text)).assessment
    out = tmp_path_factory.mktemp("quench") / "results"
    write_results(assessment, out, animation=False, vtk=False)
    return assessment, out


def test_the_quench_report_has_its_part_table_and_picture(quench):
    assessment, out = quench
    page = parse_page(out / "report.html")
    expected = [h for k, h in HEADINGS.items() if k not in PROCESS_PARTS or k == "quench"]
    assert page.headings == expected
    images = [attrs for tag, attrs in page.tags if tag == "img"]
    assert len(images) == len(PLOTS) + 1  # the general plots and the rate plot
    title = PROCESS_PLOTS["cooling_rates"][0]
    assert [a["alt"] for a in images].count(title) == 1
    text = " ".join(" ".join(page.text).split())
    slowest = assessment.quench.curves["slowest"]
    assert f"{slowest.largest_rate:.4g} K/s" in text
    assert f"{slowest.largest_rate_temperature:.4g} °C" in text
    assert "time from 800 to 500 °C" in text and "time to 300 °C" in text
    assert slowest.times_to[20.0] is None and "not within the run" in text
    markdown = (out / "report.md").read_text(encoding="utf-8")
    assert "(plots/cooling_rates.png)" in markdown and f"## {HEADINGS['quench']}" in markdown
    assert (out / "plots" / "cooling_rates.png").is_file()


def test_the_quench_report_renders_in_chromium(quench, tmp_path):
    _, out = quench
    done = run_browser(out / "report.html", tmp_path / "profile", "--dump-dom")
    assert done.returncode == 0, done.stderr[-2000:]
    dom = _Dom()
    dom.feed(done.stdout)
    assert HEADINGS["quench"] in dom.headings
    assert len(dom.images) == len(PLOTS) + 1
    assert all(src.startswith("data:image/png;base64,") for src in dom.images)


def test_summary_json_quench_values_equal_the_assessment(quench):
    assessment, out = quench
    summary = json.loads((out / "summary.json").read_text(encoding="utf-8"))
    written, readings = summary["quench"], assessment.quench
    assert summary["freezing"] is None
    assert written["cooling"] is True
    assert written["times_to_degC"] == [500.0, 300.0, 20.0]
    assert written["cooling_range_degC"] == [800.0, 500.0]
    assert (
        set(written["histories"])
        == set(readings.curves)
        == {
            "slowest",
            "probe:core",
            "probe:face_centre",
        }
    )
    for name, curve in readings.curves.items():
        entry = written["histories"][name]
        assert entry["largest_rate_K_per_s"] == curve.largest_rate  # JSON keeps every digit
        assert entry["largest_rate_temperature_degC"] == curve.largest_rate_temperature
        assert entry["largest_rate_time_s"] == curve.largest_rate_time
        assert entry["range_time_s"] == curve.range_time
        assert {e["temperature_degC"]: e["time_s"] for e in entry["times_to_s"]} == (
            curve.times_to
        )


def test_histories_csv_carries_the_rates(quench):
    assessment, out = quench
    with open(out / "histories.csv", encoding="utf-8") as handle:
        rows = list(csv.reader(handle))
    header, values = rows[0], np.array(rows[1:], dtype=float)
    for column, name in (
        ("cooling rate slowest point of the field [K/s]", "slowest"),
        ("cooling rate probe core [K/s]", "probe:core"),
    ):
        written = values[:, header.index(column)]
        np.testing.assert_array_equal(written, assessment.quench.curves[name].rates)


@pytest.fixture(scope="module")
def freezing(tmp_path_factory):
    """A 40 mm slab of a water-rich product (invented values) cooled on both faces in −30 °C
    air, judged against a FreezingProduct given directly; its results folder."""
    half = 0.02
    air = Convection(heat_transfer_coefficient=20.0, ambient=-30.0)
    model = ThermalModel(
        Rectangle(2 * half, 0.01).mesh(size=0.004),
        Material(1.2, 1000.0, 3000.0),
        boundaries={"left": air, "right": air, "top": Insulated(), "bottom": Insulated()},
        initial_temperature=5.0,
    )
    product = FreezingProduct(1000.0, 250e3, -1.0, 1.2, 3500.0, 1900.0)
    solution = solve(model, end_time=6 * 3600.0, time_step=60.0)
    assessment = assess(solution, freezing=product, freeze_to=-10.0)
    out = tmp_path_factory.mktemp("freezing") / "results"
    write_results(assessment, out, animation=False, vtk=False)
    return assessment, out


def test_the_freezing_report_sets_the_field_beside_plank_and_pham(freezing):
    assessment, out = freezing
    f = assessment.freezing
    assert f.field_time is not None and f.pham is not None
    page = parse_page(out / "report.html")
    expected = [h for k, h in HEADINGS.items() if k not in PROCESS_PARTS or k == "freezing"]
    assert page.headings == expected
    text = " ".join(" ".join(page.text).split())
    assert " ".join(f.wording.split()) in text
    for key in ("plank", "pham"):
        assert f"{100 * f.error(key):+.3g} %" in text
    way = "too short (non-conservative)" if f.error("plank") < 0 else "too long (conservative)"
    assert way in text


def test_summary_json_freezing_values_equal_the_assessment(freezing):
    assessment, out = freezing
    written = json.loads(Path(out / "summary.json").read_text(encoding="utf-8"))["freezing"]
    f = assessment.freezing
    assert written["field_time_s"] == f.field_time
    assert written["plank_s"] == f.plank and written["pham_s"] == f.pham
    assert written["plank_error_fraction"] == f.error("plank")
    assert written["pham_error_fraction"] == f.error("pham")
    assert written["end_temperature_degC"] == f.end_temperature == -10.0
    assert written["half_thickness_m"] == f.half_thickness
    assert written["shape_number"] == f.shape_number
    assert written["heat_transfer_coefficient_W_per_m2_K"] == f.heat_transfer_coefficient
    assert written["medium_temperature_degC"] == f.medium_temperature
    assert f.medium_temperature == pytest.approx(-30.0, abs=1e-12)  # through kelvin and back
    assert written["wording"] == f.wording
