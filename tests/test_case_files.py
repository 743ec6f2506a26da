"""Case files end to end: a corpus of malformed cases, the starting cases' round trip, and the
small commands (new, materials, show, check).

Every file in ``tests/cases/`` holds one kind of mistake (its first line says which). Each is
run through the command line as ``soakwise run CASE --out DIR`` and must be refused with exit
status 2, one line on stderr ("soakwise: error: FILE[, line N]: KEY.PATH: message"), no
traceback and nothing written. The table below keeps, beside each file, the key path the
message must start with, a phrase it must contain and the line it must name. ``None`` for the
line means the message must name no line: the key is missing, so it has no line (a wrong
line is worse than none); a mistake in a table header names the header's line.
"""

from __future__ import annotations

import re
import shutil
import subprocess
from pathlib import Path

import numpy as np
import pytest

import fem
from advisor import assess
from advisor.casefile.case import CaseError, case_from_toml, load_case
from advisor.casefile.starters import SCENARIOS, starter_text
from advisor.casefile.units import UnitError, quantity
from advisor.cli import EXIT_OK, EXIT_USAGE, main
from advisor.pipeline import run_case
from geometries import Rectangle

CASES = Path(__file__).parent / "cases"


def row(name, key_path, phrase, line):
    """One corpus file: the key path its message starts with, a phrase of it, and its line."""
    return pytest.param(name, key_path, phrase, line, id=name.removesuffix(".toml"))


