"""Uncertainty: a heat-transfer coefficient known to ±25 % (uniform) on a plane wall at small
Biot number, sampled by a study; the lumped time to target's mean and 5/95 % quantiles.

References, computed here:

- the lumped time to target t = τ·ln(θ0/θ), τ = ρcL/h for a plane wall of half-thickness L
  cooled on one face (Incropera, DeWitt, Bergman & Lavine, Fundamentals of Heat and Mass
  Transfer, 6th ed., §5.2, eqs. 5.5–5.6; from memory);
- for h uniform on [a, b] and t = C/h: E[t] = C·ln(b/a)/(b − a), E[t²] = C²/(ab), and the
  q-quantile t_q = C/(b − q(b − a)) since t decreases with h (change of variables; any
  probability text);
- the standard error of a sample mean σ/√n and of a sample q-quantile √(q(1 − q)/n)/f(t_q)
  with f the density of t, f(t) = C/((b − a)t²) (asymptotic normality of sample quantiles,
  e.g. Cramér, Mathematical Methods of Statistics, 1946, §28.5; from memory).
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from advisor.studies import sweep

pytest.importorskip("pandas", reason="study tables are DataFrames: pandas is in the test extra")

HALF_THICKNESS, HEIGHT = 0.010, 0.004  # m
CONDUCTIVITY, DENSITY, SPECIFIC_HEAT = 40.0, 7850.0, 500.0
INITIAL, AMBIENT, TARGET = 500.0, 20.0, 100.0  # degC
LOW, HIGH = 75.0, 125.0  # W/(m^2*K): 100 ± 25 %, Bi = hL/k = 0.019 to 0.031
SAMPLES, SEED = 120, 7

WALL = f"""
title = "Plane wall, one face cooled (strip section)"

[section]
mesh_size = "2.5 mm"

[[section.shape]]
kind = "rectangle"
width = "{1000 * HALF_THICKNESS} mm"
height = "{1000 * HEIGHT} mm"
edges = {{ left = "middle", right = "face", top = "sides", bottom = "sides" }}
region = "wall"

[material]
conductivity = "{CONDUCTIVITY} W/(m*K)"
density = "{DENSITY} kg/m^3"
specific_heat = "{SPECIFIC_HEAT} J/(kg*K)"

[boundaries.middle]
insulated = "symmetry"

[boundaries.sides]
insulated = "symmetry"

[boundaries.face]
convection = {{ coefficient = "100 W/(m^2*K)", ambient = "{AMBIENT} degC" }}

[initial]
temperature = "{INITIAL} degC"

[run]
end_time = "20 min"
time_step = "10 s"

[advisor]
target = "{TARGET} degC"

[study]
sampling = "random"
samples = {SAMPLES}
seed = {SEED}

[[study.vary]]
key = "boundaries.face.convection.coefficient"
distribution = "uniform"
low = "{LOW} W/(m^2*K)"
high = "{HIGH} W/(m^2*K)"
"""


def test_uniform_coefficient_spread_of_the_lumped_time_to_target(tmp_path: Path):
    case = tmp_path / "wall.toml"
    case.write_text(WALL, encoding="utf-8")
    table = sweep(case, map="serial")
    assert (table["status"] == "done").all()
    times = table["time_to_target_classical_s"].to_numpy()

    # the same draws, transformed as documented: u from default_rng(seed), h = a + u(b - a)
    u = np.random.default_rng(SEED).random((SAMPLES, 1))[:, 0]
    h = LOW + u * (HIGH - LOW)
    np.testing.assert_allclose(table["boundaries.face.convection.coefficient"], h, rtol=1e-15)
    constant = (
        DENSITY
        * SPECIFIC_HEAT
        * HALF_THICKNESS
        * math.log((INITIAL - AMBIENT) / (TARGET - AMBIENT))
    )
    closed_form = constant / h
    # V/A_s = L exactly on straight triangles: rounding only
    np.testing.assert_allclose(times, closed_form, rtol=1e-12)
    for statistic in (np.mean, lambda t: np.quantile(t, 0.05), lambda t: np.quantile(t, 0.95)):
        assert statistic(times) == pytest.approx(statistic(closed_form), rel=1e-12)

    # against the distribution itself, within 4 standard errors of the sampling
    width = HIGH - LOW
    mean = constant * math.log(HIGH / LOW) / width
    deviation = math.sqrt(constant**2 / (LOW * HIGH) - mean**2)
    assert abs(times.mean() - mean) < 4 * deviation / math.sqrt(SAMPLES)
    for q in (0.05, 0.95):
        exact = constant / (HIGH - q * width)
        density = constant / (width * exact**2)
        error = math.sqrt(q * (1 - q) / SAMPLES) / density
        assert abs(np.quantile(times, q) - exact) < 4 * error, (q, exact)
