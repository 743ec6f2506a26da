"""A coefficient that follows the surface temperature (a quench through film and nucleate
boiling) against an independent 1-D solution of the same infinite cylinder.

The section is an axisymmetric strip of the cylinder (r from the axis to R, insulated ends), so
the field is radial. The reference is computed here: a method-of-lines solution of
ρc ∂T/∂t = (1/r) ∂/∂r (k r ∂T/∂r) with −k ∂T/∂r = q(T_s) at r = R, on 400 finite volumes
(second order), integrated by scipy's ``solve_ivp`` (BDF, rtol 1e-9), with the curve
interpolated here by ``numpy.interp`` (not by the code under test). The curve is invented: a
vapour film at 300 W/(m²·K) above 550 °C, its collapse to 3000 W/(m²·K) at 500 °C (a 10× jump
over 50 K), a nucleate peak of 4000 W/(m²·K) at 300 °C and 1200 W/(m²·K) at the bath.
"""

from __future__ import annotations

import numpy as np
import pytest
import scipy.sparse as sp
from scipy.integrate import solve_ivp

from fem import (
    Insulated,
    Material,
    SurfaceCurve,
    SurfaceTemperatureConvection,
    ThermalModel,
    solve,
)
from geometries import Rectangle, Section

RADIUS, HEIGHT, SIZE = 0.015, 0.002, 0.0005  # m
STEEL = Material(30.0, 7850.0, 600.0)  # invented, steel-like
HOT, BATH = 850.0, 60.0  # degC
SURFACE = (60.0, 300.0, 500.0, 550.0, 900.0)  # degC
COEFFICIENT = (1200.0, 4000.0, 3000.0, 300.0, 300.0)  # W/(m^2 K)
CALM = (60.0, 300.0, 500.0, 550.0, 900.0), (800.0, 2500.0, 2000.0, 250.0, 250.0)
AGITATION = 20.0  # s: from here the agitated curve COEFFICIENT applies
END = 150.0  # s
TIMES = np.array([10.0, 30.0, 60.0, 100.0, 150.0])


def table_flux(temperature, form: str, time: float) -> float:
    """The heat flux leaving the surface, W/m², as the reference reads the curve."""
    if form == "heat_flux":
        fluxes = np.array(COEFFICIENT) * (np.array(SURFACE) - BATH)
        return float(np.interp(temperature, SURFACE, fluxes))
    surface, values = (SURFACE, COEFFICIENT)
    if form == "staged" and time < AGITATION:
        surface, values = CALM
    return float(np.interp(temperature, surface, values)) * (temperature - BATH)


def condition(form: str) -> SurfaceTemperatureConvection:
    if form == "coefficient":
        return SurfaceTemperatureConvection(SurfaceCurve(SURFACE, COEFFICIENT), BATH)
    fluxes = tuple(h * (t - BATH) for t, h in zip(SURFACE, COEFFICIENT, strict=True))
    if form == "heat_flux":
        return SurfaceTemperatureConvection(SurfaceCurve(SURFACE, fluxes, "heat_flux"), BATH)
    if form == "function":  # h(T_s) as a Python function: the same curve as "coefficient"
        return SurfaceTemperatureConvection(lambda t: np.interp(t, SURFACE, COEFFICIENT), BATH)
    stages = ((0.0, SurfaceCurve(*CALM)), (AGITATION, SurfaceCurve(SURFACE, COEFFICIENT)))
    return SurfaceTemperatureConvection(stages, BATH)


def cylinder_model(form: str) -> ThermalModel:
    profile = Rectangle(
        RADIUS, HEIGHT, edge_names={"right": "quenched", "top": "ends", "bottom": "ends"}
    )
    return ThermalModel(
        Section(profile, axisymmetric=True).mesh(SIZE),
        STEEL,
        {"quenched": condition(form), "ends": Insulated()},
        initial_temperature=HOT,
        probes={"centre": (0.0, HEIGHT / 2), "surface": (RADIUS, HEIGHT / 2)},
    )