# (file, key path the message starts with (None: not valid TOML), phrase, line or None)
MALFORMED = [
    # unknown keys
    row(
        "unknown_top_level_key_boundarys.toml",
        "boundarys",
        "did you mean 'boundaries'",
        None,
    ),
    row("unknown_top_level_table_advisr.toml", "advisr", "did you mean 'advisor'", 35),
    row(
        "unknown_key_in_convection_coefficent.toml",
        "boundaries.quenched.convection.coefficent",
        "did you mean 'coefficient'",
        23,
    ),
    row(
        "unknown_key_in_boundary_insulted.toml",
        "boundaries.symmetry.insulted",
        "did you mean 'insulated'",
        20,
    ),
    row("unknown_key_in_run_time_stp.toml", "run.time_stp", "did you mean 'time_step'", 33),
    # missing required values
    row("missing_end_time.toml", "run.end_time", "is missing", None),
    row("missing_mesh_size.toml", "section.mesh_size", "is missing", None),
    row("missing_material.toml", "material", "is missing", None),
    row("missing_initial_temperature.toml", "initial", "is missing", None),
    # quantities of the wrong kind, unknown units, wrong types
    row("length_in_kilograms.toml", "section.shape[0].width", "'kg' is a different kind", 9),
    row(
        "coefficient_in_degC.toml",
        "boundaries.quenched.convection.coefficient",
        "'degC' is a different kind of unit",
        23,
    ),
    row("end_time_in_metres.toml", "run.end_time", "'m' is a different kind of unit", 32),
    row("unknown_unit.toml", "section.shape[0].height", "unknown unit 'mmm'", 10),
    row("end_time_boolean.toml", "run.end_time", "expected a time", 32),
    row("probe_not_a_point.toml", "probes.core", "expected a point [x, y]", 29),
    # impossible values
    row("conductivity_zero.toml", "material.conductivity", "must be > 0", 15),
    row("conductivity_negative.toml", "material.conductivity", "must be > 0", 15),
    row(
        "emissivity_above_one.toml",
        "boundaries.quenched.radiation.emissivity",
        "must be in [0, 1]",
        24,
    ),
    row(
        "ambient_below_absolute_zero.toml",
        "boundaries.quenched.convection.ambient",
        "below absolute zero",
        23,
    ),
    row(
        "initial_below_absolute_zero.toml",
        "initial.temperature",
        "is at or below absolute zero (-273.15 °C), got -300 °C",
        26,
    ),
    row("end_time_zero.toml", "run.end_time", "must be > 0 s", 32),
    # values in the units the case wrote them in (the library speaks in m, s and degC)
    row("end_time_negative.toml", "run.end_time", "must be > 0 s, got −10 min", 32),
    row(
        "negative_width.toml",
        "section.shape[0].width",
        "must be a length > 0 mm, got -30 mm",
        9,
    ),
    row(
        "mesh_size_larger_than_part.toml",
        "section.mesh_size",
        "50 mm is larger than the section (30 mm)",
        5,
    ),
    row("element_order_3.toml", "run.element_order", "must be 1 or 2", 34),
    row("tolerance_above_one.toml", "advisor.tolerance", "must be a fraction in (0, 1)", 37),
    # edge groups, regions, materials, shapes
    row(
        "boundary_group_not_in_section.toml",
        "boundaries.quench",
        "did you mean 'quenched'",
        22,
    ),
    row(
        "section_group_without_boundary.toml",
        "boundaries",
        "['symmetry'] of the section have no boundary condition",
        None,
    ),
    row(
        "boundary_without_condition.toml",
        "boundaries.symmetry.convection",
        "the edge group has no condition",
        None,
    ),
    row(
        "insulated_false.toml", "boundaries.symmetry.insulated", 'expected true or "symmetry"', 20
    ),
    row(
        "unknown_library_material.toml",
        "material.solid",
        "is not in the material library",
        15,
    ),
    row("material_and_materials.toml", "material", "not both", 14),
    row(
        "library_material_misspelt.toml",
        "material.solid",
        "did you mean 'carbon steel, plain'?",
        15,
    ),
    row(
        "advisor_process_unknown.toml",
        "advisor.process",
        "did you mean 'heat-treatment'?",
        37,
    ),
    row(
        "material_region_not_in_section.toml",
        "materials.steel",
        "is not a region of the section ['bar']",
        14,
    ),
    row("unknown_shape_kind.toml", "section.shape[0].kind", "did you mean 'rectangle'", 8),
    row("polygon_crosses_itself.toml", "section.shape[0].kind", "outline crosses itself", 8),
    row("hole_outside_part.toml", "section.shape", "lies outside it and removes nothing", None),
    row(
        "second_shape_negative_height.toml",
        "section.shape[1].height",
        "must be a length > 0 mm, got -2 mm",
        17,
    ),
    row(
        "second_boundary_coefficient_negative.toml",
        "boundaries.top.convection.coefficient",
        "must be > 0",
        26,
    ),
    # run options, schedules
    row("unknown_stop_quantity.toml", "run.stop.quantity", "did you mean 'core'", 34),
    row(
        "advisor_before_run_stop_quantity.toml",
        "run.stop.quantity",
        "did you mean 'core'",
        39,
    ),
    row(
        "schedule_times_not_increasing.toml",
        "boundaries.quenched.convection.ambient.linear",
        "must increase strictly",
        23,
    ),
    row("unknown_method.toml", "run.method", "did you mean 'crank-nicolson'", 34),
    row("exponential_with_radiation.toml", "run.method", "needs a linear model", 35),
    row("exponential_with_linear_ambient.toml", "run.method", "is PiecewiseLinear", 34),
    # curves of surface temperature, phase change, Newton settings
    row(
        "curve_temperatures_misspelt.toml",
        "boundaries.quenched.convection.coefficient.temperatures",
        "did you mean 'surface_temperatures'",
        23,
    ),
    row(
        "coefficient_table_of_unknown_form.toml",
        "boundaries.quenched.convection.coefficient",
        "or a table of surface temperature {surface_temperatures",
        23,
    ),
    row(
        "curve_lengths_differ.toml",
        "boundaries.quenched.convection.coefficient.values",
        "as many values, got 5 and 4",
        23,
    ),
    row(
        "curve_temperatures_not_increasing.toml",
        "boundaries.quenched.convection.coefficient.surface_temperatures",
        "must increase strictly",
        23,
    ),
    row(
        "curve_values_in_degC.toml",
        "boundaries.quenched.convection.coefficient.values",
        "'degC' is a different kind of unit",
        23,
    ),
    row(
        "curve_heat_flux_a_number.toml",
        "boundaries.quenched.convection.heat_flux",
        "use flux = ... on the group",
        23,
    ),
    row(
        "curve_coefficient_and_heat_flux.toml",
        "boundaries.quenched.convection.coefficient",
        "not both",
        23,
    ),
    row(
        "curve_heat_flux_towards_hotter_side.toml",
        "boundaries.quenched.convection.heat_flux",
        "flows towards the hotter side",
        23,
    ),
    row(
        "curve_stages_not_from_zero.toml",
        "boundaries.quenched.convection.stages",
        "must start at 0 s",
        23,
    ),
    row(
        "ambient_table_of_unknown_form.toml",
        "boundaries.quenched.convection.ambient",
        "expected a number or a schedule of time",
        23,
    ),
    row(
        "latent_heat_without_range.toml",
        "material.latent_heat",
        "solidus and liquidus, or freezing_point and freezing_range",
        18,
    ),
    row("solidus_without_latent_heat.toml", "material.solidus", "needs latent_heat", 18),
    row(
        "liquidus_below_solidus.toml",
        "material.liquidus",
        "1400 °C must lie above the solidus 1450 °C",
        20,
    ),
    row(
        "latent_heat_in_kelvin.toml",
        "material.latent_heat",
        "'K' is a different kind of unit",
        18,
    ),
    row("freezing_range_zero.toml", "material.freezing_range", "must be > 0 K", 20),
    row(
        "enthalpy_with_specific_heat.toml",
        "material.specific_heat",
        "give either enthalpy",
        17,
    ),
    row(
        "enthalpy_not_increasing.toml",
        "material.enthalpy.values",
        "must increase strictly",
        17,
    ),
    row("newton_tolerance_negative.toml", "run.newton_tolerance", "must be > 0 K", 34),
    row(
        "max_newton_iterations_fraction.toml",
        "run.max_newton_iterations",
        "must be a whole number >= 1",
        34,
    ),
    # text that is not UTF-8
    row("encoding_utf16.toml", None, "not UTF-8 text: byte 0 is 0xff (it looks like UTF-16", None),
    row("encoding_binary.toml", None, "not UTF-8 text: byte 48 is 0x80", None),
    # units pint cannot parse (its tokenizer, parser and arithmetic fail in their own ways)
    row(
        "unit_unbalanced_bracket.toml",
        "boundaries.quenched.convection.coefficient",
        "unknown unit 'W/(m^2*K'",
        23,
    ),
    row("unit_dangling_power.toml", "section.shape[0].width", "unknown unit 'm**'", 9),
    row("unit_division_by_zero.toml", "material.density", "unknown unit 'kg/m^3/0'", 16),
    row("unit_emoji.toml", "section.shape[0].height", "unknown unit", 10),
    # control characters in names, huge keys and values (echoed at most ~80 characters)
    row(
        "edge_group_name_with_nul.toml",
        "section.shape[0].edges.right",
        "control character U+0000",
        11,
    ),
    row("probe_name_with_escape.toml", "probes", "holds the character U+001B", 28),
    row("unknown_key_100k_characters.toml", None, "is not a known key (keys here:", 38),
    row("probe_point_of_100k_numbers.toml", "probes.core", "got [0, 0, 0, 0, 0, 0, ...]", 29),
    # nesting deeper than any key of the format (the TOML parser itself would recurse)
    row("arrays_nested_5000_deep.toml", "probes.deep", "nested more than 16", 31),
    row("inline_tables_nested_40_deep.toml", None, "probes.core.x.x", 29),
    # steps and outputs: refused before meshing with the estimate; min_step above max_step
    row("min_step_above_max_step.toml", "run.min_step", "10 s is above max_step 1 s", 33),
    row(
        "time_step_one_nanosecond_over_ten_years.toml",
        "run.time_step",
        "about 3.16e+17 steps over end_time = 87660 h",
        33,
    ),
    row(
        "output_interval_one_nanosecond.toml",
        "run.output_interval",
        "about 6e+11 outputs over end_time = 10 min",
        34,
    ),
    # regions the section lacks; a stop beyond every temperature the part can reach
    row("source_region_not_in_section.toml", "sources.bra", "did you mean 'bar'", 29),
    row(
        "initial_region_not_in_section.toml",
        "initial.temperature.core",
        "is not a region of the section ['bar']",
        26,
    ),
    row(
        "stop_target_beyond_the_ambient.toml",
        "run.stop.target",
        "40 °C is never reached: it is below the lowest",
        33,
    ),
    # not TOML at all
    row("toml_syntax_error.toml", None, "not valid TOML", 10),
    row("duplicate_key.toml", None, "not valid TOML", 11),
]

