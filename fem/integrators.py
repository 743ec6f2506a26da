"""Time schemes as linear multistep formulas, and their local error estimate.

A step from t_n to t_n+1 = t_n + h solves

    (a_0·C(T_n+1) + Σ_j a_j·C(T_n−j)) / h + β·G(T_n+1, t_n+1) + (1 − β)·G(T_n, t_n) = 0,

theta-method: a = (1, −1), β = θ (Crank–Nicolson θ = ½, backward Euler θ = 1); BDF2 with step
ratio ω = h_n / h_n−1: a = ((1 + 2ω)/(1 + ω), −(1 + ω), ω²/(1 + ω)), β = 1.

The local error is estimated without derivatives (Milne's device): a quadratic through the last
three states predicts T_n+1, and since both the scheme and the predictor are exact for
quadratics, their difference is proportional to T''' with constants found by applying each to
t³/6 — so the estimate holds for any step ratios.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

METHODS = ("crank-nicolson", "bdf2", "backward-euler")


@dataclass(frozen=True)
class StepFormula:
    """Coefficients of one step: ``a`` on (T_n+1, T_n, T_n−1, ...) and ``beta``."""

    a: tuple[float, ...]
    beta: float

    @property
    def history(self) -> int:
        """How many past states the formula needs."""
        return len(self.a) - 1

    def matrix_scale(self, step: float) -> float:
        """The step matrix is M + s·A with s = β·h/a_0: equal s, equal matrix."""
        return self.beta * step / self.a[0]

    def local_error_constant(self, times: tuple[float, ...]) -> float:
        """Local error per unit T''' of one step over ``times`` = (t_n+1, t_n, t_n−1, ...)."""
        t1, t0 = times[0], times[1]
        h = t1 - t0
        y = [(t - t0) ** 3 / 6 for t in times[: len(self.a)]]
        dy1, dy0 = (t1 - t0) ** 2 / 2, 0.0
        residual = sum(a * v for a, v in zip(self.a, y, strict=False)) - h * (
            self.beta * dy1 + (1 - self.beta) * dy0
        )
        return -residual / self.a[0]


def theta_formula(theta: float) -> StepFormula:
    return StepFormula((1.0, -1.0), theta)


def bdf2_formula(ratio: float) -> StepFormula:
    """BDF2 for a step ``ratio`` times the previous one."""
    w = ratio
    return StepFormula(((1 + 2 * w) / (1 + w), -(1 + w), w * w / (1 + w)), 1.0)


def predictor_error_constant(times: tuple[float, ...]) -> float:
    """Error per unit T''' of the quadratic through (t_n, t_n−1, t_n−2) at t_n+1."""
    t1, t0, tm1, tm2 = times[:4]
    return -(t1 - t0) * (t1 - tm1) * (t1 - tm2) / 6


def predict(times: tuple[float, ...], states: list[np.ndarray]) -> np.ndarray:
    """The quadratic through ``states`` at times[1:4], evaluated at times[0]."""
    t, (x0, x1, x2) = times[0], times[1:4]
    l0 = (t - x1) * (t - x2) / ((x0 - x1) * (x0 - x2))
    l1 = (t - x0) * (t - x2) / ((x1 - x0) * (x1 - x2))
    l2 = (t - x0) * (t - x1) / ((x2 - x0) * (x2 - x1))
    return l0 * states[0] + l1 * states[1] + l2 * states[2]


def local_error(
    formula: StepFormula, times: tuple[float, ...], result: np.ndarray, states: list[np.ndarray]
) -> np.ndarray:
    """Estimated local error of ``result`` (the scheme's T_n+1), from the last three states."""
    c_scheme = formula.local_error_constant(times)
    c_predictor = predictor_error_constant(times)
    prediction = predict(times, states)
    return c_scheme / (c_scheme - c_predictor) * (result - prediction)
