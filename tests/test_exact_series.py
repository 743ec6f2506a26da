"""The exact reference series of ``exact_series.py`` against things outside them.

Each check compares the series with something it was not built from: the one-term table of a
handbook, the transcendental equations in their original form, the initial condition, the
conservation of energy, the semi-infinite solid at early times and a quadrature of the profile.
"""

from __future__ import annotations

import math

import exact_series as es
import numpy as np
import pytest
from scipy.integrate import quad
from scipy.special import erfc, j0, j1

GEOMETRIES = ("plane_wall", "cylinder", "sphere")


def series(geometry: str):
    """(roots, coefficients, profile, mean) functions of one geometry."""
    return tuple(
        getattr(es, f"{geometry}_{part}") for part in ("roots", "coefficients", "profile", "mean")
    )


def tail_bound(geometry: str, biot: float, fourier: float, terms: int) -> float:
    """The geometry's bound on the omitted terms (only the sphere's depends on Bi)."""
    if geometry == "sphere":
        return es.sphere_tail_bound(biot, fourier, terms)
    return getattr(es, f"{geometry}_tail_bound")(fourier, terms)


# One-term values zeta_1 and C_1 of Incropera, DeWitt, Bergman & Lavine, *Fundamentals of Heat
# and Mass Transfer*, 6th ed., Table 5.1 (from memory). The table gives four decimals, so the
# computed values must round to them: 2e-4 allows for a last-digit slip in the memory as well.
TABLE_5_1 = {
    ("plane_wall", 0.1): (0.3111, 1.0161),
    ("plane_wall", 1.0): (0.8603, 1.1191),
    ("plane_wall", 10.0): (1.4289, 1.2620),
    ("cylinder", 0.1): (0.4417, 1.0246),
    ("cylinder", 1.0): (1.2558, 1.2071),
    ("cylinder", 10.0): (2.1795, 1.5677),
    ("sphere", 0.1): (0.5423, 1.0298),
    ("sphere", 1.0): (1.5708, 1.2732),
    ("sphere", 10.0): (2.8363, 1.9249),
}
TABLE_TOLERANCE = 2e-4


def eigen_equation(geometry: str, zeta: float, biot: float) -> float:
    """The eigenvalue equation in the form of the handbook, as left side minus Bi."""
    if geometry == "plane_wall":
        return zeta * math.tan(zeta) - biot
    if geometry == "cylinder":
        return zeta * float(j1(zeta)) / float(j0(zeta)) - biot
    return 1.0 - zeta / math.tan(zeta) - biot


@pytest.mark.parametrize(("geometry", "biot"), list(TABLE_5_1))
def test_first_root_and_coefficient_match_table_5_1(geometry, biot):
    roots_of, coefficients_of, _, _ = series(geometry)
    zeta_1, c_1 = TABLE_5_1[geometry, biot]
    roots = roots_of(biot, 3)
    assert roots[0] == pytest.approx(zeta_1, abs=TABLE_TOLERANCE)
    assert coefficients_of(roots)[0] == pytest.approx(c_1, abs=TABLE_TOLERANCE)
    # The roots also satisfy the equation as the handbook writes it (with its poles), not only
    # the pole-free form that was solved; brentq's 1e-15 tolerance leaves residuals of round-off
    # size, and 1e-9 of Bi is still far below any wrong root.
    for zeta in roots:
        assert abs(eigen_equation(geometry, zeta, biot)) < 1e-9 * biot


@pytest.mark.parametrize("geometry", GEOMETRIES)
@pytest.mark.parametrize("biot", [0.1, 1.0, 10.0])
def test_profile_starts_at_the_initial_temperature(geometry, biot):
    # At Fo = 1e-3 the cooling has reached a depth of a few sqrt(Fo) = 0.03 of the size, so at
    # the centre and at half the size the exact theta* differs from 1 by about
    # erfc(0.5 / (2 sqrt(Fo))) ~ 1e-28. With 300 terms the tail bound is ~exp(-900), so the
    # only error left is the round-off of summing 300 terms of order 1: 1e-12 is well above it.
    # A missing or wrong root, or a wrong coefficient, leaves an O(1e-2) or larger error here.
    _, _, profile, _ = series(geometry)
    fourier, terms = 1e-3, 300
    assert tail_bound(geometry, biot, fourier, terms) < 1e-100
    values = profile(biot, fourier, np.array([0.0, 0.5]), terms=terms)
    assert np.abs(values - 1.0).max() < 1e-12


@pytest.mark.parametrize("biot", [0.1, 1.0, 10.0])
def test_wall_surface_follows_the_semi_infinite_solid_at_early_times(biot):
    # Before the two faces feel each other, the wall's face behaves like the surface of a
    # semi-infinite solid with convection: theta*_s = exp(beta^2) erfc(beta), beta = Bi sqrt(Fo)
    # (Incropera et al., 6th ed., §5.7, case 3, at x = 0; Carslaw & Jaeger, 2nd ed., ch. II; both
    # from memory). At Fo = 1e-3 the other face is 1/sqrt(Fo) ~ 32 diffusion lengths away, so
    # the two differ by ~erfc(16) ~ 1e-113: only round-off (1e-12, as above) is allowed.
    fourier = 1e-3
    beta = biot * math.sqrt(fourier)
    surface = float(es.plane_wall_profile(biot, fourier, 1.0, terms=300))
    assert surface == pytest.approx(math.exp(beta**2) * erfc(beta), abs=1e-12)