# Malformed, yet accepted by the loader: checked through load_case only, since the command
# line would go on to solve them.
ACCEPTED_MALFORMED = [
    row(
        "element_order_fraction.toml",
        "run.element_order",
        "must be 1 or 2",
        34,
    ),
    row(
        "advisor_target_below_absolute_zero.toml",
        "advisor.target",
        "absolute zero",
        36,
    ),
]

NOT_MALFORMED = ["amplitude_in_degC.toml"]

# Refused once the section is meshed (a probe must lie in the part, a target must be one the
# part passes through): the same one-line message, values in the units the case wrote them in.
# Our own arithmetic: the quarter bar spans 0-30 mm by 0-20 mm; it cools from 850 degC
# (1123.15 K) towards the oil at 60 degC (333.15 K).
MESHED_MALFORMED = [
    row(
        "probe_outside_part_in_mm.toml",
        "probes.core",
        "the point (45 mm, 5 mm) lies outside the section, which spans x = 0 mm to 30 mm "
        "and y = 0 mm to 20 mm",
        27,
    ),
    row(
        "target_beyond_ambient.toml",
        "advisor.target",
        "20 °C is not a temperature the part passes through: it cools from 850 °C towards 60 °C",
        34,
    ),
    row(
        "target_in_kelvin_above_start.toml",
        "advisor.target",
        "1200 K is not a temperature the part passes through: it cools from 1123 K towards "
        "333.1 K",
        34,
    ),
]

