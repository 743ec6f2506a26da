"""Furnace ramps, staged targets and how a run ended, against exact solutions computed here.

References (all computed in this file, none by the code under test):

- The plane wall's step response, θ* = Σ C_n exp(−ζ_n² Fo) cos(ζ_n x*) (Incropera, DeWitt,
  Bergman & Lavine, *Fundamentals of Heat and Mass Transfer*, 6th ed., §5.5.1; Carslaw &
  Jaeger, *Conduction of Heat in Solids*, 2nd ed., §3.10 — from memory), through
  ``tests/exact_series.py``.
- A furnace ramp by Duhamel's superposition of that step response (Carslaw & Jaeger, 2nd ed.,
  §1.14, from memory): for an ambient T∞(t) = T1 + r·min(t, t_r) after a start at T0,

      T(x, t) = T0 + (T1 − T0)·(1 − θ*(x, t)) + r·∫₀^min(t, t_r) (1 − θ*(x, t − s)) ds,

  whose integral is closed form term by term (∫ exp(−ζ²α(t − s)/L²) ds).
- The lumped balance ρ·c·V·dT/dt = h·A·(T∞(t) − T), solved here with scipy's ``solve_ivp``,
  and the lumped exponential exp(−t/τ), τ = ρcV/(hA) (Incropera et al., 6th ed., §5.1,
  eq. 5.6 — from memory).

Tolerances: a P1 wall of L/20 elements (nodal error O((L/20)²), about 0.1 % of the driving
difference at these Biot numbers) and the default adaptive Crank–Nicolson step: times to
target within 0.1 % are asked (measured: 1.1e-4 for the ramp, 6e-5 for the two stages). The
lumped balance is integrated by both sides to 1e-9, so 1e-5 is asked of it; the lumped
exponential's stage times are read from its curve on a grid of 4000 intervals, linearly
interpolated (measured 8e-8), so 1e-5 is asked.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from exact_series import plane_wall_coefficients, plane_wall_profile, plane_wall_roots
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from advisor import AdvisorError
from advisor.analysis.stages import Stage, arrival, check_stages
from advisor.pipeline import run_model
from advisor.time_words import duration_text
from fem import Convection, Insulated, Material, StopWhen, ThermalModel
from fem.events import stop_reason
from fem.schedules import PiecewiseLinear
from geometries import Rectangle

# An invented steel slab, half-thickness L, heated on one face (the other is its mid-plane).
L = 0.05  # m
STEEL = Material(conductivity=40.0, density=7850.0, specific_heat=500.0)
ALPHA = 40.0 / (7850.0 * 500.0)  # m^2/s
H = 100.0  # W/(m^2*K): Bi = h L / k = 0.125
START, FIRST, LAST, RAMP = 20.0, 200.0, 860.0, 5400.0  # degC, degC, degC, s (90 min)
SOAK = 845.0  # degC: the soak target, 15 K below the furnace's final temperature
END = 4 * 3600.0  # s
TERMS = 60


def slab(fluid: Convection, initial: float) -> ThermalModel:
    strip = Rectangle(
        0.005,
        L,
        edge_names={"bottom": "symmetry", "top": "exposed", "left": "ends", "right": "ends"},
    )
    return ThermalModel(
        strip.mesh(L / 20),
        STEEL,
        boundaries={"symmetry": Insulated("symmetry"), "ends": Insulated(), "exposed": fluid},
        initial_temperature=initial,
        probes={"core": (0.0025, 0.0)},
    )


def ramped_core(t: float) -> float:
    """The exact mid-plane temperature under the ramped furnace (Duhamel), °C."""
    biot = H * L / STEEL.conductivity
    roots = plane_wall_roots(biot, TERMS)
    weights = plane_wall_coefficients(roots)  # cos(0) = 1 at the mid-plane
    step = float(weights @ np.exp(-(roots**2) * ALPHA * t / L**2))
    held = min(t, RAMP)
    decay = L**2 / (roots**2 * ALPHA)
    late = np.exp(-(roots**2) * ALPHA * (t - held) / L**2) - np.exp(-(roots**2) * ALPHA * t / L**2)
    rate = (LAST - FIRST) / RAMP
    return START + (FIRST - START) * (1 - step) + rate * (held - float(weights @ (decay * late)))


def lumped_ramp_arrival(target: float) -> float:
    """The lumped balance under the ramp, solved here; when it reaches ``target``, s."""
    rate = H / (STEEL.density * STEEL.specific_heat * L)  # h·A/(ρ·c·V), V/A = L

    def balance(t, y):
        return [rate * (float(np.interp(t, (0.0, RAMP), (FIRST, LAST))) - y[0])]

    def reached(t, y):
        return y[0] - target

    result = solve_ivp(
        balance, (0.0, END), [START], method="LSODA", events=reached, rtol=1e-10, atol=1e-10,
        max_step=RAMP / 200,
    )  # fmt: skip
    return float(result.t_events[0][0])


@pytest.fixture(scope="module")
def furnace_run():
    furnace = PiecewiseLinear((0.0, RAMP), (FIRST, LAST))
    model = slab(Convection(heat_transfer_coefficient=H, ambient=furnace), START)
    return run_model(
        model,
        END,
        run_options={"stop": StopWhen("core", SOAK)},
        advisor_options={"target": SOAK, "quantity": "time_to_target"},
    ).assessment


def test_furnace_ramp_is_judged_against_where_the_furnace_ends(furnace_run):
    """The target lies above the furnace's first temperature: accepted, and every fraction is
    of the 840 K towards the final furnace temperature."""
    a = furnace_run
    assert a.lumped.equilibrium == pytest.approx(LAST, abs=1e-9)
    assert a.heating  # towards 860 degC
    error = a.errors["classical vs slowest"]
    assert error.fraction == pytest.approx(error.largest / (LAST - START), rel=1e-12)


def test_ramp_time_to_soak_against_duhamel_and_the_lumped_ode(furnace_run):
    exact = brentq(lambda t: ramped_core(t) - SOAK, RAMP, END, xtol=1e-6)
    field = furnace_run.time_to_target["probe:core"]
    assert field == pytest.approx(exact, rel=1e-3)
    assert furnace_run.time_to_target["slowest"] == pytest.approx(exact, rel=1e-3)
    lumped = lumped_ramp_arrival(SOAK)
    assert furnace_run.time_to_target["classical"] == pytest.approx(lumped, rel=1e-5)
    # the lumped estimate says "soaked" early for the core: the direction the advisor names
    assert furnace_run.time_to_target["classical"] < exact


def test_the_stop_reason_is_stated(furnace_run):
    a = furnace_run
    assert a.solution.stop_reason.startswith("stopped at ")
    assert "probe 'core' reached 845 °C" in a.solution.stop_reason
    # the same words, the time said for a person
    assert a.ending.startswith(f"stopped at {duration_text(a.solution.stop_time)}: probe 'core'")
    assert "the slowest point reached the target 845 °C" in a.ending


def test_end_time_reached_without_the_target_is_stated():
    furnace = PiecewiseLinear((0.0, RAMP), (FIRST, LAST))
    model = slab(Convection(heat_transfer_coefficient=H, ambient=furnace), START)
    a = run_model(
        model,
        RAMP,
        run_options={"stop": StopWhen("core", SOAK)},
        advisor_options={"target": SOAK},
    ).assessment
    assert a.solution.stop_time is None
    assert a.ending.startswith(f"end time reached ({duration_text(RAMP)})")
    assert "the stop condition (probe 'core' reaching 845 °C) was not met" in a.ending
    assert a.ending.endswith("target 845 °C not reached at the slowest point")
    assert stop_reason(None, None, 60.0) == "end time reached (60 s)"


# A two-stage cooling rule on the wall at Bi = 0.1: from 80 degC to 50 degC by a deadline,
# then to 30 degC within a further time (an invented rule of the common two-stage form).
COOL_BIOT = 0.1
HOT, AIR = 80.0, 20.0


def centre_time(theta: float) -> float:
    """When the exact mid-plane reaches (T − T∞)/(T0 − T∞) = ``theta``, s."""
    fourier = brentq(lambda fo: plane_wall_profile(COOL_BIOT, fo, 0.0, terms=TERMS) - theta,
                     1e-3, 200.0, xtol=1e-12)  # fmt: skip
    return fourier * L**2 / ALPHA


@pytest.fixture(scope="module")
def two_stage():
    h = COOL_BIOT * STEEL.conductivity / L
    model = slab(Convection(heat_transfer_coefficient=h, ambient=AIR), HOT)
    first, second = centre_time(0.5), centre_time(1 / 6)
    stages = (
        Stage(50.0, by=1.05 * first, at="core"),
        Stage(30.0, within=0.97 * (second - first), at="core"),
    )
    run = run_model(model, 1.5 * second, advisor_options={"stages": stages}).assessment
    return run, first, second, h


def test_two_stage_rule_against_the_exact_series(two_stage):
    run, first, second, _ = two_stage
    met, missed = run.stages
    assert met.status == "met" and met.passed is True
    assert met.reached == pytest.approx(first, rel=1e-3)
    assert met.margin == pytest.approx(0.05 * first, abs=1e-3 * first)
    assert missed.status == "missed" and missed.passed is False
    assert missed.start == pytest.approx(met.reached, rel=1e-12)
    assert missed.reached == pytest.approx(second, rel=1e-3)
    assert missed.margin == pytest.approx(-0.03 * (second - first), abs=1e-3 * second)


def test_two_stage_rule_on_the_lumped_exponential(two_stage):
    run, first, second, h = two_stage
    tau = STEEL.density * STEEL.specific_heat * L / h
    met, missed = run.stages
    # the lumped exponential reaches 50 and then 30 degC at τ·ln 2 and τ·ln 6
    assert met.lumped["classical"] == pytest.approx(tau * math.log(2.0), rel=1e-5)
    assert missed.lumped["classical"] == pytest.approx(tau * math.log(6.0), rel=1e-5)
    # it runs ahead of the core: it passes the second stage the field misses
    assert missed.lumped_passed["classical"] is True


def test_stage_requests_are_checked():
    with pytest.raises(AdvisorError, match="exactly one deadline"):
        check_stages([Stage(50.0)])
    with pytest.raises(AdvisorError, match="positive time"):
        check_stages([Stage(50.0, by=-1.0)])
    with pytest.raises(AdvisorError, match="earlier than the deadline"):
        check_stages([Stage(50.0, by=100.0), Stage(30.0, by=50.0)])
    with pytest.raises(AdvisorError, match=r"\['slowest', 'mean', 'core'\]"):
        check_stages([Stage(50.0, by=10.0, at="centre")], probes=("core",))


def test_arrival_from_a_stage_start():
    times = np.array([0.0, 1.0, 2.0, 3.0, 4.0])
    falling = np.array([80.0, 60.0, 40.0, 20.0, 0.0])
    assert arrival(times, falling, 0.0, 50.0) == pytest.approx(1.5)
    assert arrival(times, falling, 2.5, 10.0) == pytest.approx(3.5)
    assert arrival(times, falling, 0.0, 90.0) is None


CASE = """
title = "slab in a ramped furnace"
[section]
mesh_size = "5 mm"
[[section.shape]]
kind = "rectangle"
width = "5 mm"
height = "50 mm"
edges = { bottom = "mid_plane", top = "exposed", left = "ends", right = "ends" }
[material]
conductivity = "40 W/(m*K)"
density = "7850 kg/m^3"
specific_heat = "500 J/(kg*K)"
[boundaries.mid_plane]
insulated = "symmetry"
[boundaries.ends]
insulated = true
[boundaries.exposed]
convection = { coefficient = "100 W/(m^2*K)", ambient = { linear = [["0 min", "200 degC"], \
["90 min", "860 degC"]] } }
[initial]
temperature = "20 degC"
[probes]
core = ["2.5 mm", "0 mm"]
[run]
end_time = "4 h"
[advisor]
target = "845 degC"
[[advisor.stages]]
reach = "600 degC"
by = "2 h"
[[advisor.stages]]
reach = "845 degC"
within = "1 h"
at = "core"
"""


def test_case_file_stages(tmp_path):
    from advisor.casefile import CaseError, load_case

    path = tmp_path / "ramp.toml"
    path.write_text(CASE, encoding="utf-8")
    stages = load_case(path).advisor_options["stages"]
    assert stages == (Stage(600.0, by=7200.0), Stage(845.0, within=3600.0, at="core"))
    path.write_text(CASE.replace('at = "core"', 'at = "cor"'), encoding="utf-8")
    line = CASE.splitlines().index('at = "core"') + 1
    with pytest.raises(CaseError, match=rf"line {line}: advisor\.stages\[1\]\.at: .*'core'"):
        load_case(path)
    path.write_text(CASE.replace('within = "1 h"', 'within = "1 h"\nby = "3 h"'), encoding="utf-8")
    with pytest.raises(CaseError, match=r"advisor\.stages\[1\]\.by: needs exactly one deadline"):
        load_case(path)


def test_the_quick_check_accepts_a_ramp_target():
    """The quick check judges the same furnace ramp by where it ends: the soak target above
    the furnace's first temperature is accepted and the lumped model heads for 860 °C;
    without the run's end it is refused, as a target beyond the first ambient is."""
    from advisor import quick_check
    from advisor.errors import AdvisorError

    furnace = PiecewiseLinear((0.0, RAMP), (FIRST, LAST))
    model = slab(Convection(heat_transfer_coefficient=H, ambient=furnace), START)
    check = quick_check(model, target=SOAK, end_time=END)
    assert check.lumped.equilibrium == pytest.approx(LAST, abs=1e-9)
    with pytest.raises(AdvisorError):
        quick_check(model, target=SOAK)
