"""The solver's seams: a pre-assembled system solves as the model does without assembling
again, and the model-free option check applies the same rules as ``solve``, naming the
offending argument."""

from __future__ import annotations

import numpy as np
import pytest

import fem
import fem.transient
from fem import (
    Convection,
    Insulated,
    Material,
    ModelError,
    Radiation,
    StopWhen,
    ThermalModel,
    assemble,
    check_exponential_parts,
    check_run_options,
    solve,
)
from fem.methods import METHODS
from geometries import Rectangle

STEEL = Material(45.0, 7850.0, 475.0)


def quench_model(coefficient: float = 500.0) -> ThermalModel:
    section = Rectangle(0.02, 0.01, edge_names={"left": "symmetry", "bottom": "symmetry"}).mesh(
        size=0.0025
    )
    oil = Convection(heat_transfer_coefficient=coefficient, ambient=60.0)
    return ThermalModel(
        section,
        STEEL,
        boundaries={"symmetry": Insulated("symmetry"), "right": oil, "top": oil},
        initial_temperature=850.0,
        probes={"core": (0.0, 0.0)},
    )


@pytest.mark.parametrize("method", ["crank-nicolson", "bdf2", "exponential"])
def test_a_pre_assembled_system_gives_the_same_run_without_assembling(method, monkeypatch):
    model = quench_model()
    options = dict(method=method, output_interval=60.0, stop=StopWhen("core", 200.0))
    reference = solve(model, 600.0, **options)
    system = assemble(model)

    def refuse(_model):
        raise AssertionError("solve assembled a system it was given")

    monkeypatch.setattr(fem.transient, "assemble", refuse)
    again = solve(system, 600.0, **options)
    for name in ("times", "mean", "minimum", "maximum", "stored_energy", "absorbed_heat"):
        np.testing.assert_array_equal(getattr(again, name), getattr(reference, name))
    np.testing.assert_array_equal(again.probes["core"], reference.probes["core"])
    np.testing.assert_array_equal(np.asarray(again.fields), np.asarray(reference.fields))
    assert again.stop_time == reference.stop_time
    assert again.model is model
    assert again.stats.steps == reference.stats.steps
    assert again.stats.factorisations == reference.stats.factorisations


def test_a_system_serves_runs_that_differ_in_options():
    system = assemble(quench_model())
    short = solve(system, 300.0, time_step=1.0)
    long = solve(system, 600.0, time_step=1.0)
    np.testing.assert_array_equal(long.mean[: short.mean.size], short.mean)


def test_solve_refuses_what_is_neither_model_nor_system():
    with pytest.raises(ModelError, match="ThermalModel") as refusal:
        solve("model.toml", 60.0)
    assert refusal.value.argument == "model"


BAD_OPTIONS = [
    ("end_time", dict(end_time=0.0)),
    ("end_time", dict(end_time=True)),
    ("method", dict(method="runge-kutta")),
    ("time_step", dict(time_step=-1.0)),
    ("time_step", dict(time_step=700.0)),
    ("startup_steps", dict(startup_steps=-1)),
    ("startup_steps", dict(startup_steps=1.5)),
    ("startup_steps", dict(method="bdf2", startup_steps=0)),
    ("output_times", dict(output_times=[0.0, 10.0])),
    ("output_times", dict(output_times=[])),
    ("output_interval", dict(output_interval=0.0)),
    ("tolerance", dict(tolerance=0.0)),
    ("min_step", dict(min_step=-1.0)),
    ("max_step", dict(max_step=1e9)),
    ("min_step", dict(min_step=10.0, max_step=1.0)),
    ("stop", dict(stop=("core", 200.0))),
    ("stop.quantity", dict(stop=StopWhen("centre", 200.0))),
    ("newton_tolerance", dict(newton_tolerance=0.0)),
    ("max_newton_iterations", dict(max_newton_iterations=0)),
]


@pytest.mark.parametrize(("argument", "options"), BAD_OPTIONS)
def test_the_model_free_check_names_the_argument_and_agrees_with_solve(argument, options):
    options = {"end_time": 600.0, **options}
    end_time = options.pop("end_time")
    with pytest.raises(ModelError) as without_model:
        check_run_options(end_time, probes=("core",), **options)
    assert without_model.value.argument == argument
    with pytest.raises(ModelError) as in_solve:
        solve(quench_model(), end_time, **options)
    assert in_solve.value.argument == argument
    assert str(in_solve.value) == str(without_model.value)  # one rule, one message


