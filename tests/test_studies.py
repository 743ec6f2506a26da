"""Studies: a grid of cases on local processes, in this process and on a dask cluster gives the
same table; a failing case is recorded and the others complete; a killed study resumes
without running its finished cases again; every case is checked before any runs.

The tables are also checked against the closed-form lumped model of the quarter bar: Biot
number hL_c/k with L_c = V/A_s and the lumped time to target τ·ln(θ0/θ), τ = ρcV/(hA_s)
(Incropera, DeWitt, Bergman & Lavine, Fundamentals of Heat and Mass Transfer, 6th ed.,
§5.1–5.2, eqs. 5.5–5.10; from memory).
"""

from __future__ import annotations

import math
import os
import signal
import sqlite3
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pytest

from advisor.casefile import CaseError
from advisor.casefile.starters import starter_text
from advisor.cli import main
from advisor.studies import StudyError, read_study, sweep
from advisor.studies.spec import parse_vary

pytest.importorskip("pandas", reason="study tables are DataFrames: pandas is in the test extra")

ROOT = Path(__file__).resolve().parents[1]
TIMINGS = ["wall_seconds", "solve_seconds", "run_seconds"]
# the quench-bar starter: a quarter of a 60 mm x 40 mm bar, quenched on its two outer faces
HALF_WIDTH, HALF_HEIGHT = 0.030, 0.020  # m
CONDUCTIVITY, DENSITY, SPECIFIC_HEAT = 40.0, 7850.0, 520.0
INITIAL, AMBIENT = 850.0, 60.0  # degC
H_KEY = "boundaries.quenched.convection.coefficient"
GRID = {H_KEY: ["300 W/(m^2*K)", "500 W/(m^2*K)"], "section.mesh_size": ["4 mm", "5 mm"]}


def small_bar(folder: Path, study: str = "") -> Path:
    """The quench-bar starter, shortened (4 min in 2 s steps), with an optional [study]."""
    text = starter_text("quench-bar")
    text = text.replace('end_time = "10 min"', 'end_time = "4 min"')
    text = text.replace('time_step = "1 s"', 'time_step = "2 s"')
    path = folder / "bar.toml"
    path.write_text(text + study, encoding="utf-8")
    return path


def lumped_time(h: float, target: float) -> float:
    """τ·ln(θ0/θ) for the quarter bar: V/A_s = (a·b)/(a + b) for the two quenched faces."""
    length = HALF_WIDTH * HALF_HEIGHT / (HALF_WIDTH + HALF_HEIGHT)
    tau = DENSITY * SPECIFIC_HEAT * length / h
    return tau * math.log((INITIAL - AMBIENT) / (target - AMBIENT))


def same_table(a, b) -> None:
    """Equal tables but for timings; floats to 1e-9 relative (the same arithmetic in another
    process may differ in the last bits only through threaded BLAS)."""
    a, b = a.drop(columns=TIMINGS), b.drop(columns=TIMINGS)
    assert list(a.columns) == list(b.columns)
    for column in a.columns:
        x, y = a[column].to_numpy(), b[column].to_numpy()
        if x.dtype.kind == "f":
            np.testing.assert_allclose(x, y, rtol=1e-9, atol=0.0, err_msg=column)
        else:
            assert list(x) == list(y), column