DEPRECATED = ["section_order_deprecated.toml"]


def check_message(message: str, name: str, key_path, phrase: str, line) -> None:
    """``message`` (without the "soakwise: error: " prefix) has the loader's layout."""
    assert message.startswith(name), message
    match = re.match(rf"{re.escape(name)}(?:, line \d+)?: (?P<rest>.*)$", message)
    assert match, f"not 'file[, line N]: ...': {message}"
    if key_path is not None:
        assert match["rest"].startswith(f"{key_path}: "), message
    assert phrase in message, message
    named = [int(n) for n in re.findall(r"\bline (\d+)", message)]
    assert named == ([] if line is None else [line]), message


def test_the_corpus_is_the_table():
    listed = {p.values[0] for p in MALFORMED + ACCEPTED_MALFORMED + MESHED_MALFORMED}
    listed |= set(NOT_MALFORMED) | set(DEPRECATED)
    on_disk = {p.name for p in CASES.glob("*.toml")}
    assert on_disk == listed
    assert len(MALFORMED) >= 25
    for name in on_disk:  # each file says what is wrong with it (in its own encoding)
        data = (CASES / name).read_bytes()
        utf16 = data[:2] in (b"\xff\xfe", b"\xfe\xff")
        assert data.decode("utf-16" if utf16 else "latin-1").startswith("# ")


@pytest.mark.parametrize(("name", "key_path", "phrase", "line"), MALFORMED)
def test_malformed_case_is_refused_with_one_message(
    name, key_path, phrase, line, tmp_path, monkeypatch, capsys
):
    monkeypatch.chdir(tmp_path)  # a stray file in the working folder would show up too
    before = sorted(p.name for p in CASES.iterdir())
    status = main(["run", str(CASES / name), "--out", str(tmp_path / "out")])
    out, err = capsys.readouterr()
    assert status == EXIT_USAGE
    assert "Traceback" not in err
    assert out == ""
    lines = err.strip().splitlines()
    assert len(lines) == 1, err
    assert lines[0].startswith("soakwise: error: "), err
    assert len(lines[0]) <= 700, "the message echoes too much of the input"
    check_message(lines[0].removeprefix("soakwise: error: "), name, key_path, phrase, line)
    assert list(tmp_path.iterdir()) == []
    assert sorted(p.name for p in CASES.iterdir()) == before


