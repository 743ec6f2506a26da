"""The lumped hand method against the exact series, and the field fit beside it.

Readings are computed here from the exact series solutions of a plane wall and an infinite
cylinder cooled by convection (Incropera and DeWitt, Fundamentals of Heat and Mass Transfer,
6th ed., §5.5: plane wall eqs. 5.39–5.40 with ζ tan ζ = Bi, infinite cylinder eqs. 5.49–5.50
with ζ J1(ζ)/J0(ζ) = Bi; from memory), their roots found with scipy's brentq in this file.

At Fourier numbers above about 0.2 one term of the series carries the curve at every point:
θ ∝ exp(−ζ1²·Fo). An exponential fitted to a thermocouple's curve then has the time constant
L²/(ζ1²·α), while the lumped model's is ρcV/(hA). Reading h from the fitted τ as ρcV/(Aτ)
gives h_lumped/h = ζ1²/Bi for the wall (V/A = L) and ζ1²/(2·Bi) for the cylinder (V/A = R/2,
Bi = hR/k): at Bi = 1 the lumped reading is 26 % and 21 % low. The field fit, on the part's
own section, finds h itself.

Tolerances: the readings start at Fo = 0.5, where the second term is below 0.4 % of the first
(wall) and 0.1 % (cylinder) and decays 15–25 times faster, so the fitted τ is within 0.3 % of
the one-term value; the field fit carries the mesh's error in the slowest decay rate (P1, 10
elements through the wall, 1.5 mm on a 20 mm radius: under 0.5 %, bounded at 1.5 % with the
polygonal boundary's share).
"""

from pathlib import Path

import numpy as np
import pytest
from scipy.optimize import brentq
from scipy.special import j0, j1

from advisor.fitting.estimate import fit
from advisor.fitting.lumped_fit import exponential_fit, lumped_readings
from advisor.fitting.measured import read_measured
from advisor.fitting.parameters import build_parameters, parse_request
from advisor.fitting.problem import FitProblem
from fem import Convection, Insulated, Material, ThermalModel
from geometries import Circle, Rectangle, Section

CONDUCTIVITY, DENSITY, SPECIFIC_HEAT = 40.0, 7850.0, 500.0
DIFFUSIVITY = CONDUCTIVITY / (DENSITY * SPECIFIC_HEAT)
INITIAL, AMBIENT, SIZE, BIOT = 800.0, 20.0, 0.02, 1.0
H = BIOT * CONDUCTIVITY / SIZE  # 2000 W/(m²·K)


def wall_roots(biot: float, count: int) -> np.ndarray:
    """ζ tan ζ = Bi: one root in each (nπ, nπ + π/2)."""
    return np.array(
        [
            brentq(
                lambda z: z * np.tan(z) - biot, n * np.pi + 1e-12, n * np.pi + np.pi / 2 - 1e-12
            )
            for n in range(count)
        ]
    )


def cylinder_roots(biot: float, count: int) -> np.ndarray:
    """ζ J1(ζ) − Bi·J0(ζ) = 0, bracketed by a fine scan for sign changes."""
    z = np.linspace(1e-6, 40.0, 40001)
    f = z * j1(z) - biot * j0(z)
    starts = np.flatnonzero(np.sign(f[:-1]) != np.sign(f[1:]))[:count]
    return np.array([brentq(lambda x: x * j1(x) - biot * j0(x), z[i], z[i + 1]) for i in starts])


def wall_centre(fourier: np.ndarray) -> np.ndarray:
    zeta = wall_roots(BIOT, 12)
    c = 4 * np.sin(zeta) / (2 * zeta + np.sin(2 * zeta))
    return np.sum(c[:, None] * np.exp(-np.outer(zeta**2, fourier)), axis=0)


def cylinder_centre(fourier: np.ndarray) -> np.ndarray:
    zeta = cylinder_roots(BIOT, 12)
    c = 2 / zeta * j1(zeta) / (j0(zeta) ** 2 + j1(zeta) ** 2)
    return np.sum(c[:, None] * np.exp(-np.outer(zeta**2, fourier)), axis=0)


def centre_readings(tmp_path: Path, centre) -> Path:
    fourier = np.linspace(0.5, 3.0, 41)
    times = fourier * SIZE**2 / DIFFUSIVITY
    temperatures = AMBIENT + (INITIAL - AMBIENT) * centre(fourier)
    path = tmp_path / "centre.csv"
    rows = "".join(f"{t:.17g},{v:.17g}\n" for t, v in zip(times, temperatures, strict=True))
    path.write_text("time [s], centre [degC]\n" + rows)
    return path


def field_fit(model: ThermalModel, path: Path):
    measured = read_measured(path, model.probes)
    parameters = build_parameters(
        [parse_request("h:face")],
        dict(model.boundaries),
        end_time=float(measured.times[-1]),
        temperature_range=(AMBIENT, INITIAL),
    )
    problem = FitProblem(model, parameters, measured, time_step=0.25)
    result = fit(problem)
    return result, lumped_readings(problem, result.values)


STEEL = Material(CONDUCTIVITY, DENSITY, SPECIFIC_HEAT)