def test_a_grid_on_two_processes_gives_the_table_of_a_serial_run(tmp_path):
    case = small_bar(tmp_path)
    serial = sweep(case, GRID, map="serial", store=tmp_path / "serial")
    pooled = sweep(case, GRID, workers=2, store=tmp_path / "pool")
    same_table(serial, pooled)
    assert list(serial["status"]) == ["done"] * 4
    # the full grid, the first key slowest
    assert list(serial[H_KEY]) == [300.0, 300.0, 500.0, 500.0]
    assert list(serial["section.mesh_size"]) == [0.004, 0.005, 0.004, 0.005]
    # closed-form lumped answers (V/A_s is exact on straight triangles): rounding only
    length = HALF_WIDTH * HALF_HEIGHT / (HALF_WIDTH + HALF_HEIGHT)
    biot = serial[H_KEY] * length / CONDUCTIVITY
    np.testing.assert_allclose(serial["biot_volume_to_surface"], biot, rtol=1e-12)
    expected = [lumped_time(h, 200.0) for h in serial[H_KEY]]
    np.testing.assert_allclose(serial["time_to_target_classical_s"], expected, rtol=1e-12)
    # the exports load into pandas with the same table
    import pandas as pd

    same_table(read_study(tmp_path / "pool"), pooled)
    from_csv = pd.read_csv(tmp_path / "pool" / "study.csv", keep_default_na=False, na_values=[""])
    np.testing.assert_allclose(from_csv["time_to_target_classical_s"], expected, rtol=1e-12)
    same_table(pd.read_parquet(tmp_path / "pool" / "study.parquet"), pooled)


def test_a_failing_case_is_recorded_and_the_others_complete(tmp_path):
    case = small_bar(tmp_path, "\n[outputs]\nanimation = false\nreport = false\nvtk = false\n")
    targets = ["200 degC", "20 degC", "300 degC"]  # 20 degC is below the oil: found at run time
    table = sweep(
        case,
        {"advisor.target": targets, "section.mesh_size": ["5 mm"]},
        map="serial",
        store=tmp_path / "study",
        case_folders=True,
    )
    assert list(table["status"]) == ["done", "failed", "done"]
    folders = sorted(p.name for p in (tmp_path / "study" / "cases").iterdir())
    assert folders == ["case-00000", "case-00002"]  # results folders of the done cases
    assert (tmp_path / "study" / "cases" / "case-00000" / "summary.json").is_file()
    assert "target" in table["error"][1] and "20" in table["error"][1]
    assert table["error"][0] == table["error"][2] == ""
    done = table[table["status"] == "done"]
    expected = [lumped_time(400.0, t) for t in done["advisor.target"]]
    np.testing.assert_allclose(done["time_to_target_classical_s"], expected, rtol=1e-12)
    assert math.isnan(table["time_to_target_classical_s"][1])


def test_every_case_is_checked_before_the_first_runs(tmp_path):
    case = small_bar(tmp_path)
    with pytest.raises(CaseError, match=r"study case 1 .*section\.mesh_size"):
        sweep(case, {"section.mesh_size": ["5 mm", "5 kg"]}, store=tmp_path / "study")
    assert not (tmp_path / "study").exists()  # nothing ran, nothing was written
    with pytest.raises(CaseError, match=r"--vary section\.mesh_size.*takes 2 values"):
        parse_vary("section.mesh_size=uniform(5 mm)")


def test_ranges_and_lists_keep_their_units():
    logarithmic = parse_vary(f"{H_KEY}=log(100 W/(m^2*K), 10 kW/(m^2*K), 3)")
    assert logarithmic.values == ("100.0 W/(m^2*K)", "1000.0 W/(m^2*K)", "10000.0 W/(m^2*K)")
    linear = parse_vary('section.mesh_size={start = "1 mm", stop = "0.4 cm", count = 4}')
    np.testing.assert_allclose([float(v.split()[0]) for v in linear.values], [1, 2, 3, 4])
    assert parse_vary("advisor.tolerance=0.05,0.1").values == (0.05, 0.1)


def test_a_study_table_in_the_case_file_is_read_with_its_lines(tmp_path):
    study = '\n[study]\nseed = 3\n\n[[study.vary]]\nkey = "section.mesh_size"\nvalue = "4 mm"\n'
    case = small_bar(tmp_path, study)
    with pytest.raises(CaseError, match=r"line \d+: study\.vary\[0\]\.key: give values"):
        sweep(case, store=tmp_path / "study")
    # a case file with a [study] table still runs alone
    from advisor.casefile import load_case

    assert load_case(small_bar(tmp_path, "\n[study]\nseed = 3\n")).title


