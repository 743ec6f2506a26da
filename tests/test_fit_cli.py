"""``soakwise fit`` from the command line: the fit starter runs as the README shows, its folder
holds what it says, the fitted case-file tables load and run, and bad input is refused with
nothing written.

The starter's readings were made by soakwise with h = 250 W/(m²·K) on a 1 mm mesh (see
examples/fit-trial-data.py); the tests fit them on a 3 mm mesh with 5 s steps for speed, so the
coefficient carries that discretisation's error (within 2 %).
"""

import csv
import json
import re
from pathlib import Path

import pytest

from advisor.cli import main

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = ROOT / "examples"


@pytest.fixture
def trial(tmp_path) -> tuple[Path, Path]:
    """The starter case on a 3 mm mesh with 5 s steps, and its measured file, in
    ``tmp_path``."""
    text = (EXAMPLES / "fit-trial.toml").read_text(encoding="utf-8")
    text = text.replace('mesh_size = "1 mm"', 'mesh_size = "3 mm"')
    case = tmp_path / "trial.toml"
    case.write_text(text.replace('time_step = "1 s"', 'time_step = "5 s"'), encoding="utf-8")
    measured = tmp_path / "trial.csv"
    measured.write_bytes((EXAMPLES / "fit-trial-measured.csv").read_bytes())
    return case, measured


def test_the_readme_shows_the_starter_command():
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    assert (
        "soakwise fit examples/fit-trial.toml --measured examples/fit-trial-measured.csv "
        "--fit h:surface --uncertainty 0.5" in readme
    )


def test_fit_starter_writes_its_folder_and_the_fitted_case_runs(trial, tmp_path, capsys):
    case, measured = trial
    out = tmp_path / "fit"
    status = main(
        [
            "fit",
            str(case),
            "--measured",
            str(measured),
            "--fit",
            "h:surface",
            "--uncertainty",
            "0.5",
            "--out",
            str(out),
        ]
    )
    assert status == 0, capsys.readouterr().err
    summary = json.loads((out / "fit.json").read_text(encoding="utf-8"))
    for name in summary["files"]:
        assert (out / name).is_file(), name
    assert {"fit.html", "residuals.csv", "fitted.toml", "fitted-case.toml"} <= set(
        summary["files"]
    )
    assert {"plots/fit-curves.png", "plots/fit-residuals.png"} <= set(summary["files"])
    (value,) = summary["parameters"]
    assert value["name"] == "h[surface]"
    assert value["value"] == pytest.approx(250.0, rel=0.02)
    assert value["interval_95"][0] < value["value"] < value["interval_95"][1]
    assert summary["verdict"]["rating"] == "identified"
    assert [r["probe"] for r in summary["lumped"]] == ["core", "under_skin"]
    assert all(r["bias"] < 0 for r in summary["lumped"])  # the core lags: the hand reading is low
    err = capsys.readouterr().err
    assert "Lumped hand method: a lumped fit of the core thermocouple reads h" in err

    with (out / "residuals.csv").open(newline="", encoding="utf-8") as handle:
        rows = list(csv.reader(handle))
    assert rows[0][:5] == [
        "time [s]",
        "core measured [degC]",
        "core fitted [degC]",
        "core residual [K]",
        "core band [K]",
    ]
    assert len(rows) == 1 + 121
    assert float(rows[5][3]) == pytest.approx(float(rows[5][2]) - float(rows[5][1]), abs=1e-6)

    html = (out / "fit.html").read_text(encoding="utf-8")
    assert "What a lumped fit of each curve would have read" in html
    assert "Before relying on these figures" in html and "licensed professional" in html

    # fitted-case.toml is a case soakwise run takes, with the fitted coefficient in place
    from advisor import run_case
    from advisor.casefile import load_case

    fragment = (out / "fitted.toml").read_text(encoding="utf-8")
    number = float(re.search(r'coefficient = "([0-9.eE+-]+) W/\(m\^2\*K\)"', fragment).group(1))
    assert number == pytest.approx(value["value"], rel=1e-5)
    fitted = load_case(out / "fitted-case.toml", {"run.end_time": "1 min"})
    (condition,) = fitted.boundaries["surface"]
    assert condition.heat_transfer_coefficient(0.0) == pytest.approx(number)
    results = run_case(fitted)
    assert results.solution.times[-1] == pytest.approx(60.0)


def test_a_table_against_time_through_the_command(trial, tmp_path):
    case, measured = trial
    out = tmp_path / "fit"
    status = main(
        [
            "-q",
            "fit",
            str(case),
            "--measured",
            str(measured),
            "--fit",
            "h(t):surface:nodes=3",
            "--uncertainty",
            "0.5",
            "--out",
            str(out),
        ]
    )
    assert status == 0
    summary = json.loads((out / "fit.json").read_text(encoding="utf-8"))
    assert len(summary["parameters"]) == 3
    assert "discrepancy principle" in summary["regularisation"]["rule"]
    assert (out / "plots" / "fit-coefficient.png").is_file()
    fragment = (out / "fitted.toml").read_text(encoding="utf-8")
    assert "linear = [" in fragment
    from advisor.casefile import load_case

    load_case(out / "fitted-case.toml")  # the schedule of time reads back


def run_refused(arguments, capsys) -> str:
    status = main(arguments)
    assert status == 2
    return capsys.readouterr().err


