"""The quench and freezing readings wired through a case file and :func:`advisor.assess`.

The readings themselves are checked against closed forms in ``test_quench_outputs.py`` and
``test_freezing_estimates.py``. Here a quarter of a quenched bar (invented scenario) is solved
and the readings at its slowest point, the centre, are compared with the exact product
solution of two plane walls (Incropera et al., *Fundamentals of Heat and Mass Transfer*, 6th
ed., §5.8, product solutions, from memory), summed here with ``tests/exact_series.py``.
"""

from __future__ import annotations

import numpy as np
import pytest
from exact_series import plane_wall_coefficients, plane_wall_roots
from scipy.optimize import brentq, minimize_scalar

from advisor.analysis.assessment import assess, check_request
from advisor.analysis.freezing import FreezingProduct, plank_time
from advisor.casefile.case import CaseError, case_from_toml
from advisor.casefile.starters import starter_text
from advisor.errors import AdvisorError
from advisor.pipeline import run_case

BAR = starter_text("quench-bar")
K, RHO, C, H, START, BATH = 40.0, 7850.0, 520.0, 30.0, 850.0, 60.0
HALF_WIDTHS = (0.030, 0.020)


def small_bar(extra: str) -> str:
    """The quench-bar starter with a coarse mesh, a weak coefficient (Bi = 0.015 and 0.0225
    on the half-widths) and the given ``[advisor]`` lines added."""
    text = BAR.replace('mesh_size = "1 mm"', 'mesh_size = "4 mm"')
    text = text.replace('coefficient = "400 W/(m^2*K)"', 'coefficient = "30 W/(m^2*K)"')
    text = text.replace('end_time = "10 min"', 'end_time = "1 h"')
    text = text.replace('time_step = "1 s"', 'time_step = "2 s"')
    return text.replace('quantity = "slowest"', 'quantity = "slowest"\n' + extra)


def centre(time: float) -> tuple[float, float]:
    """Exact centre temperature (°C) and its rate (K/s): θ = θ_x·θ_y, 40 terms each (the
    omitted terms are below 1e-12 after the first second)."""
    alpha = K / (RHO * C)
    parts, slopes = [], []
    for half in HALF_WIDTHS:
        roots = plane_wall_roots(H * half / K, 40)
        terms = plane_wall_coefficients(roots) * np.exp(-(roots**2) * alpha * time / half**2)
        parts.append(terms.sum())
        slopes.append((-(roots**2) * alpha / half**2 * terms).sum())
    drive = START - BATH
    return BATH + drive * parts[0] * parts[1], drive * (
        slopes[0] * parts[1] + parts[0] * slopes[1]
    )


def exact_time(temperature: float) -> float:
    return brentq(lambda t: centre(t)[0] - temperature, 1e-3, 1e5, xtol=1e-9)


def test_case_keys_reach_the_assessment_and_match_the_product_solution():
    """Tolerances: P1 on 4 mm and Crank–Nicolson at 2 s put the centre within 0.03 K of the
    exact one (measured 0.02 K at 400 °C); that is 1e-4 of a time or rate scale, and 1e-3 is
    allowed. The largest rate sits where the rate is flat, so its temperature is fixed only to
    within a step's change (0.9 K at 2 s): 1 K allowed."""
    case = case_from_toml(
        small_bar('times_to = ["500 degC", "300 degC"]\ncooling_range = ["800 degC", "500 degC"]')
    )
    assert case.advisor_options["times_to"] == (500.0, 300.0)
    assert case.advisor_options["cooling_range"] == (800.0, 500.0)
    assessment = run_case(case).assessment
    quench = assessment.quench
    assert quench is not None and quench.cooling
    assert set(quench.curves) == {"slowest", "probe:core", "probe:face_centre"}
    slowest = quench.curves["slowest"]
    for target in (500.0, 300.0):
        assert slowest.times_to[target] == pytest.approx(exact_time(target), rel=1e-3)
    assert slowest.range_time == pytest.approx(exact_time(500.0) - exact_time(800.0), rel=1e-3)
    i = int(np.searchsorted(-slowest.temperatures, -400.0))
    exact_rate = -centre(float(assessment.solution.times[i]))[1]
    assert slowest.rates[i] == pytest.approx(exact_rate, rel=1e-3)
    peak = minimize_scalar(
        lambda t: centre(t)[1], bounds=(1.0, 300.0), method="bounded", options={"xatol": 1e-6}
    )
    assert slowest.largest_rate == pytest.approx(-peak.fun, rel=1e-3)
    assert slowest.largest_rate_temperature == pytest.approx(centre(peak.x)[0], abs=1.0)


@pytest.mark.parametrize(
    ("line", "phrase"),
    [
        ('cooling_range = ["800 degC"]', "two temperatures"),
        ('times_to = "500 degC"', "a list of temperatures"),
        ('times_to = ["500 kg"]', "temperature"),
        ("cooling_rates = 3", "true or false"),
        ('cooling_range = ["500 degC", "800 degC"]', "must fall"),
    ],
)
def test_bad_quench_keys_are_refused_with_their_key(line, phrase):
    with pytest.raises((CaseError, AdvisorError), match=phrase):
        case = case_from_toml(small_bar(line))
        check_request(case.model(), **case.advisor_options)


def test_freezing_comparison_uses_the_sections_own_scales():
    """Without latent heat in the field the numbers are not a freezing test; this checks that
    d, E, h and T_a reach Plank's equation as the section gives them: the quarter bar's
    conduction distance is 20 mm (the core to the top edge) and V/A_s = 600 mm²/50 mm."""
    case = case_from_toml(small_bar(""))
    solution = run_case(case).assessment.solution
    product = FreezingProduct(7850.0, 1e3, 700.0, 40.0, 520.0, 520.0)
    found = assess(solution, freezing=product, freeze_to=300.0).freezing
    assert found.half_thickness == pytest.approx(0.020, rel=1e-6)
    assert found.shape_number == pytest.approx(0.020 / 0.012, rel=1e-6)
    assert found.heat_transfer_coefficient == pytest.approx(30.0)
    expected = plank_time(product, 0.020, 30.0, 60.0, 0.020 / 0.012)
    assert found.plank == pytest.approx(expected, rel=1e-9)
    with pytest.raises(AdvisorError, match="needs freeze_to"):
        assess(solution, freezing=product)
    with pytest.raises(AdvisorError, match="material with latent heat"):
        assess(solution, freeze_to=300.0)