def _stored(path: Path) -> list[tuple]:
    if not path.exists():
        return []
    with sqlite3.connect(f"file:{path}?mode=ro", uri=True) as connection:
        try:
            return list(connection.execute("SELECT id, finished, wall_seconds FROM cases"))
        except sqlite3.OperationalError:  # the tables are being created
            return []


RESUMED_STUDY = """
[study]
workers = 1

[[study.vary]]
key = "boundaries.quenched.convection.coefficient"
start = "200 W/(m^2*K)"
stop = "900 W/(m^2*K)"
count = 8

[[study.vary]]
key = "section.mesh_size"
values = ["2 mm"]
"""


@pytest.mark.slow
def test_a_killed_study_resumes_without_running_finished_cases_again(tmp_path):
    case = small_bar(tmp_path, RESUMED_STUDY)
    out = tmp_path / "killed"
    database = out / "study.sqlite"
    command = [sys.executable, "-m", "advisor.cli", "-q", "sweep", str(case), "--out", str(out)]
    process = subprocess.Popen(command, cwd=ROOT, start_new_session=True)
    try:
        deadline = time.monotonic() + 120
        while not _stored(database) and process.poll() is None and time.monotonic() < deadline:
            time.sleep(0.02)
    finally:
        os.killpg(process.pid, signal.SIGKILL)  # the study's own process group
        process.wait()
    before = _stored(database)
    assert 1 <= len(before) < 8, "the study must be killed part-way (cases take ~0.3 s)"

    assert main(["-q", "sweep", str(case), "--out", str(out), "--resume"]) == 0
    after = {row[0]: row for row in _stored(database)}
    assert sorted(after) == list(range(8))
    for row in before:  # finished cases kept as they were: not run again
        assert after[row[0]] == row
    assert main(["-q", "sweep", str(case), "--out", str(tmp_path / "whole")]) == 0
    same_table(read_study(out), read_study(tmp_path / "whole"))
    # the finished study is analysed: a validity map over the one input that varies (h),
    # whose design rule is the h where the stored classical error crosses the tolerance
    page = (tmp_path / "whole" / "study.html").read_text(encoding="utf-8")
    assert (tmp_path / "whole" / "plots" / "validity_map.png").is_file()
    table = read_study(out).sort_values("boundaries.quenched.convection.coefficient")
    errors = table["error_classical_slowest"].to_numpy()
    assert errors[0] < 0.05 < errors[-1], "the sweep must straddle the 5 % tolerance"
    assert "within 5 % for the slowest point up to h =" in page

    # resuming a changed study is refused, naming what changed
    changed = ["-q", "sweep", str(case), "--out", str(out), "--resume"]
    assert main([*changed, "--vary", "section.mesh_size=3 mm"]) == 2
    with pytest.raises(StudyError, match="different spec"):
        sweep(case, {"section.mesh_size": ["3 mm"]}, store=out, resume=True)


@pytest.mark.slow
def test_a_study_on_a_dask_cluster_gives_the_table_of_the_process_pool(tmp_path):
    distributed = pytest.importorskip(
        "distributed", reason="dask.distributed (the studies extra) is not installed"
    )
    case = small_bar(tmp_path)
    pooled = sweep(case, GRID, workers=2, store=tmp_path / "pool")
    with distributed.LocalCluster(
        n_workers=2, processes=True, threads_per_worker=1, dashboard_address=None
    ) as cluster:
        with distributed.Client(cluster) as client:
            on_client = sweep(case, GRID, map=client)
        on_address = sweep(case, GRID, map=cluster.scheduler_address, store=tmp_path / "dask")
        command = ["-q", "sweep", str(case), "--out", str(tmp_path / "cli")]
        command += [f"--vary={key}={','.join(values)}" for key, values in GRID.items()]
        assert main([*command, "--cluster", cluster.scheduler_address]) == 0
    same_table(on_client, pooled)
    same_table(on_address, pooled)
    same_table(read_study(tmp_path / "cli"), pooled)


