"""The pipeline from a case to its results: ``run_case`` writes nothing, its results pickle
whole, and ``write_results`` of them gives the files the command line gives."""

from __future__ import annotations

import pickle
from pathlib import Path

import numpy as np
import pytest

from advisor import AdvisorError
from advisor.casefile import load_case
from advisor.casefile.starters import starter_text
from advisor.cli import EXIT_OK, main
from advisor.pipeline import Results, run_case, write_results

HISTORIES = ("times", "mean", "minimum", "maximum", "stored_energy", "absorbed_heat")


def small_case_file(folder: Path) -> Path:
    """The quench-bar starter on a coarse mesh for two minutes, without the animation."""
    text = starter_text("quench-bar")
    for old, new in (('mesh_size = "1 mm"', 'mesh_size = "4 mm"'), ('"10 min"', '"2 min"')):
        assert old in text, old
        text = text.replace(old, new)
    path = folder / "quench-bar.toml"
    path.write_text(text + "\n[outputs]\nanimation = false\n", encoding="utf-8")
    return path


def files_under(folder: Path) -> list[str]:
    return sorted(p.relative_to(folder).as_posix() for p in folder.rglob("*") if p.is_file())


@pytest.fixture(scope="module")
def case_path(tmp_path_factory) -> Path:
    return small_case_file(tmp_path_factory.mktemp("case"))


@pytest.fixture(scope="module")
def results(case_path, tmp_path_factory) -> Results:
    working = tmp_path_factory.mktemp("working")
    with pytest.MonkeyPatch.context() as patch:
        patch.chdir(working)
        found = run_case(load_case(case_path))
    assert list(working.iterdir()) == [], "run_case wrote into the working directory"
    assert [p.name for p in case_path.parent.iterdir()] == ["quench-bar.toml"]
    return found


def test_run_case_writes_nothing_and_keeps_the_case(results, case_path):
    case = load_case(case_path)
    assert results.title == case.title
    assert dict(results.outputs) == {"animation": False}
    assert results.wall_seconds > 0.0
    assert results.solution is results.assessment.solution
    assert results.solution.times[-1] == pytest.approx(120.0)
    assert results.assessment.verdict.rating in ("adequate", "marginal", "inadequate")


def test_results_pickle_with_equal_histories(results):
    again = pickle.loads(pickle.dumps(results))
    assert isinstance(again, Results)
    assert (again.title, dict(again.outputs)) == (results.title, dict(results.outputs))
    a, b = results.solution, again.solution
    for name in HISTORIES:
        np.testing.assert_array_equal(getattr(b, name), getattr(a, name), err_msg=name)
    assert set(b.probes) == set(a.probes)
    for name in a.probes:
        np.testing.assert_array_equal(b.probes[name], a.probes[name])
    for group in a.heat_flow:
        np.testing.assert_array_equal(b.heat_flow[group], a.heat_flow[group])
    np.testing.assert_array_equal(np.asarray(list(b.fields)), np.asarray(list(a.fields)))
    assert again.assessment.time_to_target == results.assessment.time_to_target
    assert again.assessment.verdict.rating == results.assessment.verdict.rating


def test_write_results_gives_the_files_of_the_command_line(results, case_path, tmp_path):
    from_cli = tmp_path / "cli"
    assert main(["--quiet", "run", str(case_path), "--out", str(from_cli)]) == EXIT_OK
    from_results = tmp_path / "pipeline"
    files = write_results(results, from_results)
    assert files_under(from_results) == files_under(from_cli)
    assert sorted(f.as_posix() for f in files) == files_under(from_results)
    assert "animation.gif" not in files_under(from_results)  # the case's [outputs] held
    # An explicit choice overrides the case's; an Assessment alone gets every output.
    with_gif = write_results(results, tmp_path / "gif", animation=True, report=False, vtk=False)
    assert Path("animation.gif") in with_gif and Path("report.html") not in with_gif
    bare = write_results(results.assessment, tmp_path / "bare", report=False, vtk=False)
    assert Path("animation.gif") in bare


def test_a_bad_request_is_refused_before_the_solve(tmp_path):
    case = load_case(small_case_file(tmp_path), {"advisor.target": "900 degC"})
    with pytest.raises(AdvisorError, match="target"):
        run_case(case, progress=lambda *_: pytest.fail("the solve started"))
