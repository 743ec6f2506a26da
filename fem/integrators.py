"""Time schemes as linear multistep formulas, and their local error estimate.

A step from t_n to t_n+1 = t_n + h solves

    (a_0·C(T_n+1) + Σ_j a_j·C(T_n−j)) / h + β·G(T_n+1, t_n+1) + (1 − β)·G(T_n, t_n) = 0,

theta-method: a = (1, −1), β = θ (Crank–Nicolson θ = ½, backward Euler θ = 1); BDF2 with step
ratio ω = h_n / h_n−1: a = ((1 + 2ω)/(1 + ω), −(1 + ω), ω²/(1 + ω)), β = 1.

The local error is estimated without derivatives (Milne's device): a polynomial of the
scheme's order p through the last p + 1 states predicts T_n+1; both are exact for polynomials
of degree p, so their difference is proportional to the (p+1)-th derivative, with constants
found by applying each to t^(p+1)/(p+1)! — so the estimate holds for any step ratios.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np


@dataclass
class StepResult:
    """What a step produced: the field (°C), 1ᵀC(T) (J), the heat taken in over the step as
    the scheme integrates it (J, before the multistep correction), and the fixed groups'
    reactions (W)."""

    field: np.ndarray
    stored: float
    heat: float
    reactions: dict[str, float]


@dataclass(frozen=True)
class StepFormula:
    """Coefficients of one step: ``a`` on (T_n+1, T_n, T_n−1, ...), ``beta``, and the order."""

    a: tuple[float, ...]
    beta: float
    order: int = 2

    @property
    def history(self) -> int:
        """How many past states the formula needs."""
        return len(self.a) - 1

    def matrix_scale(self, step: float) -> float:
        """The step matrix is M + s·A with s = β·h/a_0: equal s, equal matrix."""
        return self.beta * step / self.a[0]

    def local_error_constant(self, times: tuple[float, ...]) -> float:
        """Local error of one step over ``times`` = (t_n+1, t_n, t_n−1, ...) per unit
        (p+1)-th derivative, p the order."""
        p = self.order
        t1, t0 = times[0], times[1]
        h = t1 - t0
        y = [(t - t0) ** (p + 1) / math.factorial(p + 1) for t in times[: len(self.a)]]
        dy1, dy0 = (t1 - t0) ** p / math.factorial(p), 0.0
        residual = sum(a * v for a, v in zip(self.a, y, strict=False)) - h * (
            self.beta * dy1 + (1 - self.beta) * dy0
        )
        return -residual / self.a[0]


def theta_formula(theta: float) -> StepFormula:
    return StepFormula((1.0, -1.0), theta, 2 if theta == 0.5 else 1)


def bdf2_formula(ratio: float) -> StepFormula:
    """BDF2 for a step ``ratio`` times the previous one."""
    w = ratio
    return StepFormula(((1 + 2 * w) / (1 + w), -(1 + w), w * w / (1 + w)), 1.0, 2)


def predictor_error_constant(times: tuple[float, ...], order: int) -> float:
    """Error per unit (p+1)-th derivative of the degree-p polynomial through the last p + 1
    states, at t_n+1."""
    t1 = times[0]
    return -math.prod(t1 - t for t in times[1 : order + 2]) / math.factorial(order + 1)


def predict(times: tuple[float, ...], states: list[np.ndarray]) -> np.ndarray:
    """The polynomial through ``states`` at times[1:], evaluated at times[0]."""
    t, nodes = times[0], times[1 : len(states) + 1]
    result = np.zeros_like(states[0])
    for j, (xj, state) in enumerate(zip(nodes, states, strict=True)):
        weight = math.prod((t - xk) / (xj - xk) for k, xk in enumerate(nodes) if k != j)
        result = result + weight * state
    return result


def local_error(
    formula: StepFormula, times: tuple[float, ...], result: np.ndarray, states: list[np.ndarray]
) -> np.ndarray:
    """Estimated local error of ``result`` (the scheme's T_n+1) from the last p + 1 states."""
    p = formula.order
    c_scheme = formula.local_error_constant(times)
    c_predictor = predictor_error_constant(times, p)
    prediction = predict(times, states[: p + 1])
    return c_scheme / (c_scheme - c_predictor) * (result - prediction)