def test_draws_follow_the_documented_transforms():
    """Latin-hypercube draws put one point in each of n equal slices of every input (McKay,
    Beckman & Conover, Technometrics 21 (1979); from memory); each distribution maps the
    same unit-cube points through its quantile function (scipy.stats, computed here)."""
    from scipy import stats
    from scipy.stats import qmc

    from advisor.studies.spec import StudySpec

    variations = (
        parse_vary(f"{H_KEY}=uniform(300 W/(m^2*K), 500 W/(m^2*K))"),
        parse_vary("material.conductivity=normal(40 W/(m*K), 0.2 W/(dm*K))"),  # 2 W/(m*K)
        parse_vary("initial.temperature=triangular(800 degC, 850 degC, 860 degC)"),
        parse_vary("material.density=lognormal(7850 kg/m^3, 0.02)"),
        parse_vary("boundaries.quenched.convection.ambient=normal(60 degC, 5 K)"),
    )
    n, seed = 16, 5
    spec = StudySpec(variations, sampling="latin-hypercube", samples=n, seed=seed)
    cases = spec.overrides()
    value = {k: np.array([float(c[k].split()[0]) for c in cases]) for k in cases[0]}
    u_h = (value[H_KEY] - 300.0) / 200.0
    assert sorted(np.floor(u_h * n).astype(int)) == list(range(n))
    cube = qmc.LatinHypercube(d=5, rng=np.random.default_rng(seed)).random(n)
    np.testing.assert_allclose(value[H_KEY], 300 + 200 * cube[:, 0], rtol=1e-15)
    normal = stats.norm.ppf(cube[:, 1], loc=40.0, scale=2.0)
    np.testing.assert_allclose(value["material.conductivity"], normal, rtol=1e-14)
    triangle = stats.triang.ppf(cube[:, 2], 50.0 / 60.0, loc=800.0, scale=60.0)
    np.testing.assert_allclose(value["initial.temperature"], triangle, rtol=1e-14)
    lognormal = stats.lognorm.ppf(cube[:, 3], 0.02, scale=7850.0)
    np.testing.assert_allclose(value["material.density"], lognormal, rtol=1e-12)
    ambient = stats.norm.ppf(cube[:, 4], loc=60.0, scale=5.0)  # 5 K of spread is 5 degC
    given = value["boundaries.quenched.convection.ambient"]
    np.testing.assert_allclose(given, ambient, rtol=1e-14)


@pytest.mark.parametrize("name", ["advisor.studies.study", "advisor.studies.tables"])
def test_docstring_examples(name):
    import doctest
    import importlib

    result = doctest.testmod(importlib.import_module(name), optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0, f"{name} has no examples"
    assert result.failed == 0


def test_the_command_line_and_the_studies_package_load_no_heavy_library():
    code = (
        "import sys, advisor, advisor.cli, advisor.studies; "
        "print(sorted({m.split('.')[0] for m in sys.modules} & "
        "{'pandas', 'pyarrow', 'dask', 'distributed', 'gmsh', 'matplotlib'}))"
    )
    done = subprocess.run(
        [sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, check=True
    )
    assert done.stdout.strip() == "[]"


def test_cases_of_one_geometry_share_one_mesh(tmp_path, monkeypatch):
    import geometries.meshing
    from advisor.studies import worker

    made = []
    original = geometries.meshing.mesh_section

    def counting(section, size, **options):
        made.append(size)
        return original(section, size, **options)

    monkeypatch.setattr(geometries.meshing, "mesh_section", counting)
    monkeypatch.setattr(worker, "_meshes", type(worker._meshes)())
    table = sweep(small_bar(tmp_path), GRID, map="serial")
    assert list(table["status"]) == ["done"] * 4
    assert sorted(made) == [0.004, 0.005]  # two geometries, four cases