def test_bad_input_is_refused_and_nothing_is_written(trial, tmp_path, capsys):
    case, measured = trial
    out = tmp_path / "fit"
    bad = tmp_path / "bad.csv"
    bad.write_text("time [s], core [degC]\n0, 850\n5, 84x.2\n10, 830\n")
    err = run_refused(["fit", str(case), "--measured", str(bad), "--out", str(out)], capsys)
    assert "bad.csv, line 3, column 2" in err and "'84x.2'" in err
    assert not out.exists()

    # a column mapped to a point outside the section: found after meshing, still before writing
    outside = tmp_path / "outside.csv"
    outside.write_text("time [s], core [degC], far [degC]\n0,850,850\n5,840,840\n10,830,830\n")
    err = run_refused(
        [
            "fit",
            str(case),
            "--measured",
            str(outside),
            "--map",
            "far=30 mm, 0 mm",
            "--out",
            str(out),
        ],
        capsys,
    )
    assert "outside.csv, line 1, column 3" in err and "outside the section" in err
    assert not out.exists()

    err = run_refused(
        [
            "fit",
            str(case),
            "--measured",
            str(measured),
            "--fit",
            "h(t):surface",
            "--out",
            str(out),
        ],
        capsys,
    )
    assert "--uncertainty" in err and not out.exists()

    err = run_refused(
        ["fit", str(case), "--measured", str(measured), "--fit", "h:rim", "--out", str(out)],
        capsys,
    )
    assert "'rim'" in err and "surface" in err and not out.exists()
    err = run_refused(
        ["fit", str(case), "--measured", str(measured), "--fit", "k:surface", "--out", str(out)],
        capsys,
    )
    assert "not understood" in err and not out.exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == sorted(
        ["trial.toml", "trial.csv", "bad.csv", "outside.csv"]
    )


def test_an_existing_folder_is_kept_without_force(trial, tmp_path, capsys):
    case, measured = trial
    out = tmp_path / "fit"
    out.mkdir()
    (out / "notes.txt").write_text("mine")
    arguments = ["-q", "fit", str(case), "--measured", str(measured), "--out", str(out)]
    assert "already exists" in run_refused(arguments, capsys)
    assert "is not replaced" in run_refused([*arguments, "--force"], capsys)
    assert (out / "notes.txt").read_text() == "mine"


def test_the_starter_readings_are_what_their_recipe_makes():
    # examples/fit-trial-data.py remakes the readings; a logger's rounding to 0.1 K may flip
    # a last digit where the solver's round-off differs, never more.
    import importlib.util

    spec = importlib.util.spec_from_file_location("trial_data", EXAMPLES / "fit-trial-data.py")
    recipe = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(recipe)
    times, logged = recipe.readings()
    from advisor.fitting.measured import read_measured

    shipped = read_measured(
        EXAMPLES / "fit-trial-measured.csv", {"core": (0, 0), "under_skin": (0.018, 0)}
    )
    assert shipped.times.tolist() == times.tolist()
    for name, values in logged.items():
        assert abs(shipped.readings[name] - values).max() <= 0.1 + 1e-9, name


def test_fitted_tables_of_every_kind_read_back_as_a_case():
    # The fragment's text for a curve of surface temperature beside radiation, spliced into
    # the starter, is read by the case loader into the same conditions.
    from advisor.casefile.case import case_from_toml
    from advisor.fitting.fragment import boundary_fragment, spliced_case
    from fem import Radiation, SurfaceCurve, SurfaceTemperatureConvection

    curve = SurfaceCurve((40.0, 445.0, 850.0), (180.5, 240.25, 310.0))
    conditions = (SurfaceTemperatureConvection(curve, 30.0), Radiation(0.62, 30.0))
    fragment = boundary_fragment({"surface": conditions}, ["surface"], "fitted\nby a test")
    assert fragment.startswith("# fitted\n# by a test\n[boundaries.surface]\n")
    text = (EXAMPLES / "fit-trial.toml").read_text(encoding="utf-8")
    spliced = spliced_case(text, fragment, ["surface"])
    assert spliced.count("[boundaries.surface]") == 1
    case = case_from_toml(spliced, EXAMPLES / "fit-trial.toml")
    convection, radiation = case.boundaries["surface"]
    assert convection.curve[0][1] == curve
    assert radiation.emissivity == 0.62 and radiation.surroundings(0.0) == 30.0


def test_a_full_disk_while_writing_the_fit_leaves_nothing(trial, tmp_path, capsys, monkeypatch):
    """A disk that fills while the fit's folder is written ends in one line, exit 1, with no
    folder, staging or lock left behind."""
    import errno
    import os

    import advisor.writers.fit_report as fit_report
    from advisor.cli import EXIT_FAILED

    def no_space(*args, **kwargs):
        raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC), "fit.html")

    monkeypatch.setattr(fit_report, "write_fit_report", no_space)
    case, measured = trial
    out = tmp_path / "fit"
    arguments = ["-q", "fit", str(case), "--measured", str(measured), "--fit", "h:surface"]
    assert main([*arguments, "--out", str(out)]) == EXIT_FAILED
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "no space left on the device" in err[0], err
    assert sorted(p.name for p in tmp_path.iterdir()) == ["trial.csv", "trial.toml"]