def test_the_model_free_check_accepts_good_options_and_settles_what_it_can():
    checked = check_run_options(
        600.0, probes=("core",), method="bdf2", time_step=2.0, stop=StopWhen("core", 90.0)
    )
    assert checked.method == "bdf2"
    assert checked.adaptive is False  # a time step without adaptive means fixed steps
    assert checked.startup_steps == 1
    assert checked.output_times[-1] == 600.0
    assert len(checked.output_times) == 50
    assert check_run_options(600.0, method="exponential").adaptive is False


def test_every_method_is_registered_once_by_name():
    assert set(METHODS) == {"crank-nicolson", "bdf2", "backward-euler", "exponential"}
    for name, stepper in METHODS.items():
        assert stepper.name == name


def test_the_exponential_check_names_the_method():
    with pytest.raises(ModelError, match="needs a linear model") as refusal:
        check_exponential_parts(
            {"solid": STEEL},
            {"top": (Convection(50.0, 20.0), Radiation(0.8, 20.0)), "rest": Insulated()},
            {},
        )
    assert refusal.value.argument == "method"
    check_exponential_parts({"solid": STEEL}, {"top": Convection(50.0, 20.0)}, {"solid": 1e5})


def test_model_errors_keep_their_argument_across_processes():
    import pickle

    with pytest.raises(ModelError) as refusal:
        check_run_options(-1.0)
    copy = pickle.loads(pickle.dumps(refusal.value))
    assert copy.argument == "end_time"
    assert str(copy) == str(refusal.value)


def test_a_sweep_over_coefficients_assembles_once(monkeypatch):
    """Runs on one assembled system under other coefficients equal runs of freshly built
    models: the conditions, not the matrices, carry h and the ambient."""
    base = quench_model(500.0)
    system = assemble(base)
    fresh = {h: solve(quench_model(h), 300.0, time_step=2.0) for h in (200.0, 1500.0)}

    def refuse(_model):
        raise AssertionError("the sweep assembled again")

    monkeypatch.setattr(fem.transient, "assemble", refuse)
    for h, reference in fresh.items():
        oil = Convection(heat_transfer_coefficient=h, ambient=60.0)
        boundaries = {"symmetry": Insulated("symmetry"), "right": oil, "top": oil}
        swept = solve(system.with_boundaries(boundaries), 300.0, time_step=2.0)
        np.testing.assert_allclose(swept.mean, reference.mean, rtol=1e-12, atol=1e-9)
        np.testing.assert_allclose(
            swept.probes["core"], reference.probes["core"], rtol=1e-12, atol=1e-9
        )
    # h differs by 7.5x, so a swept run that kept the first coefficients would fail above: the
    # two references themselves are tens of kelvin apart at the end
    assert abs(fresh[200.0].mean[-1] - fresh[1500.0].mean[-1]) > 10.0


def test_a_system_refuses_conditions_of_another_pattern():
    system = assemble(quench_model())
    oil = Convection(heat_transfer_coefficient=500.0, ambient=60.0)
    held = fem.FixedTemperature(60.0)
    with pytest.raises(ModelError, match="assemble the new model") as error:
        system.with_boundaries({"symmetry": Insulated("symmetry"), "right": oil, "top": held})
    assert error.value.argument == "boundaries"


def test_an_axisymmetric_model_rebuilt_with_replace_keeps_its_axis():
    """dataclasses.replace passes the checked boundaries (the axis as a tuple of conditions)
    back in: the model must build again and run the same."""
    import dataclasses

    from fem import Convection, Material, ThermalModel, solve
    from geometries import Section

    # A 10 x 20 mm rectangle against the axis (its left edge at r = 0 is the axis group).
    section = Section(Rectangle(0.01, 0.02), axisymmetric=True).mesh(0.004)
    air = Convection(heat_transfer_coefficient=50.0, ambient=20.0)
    groups = [g for g in section.edge_groups if g != "axis"]
    model = ThermalModel(
        section, Material(40.0, 7800.0, 460.0), {g: air for g in groups}, initial_temperature=300.0
    )
    rebuilt = dataclasses.replace(model, initial_temperature=300.0)
    first = solve(model, end_time=20.0, time_step=5.0)
    again = solve(rebuilt, end_time=20.0, time_step=5.0)
    assert np.array_equal(first.final_state, again.final_state)
