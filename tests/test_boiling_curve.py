"""The boiling-curve builder's pieces against textbook worked examples and hand computations.

Sources (Incropera, DeWitt, Bergman & Lavine, *Fundamentals of Heat and Mass Transfer*, 6th
ed., chapter 10; all from memory):
- Example 10.1: water boiling at 1 atm on a polished copper pan bottom at 118 °C, C_sf =
  0.0128, n = 1: nucleate flux 836 kW/m²; and Zuber's maximum flux for water at 1 atm with
  C = 0.149, 1.26 MW/m² (§10.4.3).
- Example 10.2: film boiling on a horizontal 6 mm element, ε = 1, surface at 255 °C, vapour
  properties at 450 K: we recall the radiation coefficient 21.3 W/(m²·K) but not the printed
  convective coefficient and total, so those are computed here from eqs. 10.9–10.11 as printed.
- Saturated water at 373.15 K from Table A.6: ρ_l 957.9, ρ_v 0.5955 kg/m³, c_l 4217 J/(kg·K),
  μ_l 279e-6 Pa·s, k_l 0.680 W/(m·K), Pr_l 1.76, h_fg 2257 kJ/kg, σ 58.9e-3 N/m.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

pytest.importorskip("ht", reason="the boiling-curve builder needs the optional 'ht' package")

from fem.boiling_curve import (  # noqa: E402
    Liquid,
    boiling_curve,
    critical_heat_flux,
    film_coefficients,
    minimum_heat_flux,
    natural_convection_flux,
    nucleate_flux,
)

G = 9.80665
SIGMA = 5.670374419e-8
RHO_L, RHO_V, C_L, MU_L, K_L, H_FG, TENSION = 957.9, 0.5955, 4217.0, 279e-6, 0.680, 2257e3, 58.9e-3
WATER = Liquid(
    100.0, RHO_L, MU_L, K_L, C_L, 7.5e-4, TENSION, H_FG, RHO_V, 12.02e-6, 0.0248, 2029.0, "water"
)
# the same liquid with Example 10.2's vapour properties at 450 K
FILM_WATER = Liquid(
    100.0, RHO_L, MU_L, K_L, C_L, 7.5e-4, TENSION, H_FG, 4.808, 14.85e-6, 0.0331, 2560.0, "water"
)


def test_zuber_maximum_flux_of_water_at_one_atmosphere():
    """1.26 MW/m² with C = 0.149 (rounded to three figures in the book)."""
    assert critical_heat_flux(WATER) == pytest.approx(1.26e6, abs=0.005e6)
    import ht

    # ht's default constant is 0.18 (its documentation says so), not the textbook's 0.149
    assert ht.Zuber(TENSION, H_FG, RHO_L, RHO_V) == pytest.approx(
        critical_heat_flux(WATER) * 0.18 / 0.149, rel=1e-12
    )


def test_rohsenow_nucleate_flux_of_water_on_polished_copper():
    """Example 10.1: ΔT_e = 18 K, C_sf = 0.0128, n = 1 → 836 kW/m² (three figures); and the
    correlation as printed (eq. 10.5), computed here, to round-off. The book takes Pr_l = 1.76
    from its table, where μ·c/k of the rounded table values gives 1.73; the conductivity,
    which enters Rohsenow's flux only through Pr, is set here so that Pr = 1.76."""
    prandtl = 1.76
    liquid = Liquid(
        100.0, RHO_L, MU_L, MU_L * C_L / prandtl, C_L, 7.5e-4, TENSION, H_FG, RHO_V,
        12.02e-6, 0.0248, 2029.0,
    )  # fmt: skip
    found = nucleate_flux(liquid, 18.0, 0.0128, 1.0)[0]
    assert found == pytest.approx(836e3, rel=0.005)
    by_hand = (
        MU_L
        * H_FG
        * math.sqrt(G * (RHO_L - RHO_V) / TENSION)
        * (C_L * 18.0 / (0.0128 * H_FG * prandtl)) ** 3
    )
    assert found == pytest.approx(by_hand, rel=1e-12)


def test_bromley_film_boiling_with_radiation_on_a_horizontal_cylinder():
    """Example 10.2's inputs: h_rad = 21.3 W/(m²·K) as printed (three figures, with the
    temperatures rounded to 528 and 373 K, which alone gives 21.35); h_conv from
    eq. 10.9 computed here; the total satisfies eq. 10.10, and the book's simpler
    h ≈ h_conv + ¾·h_rad (eq. 10.11) to the order the expansion below states."""
    superheat, diameter = 155.0, 0.006
    convective, radiative, total = (
        v[0]
        for v in film_coefficients(FILM_WATER, superheat, diameter, 1.0, "horizontal cylinder")
    )
    assert radiative == pytest.approx(21.3, abs=0.1)
    latent = H_FG + 0.8 * 2560.0 * superheat
    group = G * (RHO_L - 4.808) * latent * 4.808 * 0.0331**3 / (14.85e-6 * diameter * superheat)
    assert convective == pytest.approx(0.62 * group**0.25, rel=1e-12)
    assert total ** (4 / 3) == pytest.approx(
        convective ** (4 / 3) + radiative * total ** (1 / 3), rel=1e-12
    )
    # h = h_conv·(h_conv/h)^(1/3) + h_rad, so h − h_conv = x lies in [¾·h_rad, h_rad], and
    # expanding (1 + x/h_conv)^(−1/3) to second order, x = ¾·h_rad + x²/(6·h_conv) + O(x³)
    excess = total - convective
    assert 0.75 * radiative < excess < radiative
    second_order = 0.75 * radiative + (0.75 * radiative) ** 2 / (6 * convective)
    assert excess == pytest.approx(second_order, abs=(radiative / convective) ** 3 * radiative)
    # a sphere takes Bromley's 0.67 instead of 0.62
    sphere = film_coefficients(FILM_WATER, superheat, diameter, 1.0, "sphere")[0][0]
    assert sphere / convective == pytest.approx(0.67 / 0.62, rel=1e-12)