@pytest.mark.parametrize(("name", "key_path", "phrase", "line"), ACCEPTED_MALFORMED)
def test_malformed_case_is_refused_by_the_loader(name, key_path, phrase, line):
    with pytest.raises(CaseError) as error:
        load_case(CASES / name)
    check_message(str(error.value), name, key_path, phrase, line)


@pytest.mark.parametrize(("name", "key_path", "phrase", "line"), MESHED_MALFORMED)
def test_meshed_case_is_refused_at_its_key_in_its_units(
    name, key_path, phrase, line, tmp_path, monkeypatch, capsys
):
    monkeypatch.chdir(tmp_path)
    case = load_case(CASES / name)  # the loader cannot tell without the mesh
    with pytest.raises(CaseError) as error:
        case.model()
    check_message(str(error.value), name, key_path, phrase, line)
    status = main(["run", str(CASES / name), "--out", str(tmp_path / "out"), "-q"])
    out, err = capsys.readouterr()
    assert status == EXIT_USAGE and out == ""
    assert err.strip().splitlines() == [f"soakwise: error: {error.value}"]
    assert list(tmp_path.iterdir()) == []


def test_section_order_is_deprecated_for_the_element_order():
    path = CASES / "section_order_deprecated.toml"
    with pytest.warns(FutureWarning, match=r"line 6: section\.order is deprecated") as caught:
        case = load_case(path)
    assert "[run] element_order = 2" in str(caught[0].message)
    assert case.element_order == 2 and case.mesh_options["order"] == 2
    text = path.read_text(encoding="utf-8").replace('time_step = "1 s"', "element_order = 1")
    with pytest.warns(FutureWarning, match="element_order = 1 sets the elements"):
        both = case_from_toml(text, path)
    assert both.element_order == 1  # [run] element_order wins for the elements
    plain = text.replace("order = 2\n", "").replace("element_order = 1", "element_order = 2")
    quadratic = case_from_toml(plain, path)  # no warning: one key, a curved mesh with it
    assert quadratic.element_order == 2 and quadratic.mesh_options["order"] == 2


def test_commands_take_loudness_after_the_command(tmp_path, capsys):
    path = tmp_path / "quench-bar.toml"
    text = starter_text("quench-bar").replace('mesh_size = "1 mm"', 'mesh_size = "5 mm"')
    path.write_text(text, encoding="utf-8")
    assert main(["check", str(path), "-q"]) == EXIT_OK
    assert capsys.readouterr().err == ""  # quiet: errors only
    with pytest.raises(SystemExit) as stop:  # argparse's own refusal of the command line
        main(["-q", "check", str(path), "-v"])
    assert stop.value.code == EXIT_USAGE
    assert "cannot be used together" in capsys.readouterr().err
    assert main(["check", str(path), "--verbose"]) == EXIT_OK
    assert "Biot number" in capsys.readouterr().err


def test_check_refuses_min_step_above_max_step(capsys):
    status = main(["check", str(CASES / "min_step_above_max_step.toml")])
    err = capsys.readouterr().err
    assert status == EXIT_USAGE
    assert "line 33: run.min_step: 10 s is above max_step 1 s" in err


def test_temperature_difference_in_degc_is_a_difference_or_refused():
    try:
        value = quantity("8 degC", "temperature_difference")
    except UnitError as error:
        assert "8 degC" in str(error)
    else:
        assert value == pytest.approx(8.0)


def test_amplitude_in_degc_is_read_as_a_difference_or_refused():
    path = CASES / "amplitude_in_degC.toml"
    try:
        case = load_case(path)
    except CaseError as error:
        assert "amplitude" in str(error)
    else:
        (convection,) = case.boundaries["quenched"]
        assert convection.ambient.amplitude == pytest.approx(8.0)


SUBPROCESS_CASES = [
    row("toml_syntax_error.toml", None, "not valid TOML", 10),
    row("unknown_top_level_table_advisr.toml", "advisr", "did you mean 'advisor'", 35),
    row("negative_width.toml", "section.shape[0].width", "must be a length > 0", 9),
]


@pytest.fixture(scope="module")
def soakwise_script():
    script = shutil.which("soakwise")
    if script is None:
        pytest.skip("the soakwise console script is not installed")
    return script


