"""The study report as a person sees it: plots drawn from study tables built from exact
solutions, the page rendered in headless Chromium (as tests/test_report_browser.py does for
the run report), its headings, embedded images and conclusions read back from the DOM.

The tables: a validity study of a plane wall over Bi (errors from the exact series, see
tests/test_study_validity.py), a sampled study of the closed-form lumped time with h uniform
on ±25 % (see tests/test_study_uncertainty.py) and a manufactured grid sequence
φ(h) = φ0 + C·h² (see tests/test_study_convergence.py).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from PIL import Image, ImageStat
from test_report_browser import _Dom, run_browser
from test_study_uncertainty import sampled_study
from test_study_validity import study_table

from advisor.caution import CAUTION
from advisor.studies.convergence import grid_convergence
from advisor.studies.study_report import (
    STUDY_HEADINGS,
    StudyFindings,
    analyse_study,
    write_study_report,
)


@pytest.fixture(scope="module")
def validity_study(tmp_path_factory):
    table = study_table("wall", np.geomspace(0.01, 10.0, 16))
    table.insert(
        0, "boundaries.outside.convection.coefficient", table["biot_volume_to_surface"] * 4000.0
    )
    findings = analyse_study(table, title="Plate family", variable="biot_volume_to_surface")
    folder = tmp_path_factory.mktemp("validity")
    return findings, table, write_study_report(findings, folder, table), folder


@pytest.fixture(scope="module")
def sampled(tmp_path_factory):
    table = sampled_study().iloc[:400].reset_index(drop=True)
    rng = np.random.default_rng(3)
    table["material.density"] = rng.uniform(7000, 8000, len(table))
    table["peak_difference_K"] = 0.05 * table["boundaries.quenched.convection.coefficient"]
    findings = analyse_study(table, title="Coefficient known to ±25 %")
    folder = tmp_path_factory.mktemp("sampled")
    return findings, table, write_study_report(findings, folder, table), folder


def test_a_validity_study_has_its_map_rule_and_cases(validity_study):
    findings, table, paths, folder = validity_study
    assert findings.validity is not None and not findings.spreads  # a grid, not samples
    names = sorted(p.name for p in paths)
    assert names == ["study.html", "validity_map.png", "validity_map.svg"]
    with Image.open(folder / "plots" / "validity_map.png") as image:
        # not blank: the bands, lines and labels vary the grey levels
        assert ImageStat.Stat(image.convert("L")).var[0] > 200
    page = (folder / "study.html").read_text(encoding="utf-8")
    assert findings.rules[0].text.replace("'", "&#x27;") in page


def test_a_sampled_study_has_spreads_and_influences(sampled):
    findings, table, paths, folder = sampled
    assert [s.column for s in findings.spreads] == [
        "time_to_target_slowest_s",
        "peak_difference_K",
    ]
    first = findings.influences["time_to_target_slowest_s"][0]
    assert first.input == "boundaries.quenched.convection.coefficient" and first.value < -0.9
    assert {p.name for p in paths} >= {"spread.png", "influence.png", "study.html"}


def test_the_rendered_study_page_has_its_headings_images_and_caution(
    validity_study, sampled, tmp_path
):
    for findings, _table, paths, folder in (validity_study, sampled):
        done = run_browser(folder / "study.html", tmp_path / "profile", "--dump-dom")
        assert done.returncode == 0, done.stderr[-2000:]
        dom = _Dom()
        dom.feed(done.stdout)
        expected = [STUDY_HEADINGS["summary"]]
        if findings.validity is not None:
            expected.append(STUDY_HEADINGS["validity"])
        if findings.spreads:
            expected += [STUDY_HEADINGS["spread"], STUDY_HEADINGS["influence"]]
        expected += [STUDY_HEADINGS["cases"], STUDY_HEADINGS["caution"]]
        assert dom.headings == expected
        pngs = [p for p in paths if p.suffix == ".png"]
        assert len(dom.images) == len(pngs)
        assert all(src.startswith("data:image/png;base64,") for src in dom.images)
        text = " ".join(dom.text)
        assert CAUTION[:60] in text
        for rule in findings.rules:
            assert rule.text in text


def test_a_convergence_report_renders(tmp_path):
    sizes = [0.001, 0.002, 0.004]
    time = [412.0 + 3e6 * h**2 for h in sizes]
    peak = [88.0 - 1e6 * h**2 for h in sizes]
    findings = StudyFindings(
        "Mesh check",
        cases=3,
        convergence={
            "time_to_target_slowest_s": grid_convergence(sizes, time),
            "peak_difference_K": grid_convergence(sizes, peak),
        },
        recommendation="Use a mesh size of 2 mm.",
    )
    paths = write_study_report(findings, tmp_path / "converge", pd.DataFrame({"h": sizes}))
    assert (tmp_path / "converge" / "plots" / "convergence.png").is_file()
    done = run_browser(paths[-1], tmp_path / "profile", "--dump-dom")
    assert done.returncode == 0, done.stderr[-2000:]
    dom = _Dom()
    dom.feed(done.stdout)
    assert STUDY_HEADINGS["convergence"] in dom.headings
    assert "Use a mesh size of 2 mm." in " ".join(dom.text)
    assert len(dom.images) == 1


@pytest.mark.parametrize("sensitivity", ["sobol", "chaos"])
def test_variance_shares_on_request(sampled, sensitivity):
    pytest.importorskip(
        {"sobol": "SALib", "chaos": "chaospy"}[sensitivity],
        reason="Sobol indices need the optional 'uncertainty' extra",
    )
    _, table, _, _ = sampled
    findings = analyse_study(table, sensitivity=sensitivity)
    found = findings.influences["time_to_target_slowest_s"]
    # t depends on h alone here (the density column is noise): its share is nearly all.
    assert found[0].input == "boundaries.quenched.convection.coefficient"
    assert found[0].value > 0.9 and "sobol" in found[0].method
    assert abs(found[1].value) < 0.1


def test_an_unknown_sensitivity_is_refused(sampled):
    from advisor.errors import AdvisorError

    with pytest.raises(AdvisorError, match="sensitivity must be one of"):
        analyse_study(sampled[1], sensitivity="variance")