def test_minimum_flux_and_subcooled_critical_flux_by_hand():
    """Eq. 10.7 (C = 0.09) and Ivey & Morris's subcooling factor, computed here."""
    group = TENSION * G * (RHO_L - RHO_V) / (RHO_L + RHO_V) ** 2
    assert minimum_heat_flux(WATER) == pytest.approx(0.09 * RHO_V * H_FG * group**0.25)
    factor = 1 + 0.1 * (RHO_L / RHO_V) ** 0.75 * C_L * 40.0 / H_FG
    assert critical_heat_flux(WATER, 40.0) == pytest.approx(critical_heat_flux(WATER) * factor)


def test_natural_convection_is_churchill_and_chu_by_hand():
    """Churchill & Chu for a horizontal cylinder (Incropera et al., 6th ed., eq. 9.34, from
    memory), computed here, at 20 K above a 60 °C bath."""
    diameter, difference = 0.02, 20.0
    nu = MU_L / RHO_L
    rayleigh = G * 7.5e-4 * difference * diameter**3 / nu**2 * (MU_L * C_L / K_L)
    prandtl = MU_L * C_L / K_L
    nusselt = (
        0.60 + 0.387 * rayleigh ** (1 / 6) / (1 + (0.559 / prandtl) ** (9 / 16)) ** (8 / 27)
    ) ** 2
    found = natural_convection_flux(WATER, difference, diameter, "horizontal cylinder")[0]
    assert found == pytest.approx(nusselt * K_L / diameter * difference, rel=1e-9)


def test_the_curve_is_continuous_and_shaped_as_a_boiling_curve():
    curve = boiling_curve(FILM_WATER, 0.012, 100.0, emissivity=0.8)
    t, q = curve.surface_temperatures, curve.heat_flux
    assert np.all(np.diff(t) > 0) and np.all(q > 0)
    chf = int(np.argmin(np.abs(t - curve.critical_temperature)))
    low = int(np.argmin(np.abs(t - curve.leidenfrost_temperature)))
    assert q[chf] == pytest.approx(curve.critical_heat_flux, rel=1e-9)
    assert q[low] == pytest.approx(curve.minimum_heat_flux, rel=1e-9)
    assert np.all(np.diff(q[: chf + 1]) > 0)  # convection, then nucleate boiling, rising
    assert np.all(np.diff(q[chf : low + 1]) < 0)  # transition, falling
    assert np.all(np.diff(q[low:]) > 0)  # film boiling, rising again
    assert curve.regimes[chf] == "nucleate" and curve.regimes[-1] == "film"
    assert curve.heat_transfer_coefficient == pytest.approx(q / (t - 100.0))
    # the curve reaches the film-boiling correlation itself above the Leidenfrost point
    top = film_coefficients(FILM_WATER, t[-1] - 100.0, 0.012, 0.8, "horizontal cylinder")[2][0]
    assert q[-1] == pytest.approx(top * (t[-1] - 100.0), rel=1e-12)
    # a given Leidenfrost temperature moves the minimum there, on the film curve
    moved = boiling_curve(FILM_WATER, 0.012, 100.0, leidenfrost_temperature=250.0)
    assert moved.leidenfrost_temperature == 250.0
    film = film_coefficients(FILM_WATER, 150.0, 0.012, 0.8, "horizontal cylinder")[2][0]
    assert moved.minimum_heat_flux == pytest.approx(film * 150.0, rel=1e-12)


def test_subcooled_bath_starts_with_natural_convection():
    curve = boiling_curve(FILM_WATER, 0.012, 60.0)
    assert curve.surface_temperatures[0] == pytest.approx(61.0)
    assert curve.regimes[0] == "natural convection"
    assert curve.critical_heat_flux > critical_heat_flux(FILM_WATER)


def test_coolprop_water_matches_the_steam_table_at_one_atmosphere():
    """CoolProp's IAPWS-95 water against Table A.6 at 373.15 K (from memory); the table's
    values are rounded to 3–4 figures, and its viscosity differs from IAPWS by about 1 %."""
    pytest.importorskip("CoolProp", reason="Liquid.water needs the optional CoolProp package")
    water = Liquid.water(101325.0)
    assert water.saturation_temperature == pytest.approx(100.0, abs=0.05)
    assert water.liquid_density == pytest.approx(RHO_L, rel=2e-3)
    assert water.latent_heat == pytest.approx(H_FG, rel=2e-3)
    assert water.surface_tension == pytest.approx(TENSION, rel=2e-3)
    assert water.liquid_specific_heat == pytest.approx(C_L, rel=2e-3)
    assert water.liquid_conductivity == pytest.approx(K_L, rel=1e-2)
    assert water.liquid_viscosity == pytest.approx(MU_L, rel=1.5e-2)
