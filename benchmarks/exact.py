"""The exact solution of the benchmark square: a product of two plane-wall series.

A square bar of side 2L at a uniform initial temperature is plunged at t = 0 into a fluid with
a heat-transfer coefficient h on all four faces. The quarter model (symmetry on x = 0 and
y = 0) has the solution

    θ(x, y, t) / θ0 = X(x/L, Fo) · X(y/L, Fo),   X(x*, Fo) = Σ C_n exp(−ζ_n² Fo) cos(ζ_n x*),

with ζ_n tan ζ_n = Bi = hL/k, C_n = 4 sin ζ_n / (2ζ_n + sin 2ζ_n) and Fo = αt/L²
(Incropera, DeWitt, Bergman & Lavine, *Fundamentals of Heat and Mass Transfer*, 6th ed.,
§5.5.1 and §5.8; Carslaw & Jaeger, *Conduction of Heat in Solids*, 2nd ed., §3.10; both from
memory). The series is summed here with its own root-finding, independent of the code being
timed. With ``TERMS`` = 80 terms the omitted tail is below exp(−(80π)²·Fo), negligible for
Fo > 1e-4.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.optimize import brentq

TERMS = 80


def plane_wall_roots(biot: float, terms: int = TERMS) -> np.ndarray:
    """The first ``terms`` positive roots of ζ tan ζ = Bi (one in each (nπ, nπ + π/2))."""
    if not (math.isfinite(biot) and biot > 0):
        raise ValueError(f"biot must be a finite number > 0, got {biot!r}")

    def equation(z: float) -> float:
        return z * math.sin(z) - biot * math.cos(z)

    lows = np.arange(terms) * math.pi
    return np.array(
        [
            brentq(equation, low + 1e-14, low + math.pi / 2 - 1e-14, xtol=1e-15, rtol=1e-15)
            for low in lows
        ]
    )


class SquareBarExact:
    """θ/θ0 of the plunged square bar at points (x*, y*) = (x, y)/L and Fourier number Fo."""

    def __init__(self, biot: float, terms: int = TERMS):
        self.biot = float(biot)
        self.roots = plane_wall_roots(biot, terms)
        z = self.roots
        self.coefficients = 4.0 * np.sin(z) / (2.0 * z + np.sin(2.0 * z))

    def wall(self, x_star: np.ndarray, fourier: float) -> np.ndarray:
        """The plane-wall factor X(x*, Fo)."""
        weights = self.coefficients * np.exp(-(self.roots**2) * fourier)
        x_star = np.asarray(x_star, dtype=float)
        return np.cos(np.multiply.outer(x_star, self.roots)) @ weights

    def theta(self, x_star: np.ndarray, y_star: np.ndarray, fourier: float) -> np.ndarray:
        return self.wall(x_star, fourier) * self.wall(y_star, fourier)

    def centre_fourier(self, remaining: float) -> float:
        """Fo at which the centre's θ/θ0 has fallen to ``remaining`` (0.01: 99 % of the way)."""

        def gap(fourier: float) -> float:
            return float(self.wall(0.0, fourier)) ** 2 - remaining

        high = 1.0
        while gap(high) > 0:
            high *= 2.0
        return brentq(gap, 1e-6, high, xtol=1e-14, rtol=1e-14)


def largest_error(
    exact: SquareBarExact,
    vertices: np.ndarray,
    half_side: float,
    diffusion_time: float,
    times,
    fields,
    initial: float,
    ambient: float,
) -> float:
    """Largest |T − T_exact| over the vertices and the given times (t > 0), as a fraction of
    the initial temperature difference; ``fields`` are vertex temperatures in °C."""
    x_star, y_star = vertices[0] / half_side, vertices[1] / half_side
    worst = 0.0
    for time, field in zip(times, fields, strict=True):
        if time <= 0:
            continue
        reference = ambient + (initial - ambient) * exact.theta(
            x_star, y_star, time / diffusion_time
        )
        error = float(np.abs(np.asarray(field) - reference).max()) / abs(initial - ambient)
        worst = max(worst, error)
    return worst