@pytest.mark.parametrize(("name", "key_path", "phrase", "line"), SUBPROCESS_CASES)
def test_console_script_refuses_malformed_case(
    soakwise_script, name, key_path, phrase, line, tmp_path
):
    done = subprocess.run(
        [soakwise_script, "run", str(CASES / name), "--out", str(tmp_path / "out")],
        cwd=tmp_path,
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert done.returncode == EXIT_USAGE
    assert "Traceback" not in done.stderr
    assert done.stdout == ""
    lines = done.stderr.strip().splitlines()
    assert len(lines) == 1, done.stderr
    assert lines[0].startswith("soakwise: error: ")
    check_message(lines[0].removeprefix("soakwise: error: "), name, key_path, phrase, line)
    assert list(tmp_path.iterdir()) == []


# ---------------------------------------------------------------------------------------------
# Starting cases
# ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize("scenario", sorted(SCENARIOS))
def test_new_writes_the_starter_and_it_loads(scenario, tmp_path, capsys):
    out = tmp_path / f"{scenario}.toml"
    assert main(["new", scenario, "--out", str(out)]) == EXIT_OK
    assert out.read_text(encoding="utf-8") == starter_text(scenario)
    assert [p.name for p in tmp_path.iterdir()] == [out.name]
    case = load_case(out)
    assert case.end_time > 0


def test_new_through_the_console_script(soakwise_script, tmp_path):
    out = tmp_path / "bar.toml"
    done = subprocess.run(
        [soakwise_script, "new", "quench-bar", "--out", str(out)],
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert done.returncode == EXIT_OK, done.stderr
    assert out.read_text(encoding="utf-8") == starter_text("quench-bar")


def test_quench_bar_case_equals_the_same_model_built_in_python(tmp_path):
    path = tmp_path / "quench-bar.toml"
    assert main(["--quiet", "new", "quench-bar", "--out", str(path)]) == EXIT_OK
    case = load_case(path, overrides={"section.mesh_size": "3 mm", "run.end_time": "5 min"})
    assert case.end_time == 300.0
    assert case.run_options == {"method": "crank-nicolson", "time_step": 1.0}
    assert case.advisor_options == {"target": 200.0, "tolerance": 0.05, "quantity": "slowest"}
    from_file = run_case(case).assessment

    # The same part written with the Python API, read off the starter by hand.
    quarter = Rectangle(
        0.030,
        0.020,
        edge_names={
            "left": "symmetry",
            "bottom": "symmetry",
            "right": "quenched",
            "top": "quenched",
        },
        region="bar",
    )
    model = fem.ThermalModel(
        quarter.mesh(0.003),
        fem.Material(conductivity=40.0, density=7850.0, specific_heat=520.0),
        {
            "symmetry": fem.Insulated("symmetry"),
            "quenched": fem.Convection(heat_transfer_coefficient=400.0, ambient=60.0),
        },
        850.0,
        probes={"core": (0.0, 0.0), "face_centre": (0.030, 0.0)},
    )
    direct = assess(
        fem.solve(model, 300.0, method="crank-nicolson", time_step=1.0),
        target=200.0,
        tolerance=0.05,
        quantity="slowest",
    )
    a, b = from_file.solution, direct.solution
    np.testing.assert_allclose(a.times, b.times, rtol=1e-12, atol=0)
    assert a.times[-1] == pytest.approx(300.0)
    np.testing.assert_allclose(a.mean, b.mean, rtol=1e-12, atol=0)
    assert set(a.probes) == set(b.probes) == {"core", "face_centre"}
    for name in a.probes:
        np.testing.assert_allclose(a.probes[name], b.probes[name], rtol=1e-12, atol=0)
    assert a.mean[-1] < a.mean[0]  # it did cool
    assert from_file.verdict.rating == direct.verdict.rating


# ---------------------------------------------------------------------------------------------
# new, materials, show, check
# ---------------------------------------------------------------------------------------------


def test_new_does_not_overwrite_without_force(tmp_path, capsys):
    out = tmp_path / "mine.toml"
    out.write_text("# my edited case\n", encoding="utf-8")
    assert main(["new", "quench-bar", "--out", str(out)]) == EXIT_USAGE
    err = capsys.readouterr().err
    assert err.startswith("soakwise: error: ") and "already exists" in err
    assert "--force" in err
    assert out.read_text(encoding="utf-8") == "# my edited case\n"
    assert [p.name for p in tmp_path.iterdir()] == ["mine.toml"]
    assert main(["new", "quench-bar", "--out", str(out), "--force"]) == EXIT_OK
    assert out.read_text(encoding="utf-8") == starter_text("quench-bar")


def test_materials_lists_the_library(capsys):
    assert main(["materials"]) == EXIT_OK
    out = capsys.readouterr().out
    assert fem.solids.MATERIALS
    for name in fem.solids.MATERIALS:
        assert name in out
    assert "carbon steel, plain" in out


def test_show_refuses_a_folder_without_summary(tmp_path, capsys):
    (tmp_path / "notes.txt").write_text("not results")
    assert main(["show", str(tmp_path)]) == EXIT_USAGE
    err = capsys.readouterr().err
    assert err.startswith("soakwise: error: ")
    assert "not a results folder (no summary.json)" in err
    assert "Traceback" not in err


def test_check_reports_biot_numbers_and_direction(tmp_path, capsys):
    text = starter_text("quench-bar")
    assert text.count('mesh_size = "1 mm"') == 1
    path = tmp_path / "quench-bar.toml"
    path.write_text(text.replace('mesh_size = "1 mm"', 'mesh_size = "3 mm"'), encoding="utf-8")
    assert main(["check", str(path)]) == EXIT_OK
    err = capsys.readouterr().err
    # Our own arithmetic: the quarter section is 30 mm x 20 mm, cooled on the 30 mm and 20 mm
    # faces, so V/A = 600 mm^2 / 50 mm = 12 mm and Bi = h V/A / k = 400 * 0.012 / 40 = 0.12.
    assert "Biot number (L = V/A_s = 12 mm): 0.12" in err
    assert len(re.findall(r"^Biot number \(", err, flags=re.MULTILINE)) >= 2
    # Cooling at Bi ~ 0.1-0.5: the core lags the mean, so a lumped estimate says "done" first.
    direction = re.search(r"^Expected direction: (.*)$", err, flags=re.MULTILINE)
    assert direction, err
    assert "ahead of the slowest point" in direction[1]
    assert "too early" in direction[1]
    assert [p.name for p in tmp_path.iterdir()] == ["quench-bar.toml"]


def test_exponential_steps_from_a_case_agree_with_small_crank_nicolson_steps(tmp_path):
    """The case key reaches the solver, and the two time integrations of one model agree: the
    exponential step is exact in time to its tolerance, Crank–Nicolson at 0.25 s is second
    order (its time error at Fo ≈ 0.002 per step is far below the 0.05 K compared here)."""
    path = tmp_path / "quench-bar.toml"
    assert main(["--quiet", "new", "quench-bar", "--out", str(path)]) == EXIT_OK
    case = load_case(
        path,
        overrides={
            "section.mesh_size": "4 mm",
            "run.end_time": "5 min",
            "run.method": "exponential",
            "run.tolerance": "0.01 K",
        },
    )
    assert case.run_options["method"] == "exponential"
    model = case.model()
    exponential = fem.solve(model, case.end_time, **case.run_options)
    assert exponential.stats.method == "exponential"
    assert exponential.stats.steps == 1 and exponential.stats.factorisations == 1
    stepped = fem.solve(model, case.end_time, method="crank-nicolson", time_step=0.25)
    core = np.interp(exponential.times, stepped.times, stepped.probes["core"])
    later = exponential.times >= 5.0  # interpolation between 0.25 s steps needs a smooth curve
    np.testing.assert_allclose(exponential.probes["core"][later], core[later], atol=0.05)


# ---------------------------------------------------------------------------------------------
# curves of surface temperature, phase change, Newton settings
# ---------------------------------------------------------------------------------------------

CURVE_CASE = """
title = "Bar quenched in water"

[section]
mesh_size = "5 mm"

[[section.shape]]
kind = "rectangle"
width = "15 mm"
height = "20 mm"
edges = {{ left = "symmetry", bottom = "symmetry", right = "quenched", top = "quenched" }}

[material]
conductivity = "30 W/(m*K)"
density = "7850 kg/m^3"
specific_heat = "600 J/(kg*K)"
{phase_change}

[boundaries.symmetry]
insulated = "symmetry"

[boundaries.quenched.convection]
ambient = "60 degC"
{curve}

[initial]
temperature = "850 degC"

[run]
end_time = "2 min"
newton_tolerance = "0.01 mK"
max_newton_iterations = 40
"""


def test_curves_of_surface_temperature_are_read_with_their_units():
    # Units converted by hand: 1.2 kW/(m^2 K) = 1200 W/(m^2 K), 0.3 MW/m^2 = 3e5 W/m^2.
    coefficient = (
        'coefficient = { surface_temperatures = ["60 degC", "500 degC", "900 degC"], '
        'values = ["1.2 kW/(m^2*K)", "3 kW/(m^2*K)", "300 W/(m^2*K)"] }'
    )
    case = load_case_text(CURVE_CASE.format(phase_change="", curve=coefficient))
    (kind,) = case.boundaries["quenched"]
    assert isinstance(kind, fem.SurfaceTemperatureConvection)
    assert kind.curve == ((0.0, fem.SurfaceCurve((60.0, 500.0, 900.0), (1200.0, 3000.0, 300.0))),)
    assert case.run_options["newton_tolerance"] == pytest.approx(1e-5)
    assert case.run_options["max_newton_iterations"] == 40

    stages = """
[[boundaries.quenched.convection.stages]]
from = "0 s"
heat_flux = { surface_temperatures = ["60 degC", "900 degC"], values = ["0 W/m^2", "0.3 MW/m^2"] }
[[boundaries.quenched.convection.stages]]
from = "0.5 min"
coefficient = { surface_temperatures = ["60 degC", "900 degC"], values = [800, 400] }
"""
    case = load_case_text(CURVE_CASE.format(phase_change="", curve=stages))
    (kind,) = case.boundaries["quenched"]
    assert kind.curve == (
        (0.0, fem.SurfaceCurve((60.0, 900.0), (0.0, 3e5), "heat_flux")),
        (30.0, fem.SurfaceCurve((60.0, 900.0), (800.0, 400.0))),
    )


def test_latent_heat_and_enthalpy_tables_are_read():
    curve = 'coefficient = "500 W/(m^2*K)"'
    # freezing_point and freezing_range: the change begins at the point, ends the range below.
    phase = 'latent_heat = "270 kJ/kg"\nfreezing_point = "1450 degC"\nfreezing_range = "50 K"'
    material = load_case_text(CURVE_CASE.format(phase_change=phase, curve=curve)).materials["*"]
    assert (material.latent_heat, material.solidus, material.liquidus) == (2.7e5, 1400.0, 1450.0)
    phase = 'latent_heat = "270 kJ/kg"\nsolidus = "1400 degC"\nliquidus = "1450 degC"'
    again = load_case_text(CURVE_CASE.format(phase_change=phase, curve=curve)).materials["*"]
    assert again == material

    text = CURVE_CASE.format(phase_change="", curve=curve).replace(
        'specific_heat = "600 J/(kg*K)"',
        'enthalpy = { temperatures = ["0 degC", "1400 degC", "1450 degC", "1600 degC"], '
        'values = ["0 kJ/kg", "840 kJ/kg", "1.14 MJ/kg", "1.23 MJ/kg"] }',
    )
    material = load_case_text(text).materials["*"]
    table = material.specific_enthalpy
    assert table.temperatures == (0.0, 1400.0, 1450.0, 1600.0)
    assert table.values == pytest.approx((0.0, 8.4e5, 1.14e6, 1.23e6))
    # H(1450) − H(1400) = ρ·(1.14 − 0.84) MJ/kg, as the table says.
    assert material.enthalpy(1450.0, 1400.0) == pytest.approx(7850.0 * 3e5, rel=1e-12)


def load_case_text(text: str):
    return case_from_toml(text)