def fo0_mean_tail_bound(geometry: str, biot: float, terms: int) -> float:
    """Upper bound on sum over n >= N of the (positive) mean terms at Fo = 0.

    At a root the mean terms are, with z = zeta_n > n pi:
    wall 4 sin^2 z / (z (2 z + sin 2 z)) with sin^2 z <= Bi^2 / z^2, so <= 2 Bi^2 / z^4 / (1 -
    1 / (2 N pi)); cylinder 4 J1^2 / (z^2 (J0^2 + J1^2)) = 4 Bi^2 / (z^2 (z^2 + Bi^2)) <=
    4 Bi^2 / z^4; sphere 12 Bi^2 sin^2 z / ((2 z - sin 2 z) z^3) <= 6 Bi^2 / z^4 / (1 - 1 /
    (2 N pi)). And sum_{n >= N} 1 / n^4 <= 1 / (3 (N - 1)^3).
    """
    factor = {"plane_wall": 2.0, "cylinder": 4.0, "sphere": 6.0}[geometry]
    slack = 1.0 if geometry == "cylinder" else 1.0 / (1.0 - 1.0 / (2.0 * terms * math.pi))
    return factor * biot**2 / math.pi**4 / (3.0 * (terms - 1) ** 3) * slack


@pytest.mark.parametrize("geometry", GEOMETRIES)
@pytest.mark.parametrize("biot", [0.1, 1.0, 10.0])
def test_mean_at_zero_fourier_is_one(geometry, biot):
    # Energy: at Fo = 0 the whole initial excess is still in the body, so the mean theta* is 1.
    # Every term of the mean at Fo = 0 is positive, so the N-term sum must fall short of 1 by
    # no more than the bound on the omitted terms (about 1e-10 at Bi = 10 with 2000 terms)
    # plus the round-off of the sum (1e-13 allowed); it must not exceed 1 by more than that.
    _, _, _, mean = series(geometry)
    terms = 2000
    shortfall = 1.0 - mean(biot, 0.0, terms=terms)
    assert -1e-13 < shortfall < fo0_mean_tail_bound(geometry, biot, terms) + 1e-13


@pytest.mark.parametrize("geometry", GEOMETRIES)
@pytest.mark.parametrize("fourier", [0.05, 0.5])
def test_mean_is_the_volume_average_of_the_profile(geometry, fourier):
    # The mean formulas are checked against an adaptive quadrature of the profile with the
    # weight of each geometry: 1 (wall), 2 r* (cylinder), 3 r*^2 (sphere). With 50 terms the
    # truncation is below 1e-100 at these Fo; quad's requested 1e-13 and the round-off of the
    # sums stay below 1e-12.
    _, _, profile, mean = series(geometry)
    biot, terms = 1.0, 50
    assert tail_bound(geometry, biot, fourier, terms) < 1e-100
    power = GEOMETRIES.index(geometry)  # 0, 1, 2
    weight = power + 1.0

    def integrand(r_star: float) -> float:
        return weight * r_star**power * float(profile(biot, fourier, r_star, terms=terms))

    average, _ = quad(integrand, 0.0, 1.0, epsabs=1e-13, epsrel=1e-13, limit=200)
    assert mean(biot, fourier, terms=terms) == pytest.approx(average, abs=1e-12)


@pytest.mark.parametrize("geometry", GEOMETRIES)
@pytest.mark.parametrize("biot", [0.1, 1.0, 10.0])
def test_tail_bound_covers_what_was_left_out(geometry, biot):
    # A few terms at a small Fo leave a visible remainder; the bound must cover it at the
    # centre, at the surface and for the mean. 400 terms stand for the full series: their own
    # tail bound is below 1e-100 at this Fo.
    _, _, profile, mean = series(geometry)
    fourier, few, many = 0.02, 4, 400
    assert tail_bound(geometry, biot, fourier, many) < 1e-100
    bound = tail_bound(geometry, biot, fourier, few)
    where = np.array([0.0, 1.0])
    left_out = np.abs(
        profile(biot, fourier, where, terms=many) - profile(biot, fourier, where, terms=few)
    )
    mean_left_out = abs(mean(biot, fourier, terms=many) - mean(biot, fourier, terms=few))
    assert max(left_out.max(), mean_left_out) <= bound
    # The remainder is not negligible here (so the comparison means something), and the
    # bound, though loose with so few terms, is below the initial difference itself.
    assert left_out.max() > 1e-5
    assert bound < 1.0


def test_cylinder_tail_bound_inequality_holds():
    # The cylinder's tail bound rests on x (J0^2 + J1^2) >= 13 / (16 pi) for x >= 2, derived in
    # exact_series.cylinder_tail_bound; here it is checked on a fine grid up to x = 1e4 (it
    # tends to 2 / pi ~ 0.64, with wiggles of order 1 / x), and |C_n| <= 4 / sqrt(zeta_n) is
    # checked at the first 200 roots of three Biot numbers.
    x = np.linspace(2.0, 1e4, 2_000_001)
    assert (x * (j0(x) ** 2 + j1(x) ** 2)).min() >= 13.0 / (16.0 * math.pi)
    for biot in (0.1, 1.0, 10.0):
        roots = es.cylinder_roots(biot, 200)
        assert np.all(roots[1:] > np.arange(1, 200) * math.pi)
        coefficients = es.cylinder_coefficients(roots)
        assert np.all(np.abs(coefficients[1:]) <= 4.0 / np.sqrt(roots[1:]))


@pytest.mark.parametrize("geometry", GEOMETRIES)
def test_bad_arguments_are_refused(geometry):
    roots_of, *_ = series(geometry)
    with pytest.raises(ValueError, match=r"biot must be a finite number > 0, got 0.0"):
        roots_of(0.0, 3)
    with pytest.raises(ValueError, match=r"terms must be a whole number >= 1, got 0"):
        roots_of(1.0, 0)