def method_of_lines(form: str, cells: int = 400):
    """Centre and surface temperature of the cylinder at TIMES (the independent reference)."""
    k, rho_c = STEEL.conductivity, STEEL.density * STEEL.specific_heat
    dr = RADIUS / cells
    r = np.linspace(0.0, RADIUS, cells + 1)
    outer = np.minimum(r + dr / 2, RADIUS)
    inner = np.maximum(r - dr / 2, 0.0)
    volume = (outer**2 - inner**2) / 2  # per radian and metre
    face = r[:-1] + dr / 2

    def rate(time, u):
        flow = np.zeros_like(u)
        conducted = k * face * np.diff(u) / dr  # into node j from node j + 1
        flow[:-1] += conducted
        flow[1:] -= conducted
        flow[-1] -= RADIUS * table_flux(u[-1], form, time)
        return flow / (rho_c * volume)

    sparsity = sp.diags([1.0, 1.0, 1.0], [-1, 0, 1], shape=(cells + 1,) * 2)
    pieces, start, state = [], 0.0, np.full(cells + 1, HOT)
    for stop in (AGITATION, END):  # integrate across the stage change, not over it
        wanted = TIMES[(TIMES > start) & (TIMES <= stop)]
        result = solve_ivp(
            rate,
            (start, stop),
            state,
            method="BDF",
            t_eval=np.unique(np.append(wanted, stop)),
            rtol=1e-9,
            atol=1e-6,
            jac_sparsity=sparsity,
        )
        assert result.success
        keep = np.isin(result.t, wanted)
        pieces.append(result.y[:, keep])
        start, state = stop, result.y[:, -1]
    u = np.hstack(pieces)
    return u[0], u[-1]


@pytest.mark.parametrize("form", ["coefficient", "heat_flux", "staged", "function"])
def test_quench_matches_method_of_lines(form):
    solution = solve(cylinder_model(form), END, output_times=TIMES)  # default settings
    centre, surface = method_of_lines(form)
    rows = np.searchsorted(solution.times, TIMES)
    assert np.allclose(solution.times[rows], TIMES)
    span = HOT - BATH
    centre_error = np.abs(solution.probes["centre"][rows] - centre).max() / span
    surface_error = np.abs(solution.probes["surface"][rows] - surface).max() / span
    # Required 0.5 % of the 790 K span at the centre and the surface. Measured (centre,
    # surface): coefficient table 0.024 %, 0.038 % (a function h(T_s): the same); flux table
    # 0.017 %, 0.047 %; staged 0.13 %, 0.36 % (the stage change is a jump in h the adaptive
    # steps restart at).
    assert centre_error < 0.005
    assert surface_error < 0.005
    assert solution.checks.energy_balance_error <= 1e-6
    assert solution.stats.newton_iterations > solution.stats.steps  # it was nonlinear
    if form == "staged":
        assert AGITATION in set(cylinder_model(form).boundaries["quenched"][0].breakpoints(END))


def test_linearised_coefficient_follows_the_curve():
    # The lumped model and the Biot numbers take h(T) at the temperature they ask for: the
    # table read by numpy.interp here; for the flux table, q/(T − T∞).
    for form in ("coefficient", "heat_flux"):
        kind = condition(form)
        for temperature in (100.0, 420.0, 525.0, 800.0):
            expected = table_flux(temperature, form, 0.0) / (temperature - BATH)
            line = kind.linearised(temperature, 0.0)
            assert line.coefficient == pytest.approx(expected, rel=1e-12)
            assert line.ambient == BATH


def test_a_coefficient_function_that_gives_nan_is_named():
    # A function that is undefined below 400 °C (NaN), met as the surface cools through it:
    # the run stops with the function and the temperature, not inside a factorisation.
    from fem import ModelError

    def film_only(surface):
        surface = np.asarray(surface, dtype=float)
        return np.where(surface < 400.0, np.nan, 500.0)

    section = Rectangle(0.02, 0.01, edge_names={"top": "cooled"}).mesh(0.002)
    others = {name: Insulated() for name in section.edge_groups if name != "cooled"}
    cooled = SurfaceTemperatureConvection(film_only, 20.0)
    model = ThermalModel(
        section, Material(40.0, 7800.0, 500.0), {"cooled": cooled, **others}, 800.0
    )
    for settings in ({"time_step": 5.0}, {}):  # fixed steps (surface condensation), adaptive
        with pytest.raises(ModelError, match=r"'film_only' gave h = nan .* at a surface") as e:
            solve(model, 600.0, **settings)
        surface = float(str(e.value).split("surface temperature of ")[1].split(" °C")[0])
        assert surface < 400.0
