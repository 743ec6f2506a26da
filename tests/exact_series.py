"""Exact series solutions of 1-D transient conduction, the references of the verification tests.

A plane wall of half-thickness L, an infinite cylinder of radius r_o and a sphere of radius r_o,
each at a uniform initial temperature, are plunged at t = 0 into a fluid at T_inf with a
heat-transfer coefficient h on the surface (the wall on both faces). In dimensionless form,
theta* = (T - T_inf) / (T_i - T_inf), Bi = h L / k (or h r_o / k), Fo = alpha t / L^2 (or
alpha t / r_o^2) and x* = x / L (or r* = r / r_o), each solution is a series

    theta* = sum_n C_n exp(-zeta_n^2 Fo) X(zeta_n x*),

with eigenvalues zeta_n from a transcendental equation in Bi. The formulas are those of
Incropera, DeWitt, Bergman & Lavine, *Fundamentals of Heat and Mass Transfer*, 6th ed.,
§5.5 (plane wall, eq. 5.39-5.42), §5.6 (radial systems) and Table 5.1, and of Carslaw &
Jaeger, *Conduction of Heat in Solids*, 2nd ed., §3.10 (slab), ch. VII (cylinder) and ch. IX
(sphere); all recalled from memory, not read from the books. Equation numbers are given only
where the project's other tests already cite them.

Everything here is computed with its own root-finding (scipy's ``brentq``) and its own sums;
nothing comes from the code under test (``geometries``, ``fem``, ``advisor``), as the
verification policy of DESIGN.md requires. Roots are numbered from n = 0 (the fundamental).

Each series comes with a tail bound: an upper bound on the sum of |C_n exp(-zeta_n^2 Fo)| over
the omitted terms. The spatial factors (cos, J0, sin(z)/z) and the factors of the means are at
most 1 in magnitude beyond the first root, so the bound covers profiles and means alike. All
three bounds use zeta_n > n pi for n >= 1 and n^2 >= N^2 + 2 N (n - N), which turns the omitted
terms into a geometric series.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.optimize import brentq
from scipy.special import j0, j1, jn_zeros

ROOT_TOLERANCE = 1e-15  # brentq's xtol and rtol: roots to about machine precision


def _check_biot(biot: float) -> None:
    if not (math.isfinite(biot) and biot > 0.0):
        raise ValueError(f"biot must be a finite number > 0, got {biot!r}")


def _check_terms(terms: int) -> None:
    if isinstance(terms, bool) or not isinstance(terms, (int, np.integer)) or terms < 1:
        raise ValueError(f"terms must be a whole number >= 1, got {terms!r}")


def _solve_on_brackets(equation, lower: np.ndarray, upper: np.ndarray) -> np.ndarray:
    """One root of ``equation`` in each interval (lower[i], upper[i])."""
    return np.array(
        [
            brentq(equation, a, b, xtol=ROOT_TOLERANCE, rtol=ROOT_TOLERANCE)
            for a, b in zip(lower, upper, strict=True)
        ]
    )


def _geometric_tail(first_coefficient: float, fourier: float, terms: int) -> float:
    """c exp(-(N pi)^2 Fo) / (1 - exp(-2 N pi^2 Fo)): the common shape of the tail bounds."""
    if fourier <= 0.0:
        return math.inf
    n = terms
    ratio = math.exp(-2.0 * n * math.pi**2 * fourier)
    return first_coefficient * math.exp(-((n * math.pi) ** 2) * fourier) / (1.0 - ratio)


# --- Plane wall -------------------------------------------------------------------------------


def plane_wall_roots(biot: float, terms: int) -> np.ndarray:
    """The first ``terms`` positive roots of zeta tan(zeta) = Bi.

    Parameters
    ----------
    biot : float
        Bi = h L / k on the half-thickness L; > 0.
    terms : int
        Number of roots; >= 1.

    Returns
    -------
    ndarray
        zeta_n, n = 0 ... terms - 1, dimensionless; root n lies in (n pi, n pi + pi/2).

    Notes
    -----
    Incropera et al., 6th ed., §5.5.1 (from memory); Carslaw & Jaeger, 2nd ed.,
    §3.10 (from memory). The equation is solved as zeta sin(zeta) - Bi cos(zeta) = 0, which has
    the same roots on these intervals and no pole.
    """
    _check_biot(biot)
    _check_terms(terms)

    def equation(zeta: float) -> float:
        return zeta * math.sin(zeta) - biot * math.cos(zeta)

    lower = np.arange(terms) * np.pi
    return _solve_on_brackets(equation, lower, lower + np.pi / 2)


def plane_wall_coefficients(roots: np.ndarray) -> np.ndarray:
    """C_n = 4 sin(zeta_n) / (2 zeta_n + sin(2 zeta_n)).

    Parameters
    ----------
    roots : ndarray
        zeta_n from :func:`plane_wall_roots`, dimensionless.

    Returns
    -------
    ndarray
        C_n, dimensionless.

    Notes
    -----
    Incropera et al., 6th ed., §5.5.1 (from memory).
    """
    roots = np.asarray(roots, dtype=float)
    return 4.0 * np.sin(roots) / (2.0 * roots + np.sin(2.0 * roots))


def plane_wall_tail_bound(fourier: float, terms: int) -> float:
    """Upper bound on the sum of |C_n exp(-zeta_n^2 Fo)| over the omitted terms n >= ``terms``.

    Parameters
    ----------
    fourier : float
        Fo = alpha t / L^2; >= 0 (the bound is infinite at Fo = 0).
    terms : int
        Number of terms kept; >= 1.

    Returns
    -------
    float
        The bound, as a fraction of the initial temperature difference.

    Notes
    -----
    For n >= 1, zeta_n > n pi and |C_n| <= 4 / (2 n pi - 1) (|sin| <= 1 in the coefficient of
    Incropera et al., 6th ed., §5.5.1, from memory); with n^2 >= N^2 + 2 N (n - N) the
    omitted terms are bounded by a geometric series. cos(zeta x*) and sin(zeta)/zeta are at
    most 1 in magnitude, so this bounds the profile and the mean alike.
    """
    _check_terms(terms)
    return _geometric_tail(4.0 / (2.0 * terms * math.pi - 1.0), fourier, terms)


def plane_wall_profile(biot: float, fourier: float, x_star, *, terms: int) -> np.ndarray:
    """theta* = sum C_n exp(-zeta_n^2 Fo) cos(zeta_n x*) of a plane wall.

    Parameters
    ----------
    biot : float
        Bi = h L / k on the half-thickness L; > 0.
    fourier : float
        Fo = alpha t / L^2; >= 0.
    x_star : array_like
        x / L, dimensionless; 0 at the mid-plane, 1 at the cooled faces.
    terms : int
        Number of series terms; see :func:`plane_wall_tail_bound` for the truncation error.

    Returns
    -------
    ndarray
        (T - T_inf) / (T_i - T_inf) at ``x_star``, same shape.

    Notes
    -----
    Incropera et al., 6th ed., §5.5.1 (from memory); Carslaw & Jaeger, 2nd ed.,
    §3.10 (from memory).
    """
    roots = plane_wall_roots(biot, terms)
    weights = plane_wall_coefficients(roots) * np.exp(-(roots**2) * fourier)
    x_star = np.asarray(x_star, dtype=float)
    return np.cos(np.multiply.outer(x_star, roots)) @ weights


def plane_wall_mean(biot: float, fourier: float, *, terms: int) -> float:
    """Mean theta* over the wall: sum C_n exp(-zeta_n^2 Fo) sin(zeta_n) / zeta_n.

    Parameters
    ----------
    biot : float
        Bi = h L / k on the half-thickness L; > 0.
    fourier : float
        Fo = alpha t / L^2; >= 0.
    terms : int
        Number of series terms.

    Returns
    -------
    float
        Mean (T - T_inf) / (T_i - T_inf), equal to the fraction of the initial excess energy
        still in the wall.

    Notes
    -----
    Incropera et al., 6th ed., §5.5.3 (total energy transfer, given there in one-term
    form; from memory).
    """
    roots = plane_wall_roots(biot, terms)
    weights = plane_wall_coefficients(roots) * np.exp(-(roots**2) * fourier)
    return float(weights @ (np.sin(roots) / roots))


# --- Infinite cylinder ------------------------------------------------------------------------


def cylinder_roots(biot: float, terms: int) -> np.ndarray:
    """The first ``terms`` positive roots of zeta J1(zeta) / J0(zeta) = Bi.

    Parameters
    ----------
    biot : float
        Bi = h r_o / k on the radius r_o; > 0.
    terms : int
        Number of roots; >= 1.

    Returns
    -------
    ndarray
        zeta_n, n = 0 ... terms - 1, dimensionless.

    Notes
    -----
    Incropera et al., 6th ed., §5.6.1 (from memory); Carslaw & Jaeger, 2nd ed., ch. VII
    (from memory). The equation is solved as zeta J1(zeta) - Bi J0(zeta) = 0. On
    (j_{1,n}, j_{0,n+1}), between a zero of J1 (j_{1,0} = 0) and the next zero of J0 (the zeros
    interlace), zeta J1 / J0 rises from 0 to +infinity, so each such interval holds exactly one
    root and no other interval holds any.
    """
    _check_biot(biot)
    _check_terms(terms)

    def equation(zeta: float) -> float:
        return zeta * float(j1(zeta)) - biot * float(j0(zeta))

    lower = np.concatenate(([0.0], jn_zeros(1, terms - 1))) if terms > 1 else np.zeros(1)
    return _solve_on_brackets(equation, lower, jn_zeros(0, terms))


def cylinder_coefficients(roots: np.ndarray) -> np.ndarray:
    """C_n = (2 / zeta_n) J1(zeta_n) / (J0(zeta_n)^2 + J1(zeta_n)^2).

    Parameters
    ----------
    roots : ndarray
        zeta_n from :func:`cylinder_roots`, dimensionless.

    Returns
    -------
    ndarray
        C_n, dimensionless.

    Notes
    -----
    Incropera et al., 6th ed., §5.6.1 (from memory).
    """
    roots = np.asarray(roots, dtype=float)
    first, zeroth = j1(roots), j0(roots)
    return 2.0 / roots * first / (zeroth**2 + first**2)


def cylinder_tail_bound(fourier: float, terms: int) -> float:
    """Upper bound on the sum of |C_n exp(-zeta_n^2 Fo)| over the omitted terms n >= ``terms``.

    Parameters
    ----------
    fourier : float
        Fo = alpha t / r_o^2; >= 0 (the bound is infinite at Fo = 0).
    terms : int
        Number of terms kept; >= 1.

    Returns
    -------
    float
        The bound, as a fraction of the initial temperature difference.

    Notes
    -----
    Two facts of Bessel functions, from the Sturm comparison and Sonine-Polya arguments of
    Watson, *A Treatise on the Theory of Bessel Functions*, 2nd ed., ch. XV (from memory), with
    the constants worked out here (``test_exact_series.py`` checks the inequality on a grid):

    - v = sqrt(x) J1(x) solves v'' + (1 - 3 / (4 x^2)) v = 0. The coefficient is below 1, so
      consecutive zeros of J1 are more than pi apart, j_{1,n} > n pi, and zeta_n > j_{1,n}.
    - The coefficient phi = 1 - 3 / (4 x^2) increases, so v^2 + v'^2 / phi decreases (its
      derivative is -v'^2 phi' / phi^2) to its limit 2 / pi. For x >= 2 this gives
      x (J0^2 + J1^2) >= 13 / (16 pi), hence |C_n| <= 2 / (zeta_n sqrt(J0^2 + J1^2))
      <= 4 / sqrt(zeta_n) < 4 / sqrt(n pi).

    |J0(zeta r*)| <= 1 and |2 J1(zeta) / zeta| <= 1, so this bounds the profile and the mean.
    """
    _check_terms(terms)
    return _geometric_tail(4.0 / math.sqrt(terms * math.pi), fourier, terms)


def cylinder_profile(biot: float, fourier: float, r_star, *, terms: int) -> np.ndarray:
    """theta* = sum C_n exp(-zeta_n^2 Fo) J0(zeta_n r*) of an infinite cylinder.

    Parameters
    ----------
    biot : float
        Bi = h r_o / k on the radius r_o; > 0.
    fourier : float
        Fo = alpha t / r_o^2; >= 0.
    r_star : array_like
        r / r_o, dimensionless; 0 on the axis, 1 at the surface.
    terms : int
        Number of series terms; see :func:`cylinder_tail_bound` for the truncation error.

    Returns
    -------
    ndarray
        (T - T_inf) / (T_i - T_inf) at ``r_star``, same shape.

    Notes
    -----
    Incropera et al., 6th ed., §5.6.1 (from memory); Carslaw & Jaeger, 2nd ed., ch. VII
    (from memory).
    """
    roots = cylinder_roots(biot, terms)
    weights = cylinder_coefficients(roots) * np.exp(-(roots**2) * fourier)
    r_star = np.asarray(r_star, dtype=float)
    return j0(np.multiply.outer(r_star, roots)) @ weights


def cylinder_mean(biot: float, fourier: float, *, terms: int) -> float:
    """Mean theta* over the cross-section: sum 2 C_n J1(zeta_n) / zeta_n exp(-zeta_n^2 Fo).

    Parameters
    ----------
    biot : float
        Bi = h r_o / k on the radius r_o; > 0.
    fourier : float
        Fo = alpha t / r_o^2; >= 0.
    terms : int
        Number of series terms.

    Returns
    -------
    float
        Area-weighted mean (T - T_inf) / (T_i - T_inf), equal to the fraction of the initial
        excess energy still in the cylinder.

    Notes
    -----
    Incropera et al., 6th ed., §5.6.3 (total energy transfer, given there in one-term
    form; from memory).
    """
    roots = cylinder_roots(biot, terms)
    weights = cylinder_coefficients(roots) * np.exp(-(roots**2) * fourier)
    return float(weights @ (2.0 * j1(roots) / roots))


# --- Sphere -----------------------------------------------------------------------------------


def sphere_roots(biot: float, terms: int) -> np.ndarray:
    """The first ``terms`` positive roots of 1 - zeta cot(zeta) = Bi.

    Parameters
    ----------
    biot : float
        Bi = h r_o / k on the radius r_o; > 0.
    terms : int
        Number of roots; >= 1.

    Returns
    -------
    ndarray
        zeta_n, n = 0 ... terms - 1, dimensionless; root n lies in (n pi, (n + 1) pi).

    Notes
    -----
    Incropera et al., 6th ed., §5.6.1 (from memory); Carslaw & Jaeger, 2nd ed., ch. IX
    (from memory). The equation is solved as zeta cos(zeta) - (1 - Bi) sin(zeta) = 0,
    divided by zeta so that the trivial root zeta = 0 is removed:
    cos(zeta) - (1 - Bi) sin(zeta) / zeta, which is Bi > 0 at zeta = 0 and (-1)^n at n pi.
    zeta cot(zeta) falls monotonically from +infinity (from 1 on the first interval) to
    -infinity on each interval, so each holds exactly one root.
    """
    _check_biot(biot)
    _check_terms(terms)

    def equation(zeta: float) -> float:
        return math.cos(zeta) - (1.0 - biot) * float(np.sinc(zeta / math.pi))

    lower = np.arange(terms) * np.pi
    return _solve_on_brackets(equation, lower, lower + np.pi)


def sphere_coefficients(roots: np.ndarray) -> np.ndarray:
    """C_n = 4 (sin(zeta_n) - zeta_n cos(zeta_n)) / (2 zeta_n - sin(2 zeta_n)).

    Parameters
    ----------
    roots : ndarray
        zeta_n from :func:`sphere_roots`, dimensionless.

    Returns
    -------
    ndarray
        C_n, dimensionless.

    Notes
    -----
    Incropera et al., 6th ed., §5.6.1 (from memory).
    """
    roots = np.asarray(roots, dtype=float)
    return 4.0 * (np.sin(roots) - roots * np.cos(roots)) / (2.0 * roots - np.sin(2.0 * roots))


def sphere_tail_bound(biot: float, fourier: float, terms: int) -> float:
    """Upper bound on the sum of |C_n exp(-zeta_n^2 Fo)| over the omitted terms n >= ``terms``.

    Parameters
    ----------
    biot : float
        Bi = h r_o / k on the radius r_o; > 0.
    fourier : float
        Fo = alpha t / r_o^2; >= 0 (the bound is infinite at Fo = 0).
    terms : int
        Number of terms kept; >= 1.

    Returns
    -------
    float
        The bound, as a fraction of the initial temperature difference.

    Notes
    -----
    At a root, zeta cos(zeta) = (1 - Bi) sin(zeta), so sin(zeta) - zeta cos(zeta) =
    Bi sin(zeta); also |sin(zeta) - zeta cos(zeta)| <= 1 + zeta. For n >= 1, zeta_n > n pi,
    so |C_n| <= 4 min(Bi, 1 + zeta_n) / (2 zeta_n - 1) <= 4 min(Bi / (2 n pi - 1), 0.8), as
    (1 + z) / (2 z - 1) decreases and is below 0.8 at z = pi. sin(z)/z and
    3 (sin(z) - z cos(z)) / z^3 are at most 1 in magnitude there, so this bounds the profile
    and the mean. (Coefficient of Incropera et al., 6th ed., §5.6.1, from memory.)
    """
    _check_biot(biot)
    _check_terms(terms)
    first = 4.0 * min(biot / (2.0 * terms * math.pi - 1.0), 0.8)
    return _geometric_tail(first, fourier, terms)


def sphere_profile(biot: float, fourier: float, r_star, *, terms: int) -> np.ndarray:
    """theta* = sum C_n exp(-zeta_n^2 Fo) sin(zeta_n r*) / (zeta_n r*) of a sphere.

    Parameters
    ----------
    biot : float
        Bi = h r_o / k on the radius r_o; > 0.
    fourier : float
        Fo = alpha t / r_o^2; >= 0.
    r_star : array_like
        r / r_o, dimensionless; 0 at the centre (where sin(z)/z = 1), 1 at the surface.
    terms : int
        Number of series terms; see :func:`sphere_tail_bound` for the truncation error.

    Returns
    -------
    ndarray
        (T - T_inf) / (T_i - T_inf) at ``r_star``, same shape.

    Notes
    -----
    Incropera et al., 6th ed., §5.6.1 (from memory); Carslaw & Jaeger, 2nd ed., ch. IX
    (from memory).
    """
    roots = sphere_roots(biot, terms)
    weights = sphere_coefficients(roots) * np.exp(-(roots**2) * fourier)
    r_star = np.asarray(r_star, dtype=float)
    return np.sinc(np.multiply.outer(r_star, roots) / np.pi) @ weights


def sphere_mean(biot: float, fourier: float, *, terms: int) -> float:
    """Mean theta* over the sphere: sum 3 C_n (sin z - z cos z) / z^3 exp(-z^2 Fo), z = zeta_n.

    Parameters
    ----------
    biot : float
        Bi = h r_o / k on the radius r_o; > 0.
    fourier : float
        Fo = alpha t / r_o^2; >= 0.
    terms : int
        Number of series terms.

    Returns
    -------
    float
        Volume-weighted mean (T - T_inf) / (T_i - T_inf), equal to the fraction of the initial
        excess energy still in the sphere.

    Notes
    -----
    Incropera et al., 6th ed., §5.6.3 (total energy transfer, given there in one-term
    form; from memory).
    """
    roots = sphere_roots(biot, terms)
    weights = sphere_coefficients(roots) * np.exp(-(roots**2) * fourier)
    return float(weights @ (3.0 * (np.sin(roots) - roots * np.cos(roots)) / roots**3))