def test_wall_lumped_reading_is_biased_as_the_series_says_and_the_field_fit_is_not(tmp_path):
    zeta1 = wall_roots(BIOT, 1)[0]
    path = centre_readings(tmp_path, wall_centre)
    curves = read_measured(path, {"centre": (0.0, 0.0)})
    tau, _, _ = exponential_fit(curves.times, curves.readings["centre"], AMBIENT)
    lumped_h = DENSITY * SPECIFIC_HEAT * SIZE / tau  # V/A = L
    assert tau == pytest.approx(SIZE**2 / (zeta1**2 * DIFFUSIVITY), rel=3e-3)
    assert lumped_h / H == pytest.approx(zeta1**2 / BIOT, rel=3e-3)  # 0.740: 26 % low

    strip = Rectangle(
        SIZE,
        0.004,
        edge_names={"left": "centre", "right": "face", "top": "sides", "bottom": "sides"},
    ).mesh(size=0.002)
    model = ThermalModel(
        strip,
        STEEL,
        {
            "centre": Insulated("symmetry"),
            "sides": Insulated(),
            "face": Convection(500.0, AMBIENT),
        },
        INITIAL,
        probes={"centre": (0.0, 0.002)},
    )
    result, readings = field_fit(model, path)
    assert result.values[0] == pytest.approx(H, rel=0.01)
    reading = readings[0]
    assert reading.biot == pytest.approx(BIOT, rel=0.01)
    assert reading.bias == pytest.approx(zeta1**2 / BIOT - 1.0, abs=0.01)


def test_cylinder_lumped_reading_is_biased_as_the_series_says_and_the_field_fit_is_not(tmp_path):
    zeta1 = cylinder_roots(BIOT, 1)[0]
    path = centre_readings(tmp_path, cylinder_centre)
    curves = read_measured(path, {"centre": (0.0, 0.0)})
    tau, _, _ = exponential_fit(curves.times, curves.readings["centre"], AMBIENT)
    lumped_h = DENSITY * SPECIFIC_HEAT * (SIZE / 2) / tau  # V/A = R/2
    assert lumped_h / H == pytest.approx(zeta1**2 / (2 * BIOT), rel=3e-3)  # 0.792: 21 % low

    quarter = Circle(SIZE, name="face").symmetry_cut((0, 0), (1, 0)).symmetry_cut((0, 0), (0, 1))
    model = ThermalModel(
        quarter.mesh(size=0.0015),
        STEEL,
        {"symmetry": Insulated("symmetry"), "face": Convection(500.0, AMBIENT)},
        INITIAL,
        probes={"centre": (0.0, 0.0)},
    )
    result, readings = field_fit(model, path)
    assert result.values[0] == pytest.approx(H, rel=0.015)
    assert readings[0].bias == pytest.approx(zeta1**2 / (2 * BIOT) - 1.0, abs=0.015)


def test_thermocouple_junction_worked_example(tmp_path):
    # Incropera and DeWitt, Fundamentals of Heat and Mass Transfer, 6th ed., Example 5.1
    # (from memory): a thermocouple junction, a sphere of D = 0.706 mm with k = 20 W/(m·K),
    # ρ = 8500 kg/m³, c = 400 J/(kg·K), put at 25 °C into a gas at 200 °C with
    # h = 400 W/(m²·K), has a time constant of 1 s and reaches 199 °C after 5.2 s;
    # Bi = h(D/6)/k = 2.35e-3. Read backwards, that heating history is a measurement from
    # which the lumped method gives h: the readings at 0 s, at τ = 1 s (63.2 % of the
    # change) and at 5.2 s give h within the rounding of 5.2 s (exactly 5.165 s: 0.7 %).
    diameter, k, rho, c, gas, start = 0.706e-3, 20.0, 8500.0, 400.0, 200.0, 25.0
    times = np.array([0.0, 1.0, 5.2])
    readings = np.array([start, gas - (gas - start) * np.exp(-1.0), 199.0])
    path = tmp_path / "junction.csv"
    rows = "".join(f"{t:g},{v:.6f}\n" for t, v in zip(times, readings, strict=True))
    path.write_text("time [s], junction [degC]\n" + rows)
    tau, _, _ = exponential_fit(times, readings, gas)
    lumped_h = rho * c * (diameter / 6) / tau
    assert lumped_h == pytest.approx(400.0, rel=0.01)
    assert 400.0 * (diameter / 6) / k == pytest.approx(2.35e-3, rel=0.01)

    # The field fit on the sphere (axisymmetric half-disc) agrees: at Bi = 0.002 the lumped
    # model is exact to about Bi/5, so field and lumped readings agree within 0.5 %.
    sphere = Section(
        Circle(diameter / 2, name="face").symmetry_cut((0, 0), (1, 0)), axisymmetric=True
    ).mesh(size=diameter / 25)
    model = ThermalModel(
        sphere,
        Material(k, rho, c),
        {"face": Convection(100.0, gas)},
        start,
        probes={"junction": (0.0, 0.0)},
    )
    measured = read_measured(path, model.probes)
    parameters = build_parameters(
        [parse_request("h:face")],
        dict(model.boundaries),
        end_time=5.2,
        temperature_range=(25, 200),
    )
    problem = FitProblem(model, parameters, measured, time_step=0.01)
    result = fit(problem)
    assert result.values[0] == pytest.approx(400.0, rel=0.015)
    bias = lumped_readings(problem, result.values)[0].bias
    assert abs(bias) < 0.005, bias
