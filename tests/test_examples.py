"""The example scripts run (at reduced size) and give sane answers."""

import importlib.util
import json
from pathlib import Path

import pytest

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"


def load(name: str):
    spec = importlib.util.spec_from_file_location(name, EXAMPLES / f"{name}.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def test_flat_bar_air_cooling(tmp_path):
    example = load("flat_bar_air_cooling")
    assessment = example.run(tmp_path / "out", mesh_size=0.004, time_step=20.0)
    solution = assessment.solution
    assert solution.checks.warnings == ()
    # A thin aluminium bar in a draught: Bi ~ 1e-3, so lumped must hold to 2 %.
    assert assessment.biot[0].value < 0.01
    assert assessment.verdict.adequate
    summary = json.loads((tmp_path / "out" / "summary.json").read_text())
    assert summary["time_to_target_s"]["slowest"] == pytest.approx(
        assessment.time_to_target["slowest"]
    )
