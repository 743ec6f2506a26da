"""The advisor refuses requests it cannot answer, naming the value and what would be valid."""

import numpy as np
import pytest

from advisor import AdvisorError, LumpedModel, assess, biot_numbers
from fem import Convection, Insulated, Material, ModelError, ThermalModel, solve
from geometries import Rectangle

STEEL = Material(40.0, 7850.0, 520.0)


@pytest.fixture(scope="module")
def quench():
    section = Rectangle(0.02, 0.01).mesh(size=0.0025)
    oil = Convection(heat_transfer_coefficient=400.0, ambient=60.0)
    model = ThermalModel(
        section, STEEL, {s: oil for s in ("left", "right", "top", "bottom")}, 850.0
    )
    return solve(model, end_time=300.0, time_step=5.0)


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"target": 900.0}, r"strictly between .*\(60, 850\) degC, got 900.0"),
        ({"target": 60.0}, "strictly between"),
        ({"tolerance": 0.0}, r"tolerance must be a fraction in \(0, 1\), got 0.0"),
        ({"tolerance": 5}, "tolerance must be a fraction"),
        ({"quantity": "core"}, r"quantity must be one of \('slowest', 'mean', .*\), got 'core'"),
        ({"quantity": "time_to_target"}, "needs a target temperature"),
    ],
)
def test_bad_requests_are_refused(quench, kwargs, message):
    with pytest.raises(AdvisorError, match=message):
        assess(quench, **kwargs)


def test_a_part_that_exchanges_no_heat_has_no_lumped_model():
    section = Rectangle(
        0.02, 0.01, edge_names=dict.fromkeys(("left", "right", "top", "bottom"), "wall")
    ).mesh(size=0.005)
    model = ThermalModel(section, STEEL, {"wall": Insulated()}, 100.0)
    with pytest.raises(AdvisorError, match="no edge that exchanges heat"):
        LumpedModel.of(model)
    with pytest.raises(AdvisorError, match="no edge that exchanges heat"):
        biot_numbers(model)


def test_model_refuses_missing_and_unknown_edge_groups():
    section = Rectangle(0.02, 0.01).mesh(size=0.005)
    air = Convection(20.0, 25.0)
    with pytest.raises(ModelError, match=r"edge group\(s\) \['top'\] have no boundary"):
        ThermalModel(section, STEEL, {s: air for s in ("left", "right", "bottom")}, 100.0)
    with pytest.raises(ModelError, match=r"\['roof'\] that the section does not have"):
        ThermalModel(
            section, STEEL, {s: air for s in ("left", "right", "bottom", "top", "roof")}, 100.0
        )


@pytest.mark.parametrize(
    ("make", "message"),
    [
        (lambda: Material(-1.0, 7850.0, 500.0), r"conductivity must be .* > 0 W/\(m\*K\)"),
        (lambda: Convection(0.0, 20.0), "heat_transfer_coefficient must be"),
        (lambda: Convection(10.0, -300.0), "above -273.15 degC, got -300.0"),
        (lambda: Insulated("adiabatic"), "'insulated', 'symmetry' or 'axis', got 'adiabatic'"),
    ],
)
def test_bad_physical_values_are_refused(make, message):
    with pytest.raises(ModelError, match=message):
        make()


def test_probe_outside_the_section_is_refused():
    section = Rectangle(0.02, 0.01).mesh(size=0.005)
    air = Convection(20.0, 25.0)
    with pytest.raises(ModelError, match=r"probe 'outside' at \(0.05, 0.0\) m lies outside"):
        ThermalModel(
            section,
            STEEL,
            {s: air for s in ("left", "right", "bottom", "top")},
            100.0,
            probes={"outside": (0.05, 0.0)},
        )


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"end_time": 0.0}, "end_time must be a finite time > 0 s, got 0.0"),
        ({"end_time": 10.0, "time_step": 20.0}, r"time_step must be a time in \(0, end_time"),
        ({"end_time": 10.0, "output_interval": -1.0}, "output_interval must be"),
        ({"end_time": 10.0, "startup_steps": -1}, "startup_steps must be a whole number"),
    ],
)
def test_bad_run_controls_are_refused(quench, kwargs, message):
    with pytest.raises(ModelError, match=message):
        solve(quench.model, **kwargs)


@pytest.mark.parametrize(
    ("end_time", "time_step", "output_interval"),
    [
        (np.int64(300), np.float32(0.7), np.float32(7.0)),
        (np.float32(300.0), np.float32(0.7), np.float32(7.0)),
    ],
)
def test_run_controls_accept_numpy_scalars(quench, end_time, time_step, output_interval):
    # Run controls often arrive as numpy scalars (an element of a sweep's array, a value read
    # from a file). They must give the run of the plain floats of the same value:
    # float(np.float32(0.7)) = 0.699999988..., so the step fitted into the 7 s outputs is
    # 0.69767... s in both. Both runs then do the same float64 arithmetic on the same values,
    # so the times must agree to round-off: 1e-12 relative, far below one float32 ulp (6e-8).
    plain = solve(
        quench.model,
        float(end_time),
        time_step=float(time_step),
        output_interval=float(output_interval),
    )
    numpy_run = solve(quench.model, end_time, time_step=time_step, output_interval=output_interval)
    assert len(numpy_run.times) == len(plain.times)
    np.testing.assert_allclose(numpy_run.times, plain.times, rtol=1e-12, atol=0.0)
    np.testing.assert_allclose(numpy_run.output_times, plain.output_times, rtol=1e-12, atol=0.0)
    assert numpy_run.stats.time_step == pytest.approx(plain.stats.time_step, rel=1e-12)
    assert numpy_run.stats.steps == plain.stats.steps
