"""The Case as an object: it pickles (a study sends cases to worker processes) and builds the
same model after the trip; it can be made from a file's text or its tables; and the starting
cases load without the case reader, pint or the solver."""

from __future__ import annotations

import pickle
import subprocess
import sys

import numpy as np
import pytest

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - Python 3.10
    import tomli as tomllib

from advisor.casefile import case_from_data, case_from_toml, load_case
from advisor.casefile.case import CaseError
from advisor.casefile.starters import SCENARIOS, starter_text

# scenario → a coarser mesh, so that each model is quick to build
COARSE = {"quench-bar": "4 mm", "coated-plate": "1 mm", "furnace-round": "6 mm"}


@pytest.mark.parametrize("scenario", sorted(SCENARIOS))
def test_every_starting_case_survives_pickling(scenario, tmp_path):
    path = tmp_path / f"{scenario}.toml"
    path.write_text(starter_text(scenario), encoding="utf-8")
    case = load_case(path)
    copy = pickle.loads(pickle.dumps(case))
    assert copy == case
    assert copy.run_options == case.run_options
    assert copy.end_time == case.end_time


@pytest.mark.parametrize("scenario", sorted(COARSE))
def test_an_unpickled_case_builds_the_same_model(scenario, tmp_path):
    path = tmp_path / f"{scenario}.toml"
    path.write_text(starter_text(scenario), encoding="utf-8")
    case = load_case(path, overrides={"section.mesh_size": COARSE[scenario]})
    model = case.model()
    again = pickle.loads(pickle.dumps(case)).model()
    np.testing.assert_array_equal(again.section.mesh.p, model.section.mesh.p)
    np.testing.assert_array_equal(again.section.mesh.t, model.section.mesh.t)
    assert again.section.edge_groups.keys() == model.section.edge_groups.keys()
    assert again.materials == model.materials
    assert again.boundaries == model.boundaries
    assert again.initial_temperature == model.initial_temperature
    assert again.probes == model.probes
    assert again.heat_sources == model.heat_sources
    assert again.element_order == model.element_order


def test_a_case_from_text_or_tables_equals_the_file(tmp_path):
    text = starter_text("quench-bar")
    path = tmp_path / "quench-bar.toml"
    path.write_text(text, encoding="utf-8")
    from_file = load_case(path)
    assert case_from_toml(text, path) == from_file
    tables = tomllib.loads(text)
    assert case_from_data(tables, path) == from_file
    assert tomllib.loads(text) == tables  # the caller's tables are left as they were


def test_a_case_from_text_names_the_line_of_its_mistake():
    text = starter_text("quench-bar").replace('end_time = "', 'end_tme = "', 1)
    with pytest.raises(CaseError) as error:
        case_from_toml(text, "bar.toml")
    message = str(error.value)
    line = next(i for i, t in enumerate(text.splitlines(), 1) if t.startswith("end_tme"))
    assert message.startswith(f"bar.toml, line {line}: run.end_tme: ")
    assert "did you mean 'end_time'" in message


def test_the_starting_cases_load_without_the_case_reader():
    code = (
        "import sys, advisor.casefile.starters as s; s.starter_text('quench-bar');"
        "print(sorted(m for m in sys.modules if m.startswith('advisor.casefile')));"
        "print('pint' in sys.modules)"
    )
    done = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, timeout=60, check=True
    )
    loaded, pint_loaded = done.stdout.strip().splitlines()
    assert loaded == str(["advisor.casefile", "advisor.casefile.starters"])
    assert pint_loaded == "False"


def test_reading_a_case_leaves_dask_unloaded_and_importable():
    """pint would import dask (when installed) on its own import; a case is read without it,
    and dask can still be imported afterwards (the studies' engines use it)."""
    pytest.importorskip(
        "dask", reason="dask is in the studies extra; without it there is nothing to keep out"
    )
    code = (
        "import sys; from advisor.casefile.units import quantity;"
        "print(quantity('25 mm', 'length'), 'dask' in sys.modules);"
        "import dask.array; print(dask.array.ones(3).sum().compute())"
    )
    done = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, timeout=60, check=True
    )
    converted, summed = done.stdout.strip().splitlines()
    assert converted == "0.025 False"
    assert float(summed) == 3.0


@pytest.mark.parametrize(
    ("argument", "message", "key_path", "phrase"),
    [
        ("time_step", "time_step must be a time in (0, end_time] s", "run.time_step", "must be"),
        (
            "stop",
            "stop quantity must be one of ['mean', 'core'], got 'cor'",
            "run.stop.quantity",
            "did you mean 'core'",
        ),
    ],
)
def test_the_solvers_run_check_is_mapped_to_the_key_it_names(
    argument, message, key_path, phrase, monkeypatch
):
    """The run options go through the solver's own check when it has one; its error names
    the argument, which the case maps to its key path and line."""
    import fem

    seen = {}

    def check_run_options(end_time, *, probes=(), **options):
        seen.update(options, end_time=end_time, probes=probes)
        raise fem.ModelError(message, argument=argument)

    monkeypatch.setattr(fem, "check_run_options", check_run_options, raising=False)
    text = starter_text("quench-bar").replace(
        'time_step = "1 s"', 'time_step = "1 s"\nstop = { quantity = "cor", target = 300 }'
    )
    with pytest.raises(CaseError) as error:
        case_from_toml(text, "bar.toml")
    lines = text.splitlines()
    line = next(i for i, t in enumerate(lines, 1) if t.startswith(key_path.split(".")[1]))
    assert str(error.value).startswith(f"bar.toml, line {line}: {key_path}: ")
    assert phrase in str(error.value)
    assert seen["end_time"] == 600.0 and seen["time_step"] == 1.0
    assert seen["probes"] == ("core", "face_centre")
