"""The example scripts run (at reduced size) and give sane answers: the run's own energy
balance holds, the verdict is there, and the results folder reads back."""

import importlib.util
import json
import sys
from pathlib import Path

import pytest

from advisor.casefile.starters import SCENARIOS, starter_text

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"


def load(name: str):
    sys.path.insert(0, str(EXAMPLES))  # the scripts import examples/_common.py
    try:
        spec = importlib.util.spec_from_file_location(name, EXAMPLES / f"{name}.py")
        module = importlib.util.module_from_spec(spec)
        spec.loader.exec_module(module)
    finally:
        sys.path.remove(str(EXAMPLES))
    return module


def check_sane(assessment, out: Path) -> None:
    solution = assessment.solution
    assert solution.checks.energy_balance_error < 1e-6, solution.checks
    assert assessment.verdict.rating in ("adequate", "marginal", "inadequate")
    assert assessment.verdict.reasons and assessment.verdict.advice
    summary = json.loads((out / "summary.json").read_text())
    assert summary["verdict"]["rating"] == assessment.verdict.rating
    assert all((out / f).is_file() for f in summary["files"])


@pytest.mark.parametrize("scenario", sorted(SCENARIOS))
def test_example_case_files_are_the_starting_cases(scenario):
    assert (EXAMPLES / f"{scenario}.toml").read_text(encoding="utf-8") == starter_text(scenario)


REDUCED = {  # coarser meshes and shorter runs than the case files, same physics
    "quench_bar": {"section.mesh_size": "3 mm"},
    "extrusion_quench": {"section.mesh_size": "2 mm", "section.refine": {}},
    "heated_conductor": {"section.mesh_size": "4 mm", "run.end_time": "30 min"},
    "cyclic_ambient": {"section.mesh_size": "20 mm", "run.end_time": "1 d"},
}


@pytest.mark.parametrize("name", sorted(REDUCED))
def test_case_file_examples(name, tmp_path):
    assessment = load(name).run(tmp_path / "out", overrides=REDUCED[name])
    check_sane(assessment, tmp_path / "out")


def test_furnace_round(tmp_path):
    assessment = load("furnace_round").run(tmp_path / "out", mesh_size=0.008)
    check_sane(assessment, tmp_path / "out")
    # Heated by radiation and convection at Bi of order 0.1-0.3: the core lags the lumped
    # estimate, which says the round is soaked too early.
    assert assessment.solution.stop_time > assessment.time_to_target["classical"]


def test_coated_plate(tmp_path):
    assessment = load("coated_plate").run(tmp_path / "out", mesh_size=0.002, end_time=300.0)
    check_sane(assessment, tmp_path / "out")
    assert set(assessment.solution.model.section.regions) == {"steel", "coating"}


def test_sweep_finds_where_lumped_stops_being_adequate():
    rows = load("sweep_bar_size").sweep(half_sides_mm=(5, 40), mesh_divisions=6)
    (small, bi_small, error_small, _), (large, bi_large, error_large, _) = rows
    assert bi_large / bi_small == pytest.approx(8.0, rel=1e-9)  # Bi grows with the size
    assert error_small < error_large


def test_flat_bar_air_cooling(tmp_path):
    example = load("flat_bar_air_cooling")
    assessment = example.run(tmp_path / "out", mesh_size=0.004, time_step=20.0)
    check_sane(assessment, tmp_path / "out")
    # A thin aluminium bar in a draught: Bi ~ 1e-3, so lumped must hold to 2 %.
    assert assessment.biot[0].value < 0.01
    assert assessment.verdict.adequate
