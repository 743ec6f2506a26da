"""The least-squares fit, its uncertainty and whether the data can identify what was asked.

Values: ``scipy.optimize.least_squares`` (trust-region reflective, within bounds) on the
residuals predicted − measured, with finite-difference sensitivities from the reused system.
Tables of nodes add Tikhonov rows √λ·D₂p (second differences, :meth:`Parameters.curvature`);
λ follows Morozov's discrepancy principle: the largest λ whose fit, linearised at the current
estimate, leaves a root-mean-square residual equal to the stated thermocouple uncertainty σ.

Uncertainty: with J the data sensitivities at the estimate and A = JᵀJ + λDᵀD, the covariance
is s²·A⁻¹JᵀJA⁻¹ (s²(JᵀJ)⁻¹ without regularisation), s² = ‖r‖²/(m − n_eff) the residual
scatter, n_eff = trace(JA⁻¹Jᵀ). Bands are ± t(0.975, m − n_eff) standard errors. The bias a
penalty introduces is not in the band: the penalty is on curvature, so straight lines are fitted
without it.
"""

from __future__ import annotations

import time
from dataclasses import dataclass

import numpy as np

from ..errors import AdvisorError
from .identifiability import Identifiability, identifiability
from .problem import FitProblem

CONFIDENCE = 0.95
SENSITIVITY_CHANGE = 0.10  # a 10 % change of a parameter ...
LAMBDA_SPAN = (1e-10, 1e6)  # λ searched over this span times trace(JᵀJ)/trace(DᵀD)
ROUNDS = 3  # choices of λ by the discrepancy principle, each followed by a fit
SETTLED = 4.0  # a new λ within this factor of the last keeps the last fit
ENDS = {
    "largest": " (at the top of its span: straight lines fit the readings within the stated "
    "uncertainty)",
    "smallest": " (at the bottom of its span: no table brings the residual down to the stated "
    "uncertainty, so the model misses something or the uncertainty is stated too small)",
}


@dataclass(frozen=True)
class FitResult:
    """A fitted parameter set with its uncertainty.

    Attributes
    ----------
    names, units : tuple of str
    values, standard_errors : ndarray
        Fitted values and their standard errors, in ``units``.
    band : ndarray, shape (n, 2)
        The 95 % confidence interval of each value.
    correlation, covariance : ndarray, shape (n, n)
    predicted, residuals : ndarray, shape (times, probes)
        Fitted temperatures (°C) and predicted − measured (K) at the measured times.
    predicted_band : ndarray, shape (times, probes)
        Half-width of the 95 % band of the fitted curves, K.
    rms_residual : float
        Root-mean-square residual, K.
    uncertainty : float or None
        The thermocouple uncertainty stated, K.
    scatter : float
        s, the residual scatter per reading after the parameters' share, K.
    degrees_of_freedom : float
        m − n_eff.
    regularisation : float
        Tikhonov's λ (K², 0 when no table is fitted).
    regularisation_rule : str
    condition_number : float
        Of the sensitivities with each column scaled by its value.
    sensitivities : ndarray
        Largest change of any reading (K) when each parameter changes by 10 %.
    verdict : Identifiability
    trials : int
        Transient solves made.
    seconds : float
        Wall-clock time of the fit, s.
    """

    names: tuple[str, ...]
    units: tuple[str, ...]
    values: np.ndarray
    standard_errors: np.ndarray
    band: np.ndarray
    correlation: np.ndarray
    covariance: np.ndarray
    predicted: np.ndarray
    residuals: np.ndarray
    predicted_band: np.ndarray
    rms_residual: float
    uncertainty: float | None
    scatter: float
    degrees_of_freedom: float
    regularisation: float
    regularisation_rule: str
    condition_number: float
    sensitivities: np.ndarray
    verdict: Identifiability
    trials: int
    seconds: float


def fit(problem: FitProblem, *, uncertainty: float | None = None) -> FitResult:
    """Fit the problem's parameters to its readings.

    Parameters
    ----------
    problem : FitProblem
    uncertainty : float, optional
        The thermocouples' random error (one standard deviation), K. Needed when a table of
        nodes is fitted: it sets the regularisation by the discrepancy principle.

    Returns
    -------
    FitResult

    Raises
    ------
    AdvisorError
        A table of nodes without ``uncertainty``, or an uncertainty that is not > 0.
    """
    started = time.perf_counter()
    parameters = problem.parameters
    penalty = parameters.curvature()
    check_uncertainty(uncertainty, tables=bool(penalty.shape[0]))
    values, weight, rule = parameters.stacked("start"), 0.0, "none"
    if penalty.shape[0]:
        values, weight, end = _regularised(problem, values, penalty, uncertainty)
        rule = "Tikhonov (second differences), λ by the discrepancy principle" + ENDS.get(end, "")
    else:
        if parameters.size > len(parameters.blocks):
            values = _constant_start(problem)
        values = _least_squares(problem, values, penalty, 0.0)
    return _result(problem, values, penalty, (weight, rule), uncertainty, started)


def check_uncertainty(uncertainty: float | None, *, tables: bool) -> None:
    """Refuse an uncertainty that is not > 0, or none when a regularised table is fitted.

    Raises
    ------
    AdvisorError
    """
    if uncertainty is not None and not uncertainty > 0:
        raise AdvisorError(
            f"the thermocouple uncertainty must be > 0 K, got {uncertainty!r}",
            argument="uncertainty",
        )
    if tables and uncertainty is None:
        raise AdvisorError(
            "a table of more than two nodes is regularised by the discrepancy principle, "
            "which needs the thermocouples' random error: give --uncertainty (K, one standard "
            "deviation)",
            argument="uncertainty",
        )


def _regularised(problem: FitProblem, values, penalty, uncertainty):
    """Fit the smoothest tables first (the limit λ → ∞: only tables the penalty does not see,
    straight lines, so a well-posed fit of a few values), then take λ by the discrepancy
    principle at that estimate and fit again, until λ settles."""
    values = _smoothest(problem, values, penalty)
    jacobian = problem.jacobian(values, problem.difference_step)
    weight, last_end = _weight_scale(jacobian, penalty) * LAMBDA_SPAN[1], "largest"
    for _ in range(ROUNDS):
        jacobian = problem.jacobian(values, problem.difference_step)
        chosen, end = discrepancy_weight(
            problem.residuals(values), jacobian, penalty, values, uncertainty
        )
        if 1 / SETTLED < chosen / weight < SETTLED or (end and end == last_end):
            break
        weight, last_end = chosen, end
        values = _least_squares(problem, values, penalty, weight)
    return values, weight, last_end


def _smoothest(problem: FitProblem, start, penalty) -> np.ndarray:
    """The best fit among values the penalty does not see (its null space: a straight line per
    table, single values as they are), a few parameters, values kept within the bounds."""
    from scipy.linalg import null_space
    from scipy.optimize import least_squares

    parameters = problem.parameters
    lower, upper = parameters.stacked("lower"), parameters.stacked("upper")
    basis = null_space(penalty)

    def expand(reduced):
        return np.clip(basis @ reduced, lower, upper)

    reduced = np.linalg.lstsq(basis, np.clip(start, lower, upper), rcond=None)[0]
    found = least_squares(
        lambda x: problem.residuals(expand(x)),
        reduced,
        jac="2-point",
        diff_step=problem.difference_step,
        x_scale="jac",
        xtol=1e-6,
        ftol=1e-8,
        max_nfev=40,
    )
    return expand(found.x)


def _weight_scale(jacobian, penalty) -> float:
    """trace(JᵀJ)/trace(DᵀD): λ in units that make the two terms comparable, K²."""
    return float(np.sum(jacobian**2) / max(np.sum(penalty**2), 1e-300))


def _least_squares(problem: FitProblem, start, penalty, weight) -> np.ndarray:
    from scipy.optimize import least_squares

    parameters = problem.parameters
    lower, upper = parameters.stacked("lower"), parameters.stacked("upper")
    root = np.sqrt(weight)

    def residuals(values):
        return np.concatenate([problem.residuals(values), root * (penalty @ values)])

    def jacobian(values):
        data = problem.jacobian(values, problem.difference_step)
        return np.vstack([data, root * penalty])

    found = least_squares(
        residuals,
        np.clip(start, lower, upper),
        jac=jacobian,
        bounds=(lower, upper),
        x_scale="jac",
        xtol=1e-6,  # relative: far below any standard error a fit can have
        ftol=1e-8,
        max_nfev=60,
    )
    return found.x


def _constant_start(problem: FitProblem) -> np.ndarray:
    """The best fit with every table held flat (one value per request): a start near the
    solution, found at the cost of one parameter per request."""
    from scipy.optimize import least_squares

    parameters = problem.parameters
    sizes = [b.size for b in parameters.blocks]

    def expand(reduced):
        return np.repeat(reduced, sizes)

    lower = np.array([b.lower.max() for b in parameters.blocks])
    upper = np.array([b.upper.min() for b in parameters.blocks])
    start = np.clip([b.start.mean() for b in parameters.blocks], lower, upper)
    found = least_squares(
        lambda reduced: problem.residuals(expand(reduced)),
        start,
        jac="2-point",
        diff_step=problem.difference_step,
        bounds=(lower, upper),
        x_scale="jac",
        xtol=1e-3,  # a start: the full fit refines it
        ftol=1e-4,
        max_nfev=20,
    )
    return expand(found.x)


def discrepancy_weight(residual, jacobian, penalty, values, uncertainty) -> float:
    """λ by Morozov's discrepancy principle on the problem linearised at ``values``.

    For each λ the step δ = −A⁻¹(Jᵀr + λDᵀDp), A = JᵀJ + λDᵀD, predicts the residual
    r + Jδ; its root-mean-square grows with λ. The λ where it equals ``uncertainty`` is found
    by bisection in log λ; the ends of the span are taken when the noise level lies outside
    what λ can reach (a fit worse than the noise at λ → 0: the smallest; a straight line
    within the noise: the largest).

    Returns
    -------
    (float, str or None)
        λ in K², and ``"smallest"`` or ``"largest"`` when it is an end of the span.
    """
    normal, gradient = jacobian.T @ jacobian, jacobian.T @ residual
    smooth = penalty.T @ penalty
    scale = _weight_scale(jacobian, penalty)

    def misfit(log_weight: float) -> float:
        weight = scale * 10.0**log_weight
        step = np.linalg.lstsq(
            normal + weight * smooth, -(gradient + weight * smooth @ values), rcond=None
        )[0]
        return float(np.sqrt(np.mean((residual + jacobian @ step) ** 2)))

    low, high = np.log10(LAMBDA_SPAN[0]), np.log10(LAMBDA_SPAN[1])
    if misfit(low) >= uncertainty:
        return scale * 10.0**low, "smallest"
    if misfit(high) <= uncertainty:
        return scale * 10.0**high, "largest"
    for _ in range(40):
        middle = 0.5 * (low + high)
        low, high = (middle, high) if misfit(middle) < uncertainty else (low, middle)
    return scale * 10.0 ** (0.5 * (low + high)), None


def _result(problem, values, penalty, regularisation, uncertainty, started) -> FitResult:
    from scipy.stats import t as student

    weight, rule = regularisation
    parameters = problem.parameters
    residual = problem.residuals(values)
    jacobian = problem.jacobian(values, problem.difference_step)
    normal = jacobian.T @ jacobian
    inverse = np.linalg.pinv(normal + weight * penalty.T @ penalty)
    covariance_shape = inverse @ normal @ inverse
    effective = float(np.trace(jacobian @ inverse @ jacobian.T))
    freedom = max(residual.size - effective, 1.0)
    scatter = float(np.sqrt(residual @ residual / freedom))
    covariance = scatter**2 * covariance_shape
    errors = np.sqrt(np.clip(np.diag(covariance), 0.0, None))
    quantile = float(student.ppf(0.5 + CONFIDENCE / 2, freedom))
    with np.errstate(invalid="ignore", divide="ignore"):
        correlation = covariance / np.outer(errors, errors)
    correlation = np.nan_to_num(correlation)
    curve_band = quantile * np.sqrt(np.einsum("ij,jk,ik->i", jacobian, covariance, jacobian))
    shape = problem.data.shape
    scaled = jacobian * values
    singular = np.linalg.svd(scaled, compute_uv=False)
    condition = float(singular[0] / singular[-1]) if singular[-1] > 0 else float("inf")
    sensitivities = SENSITIVITY_CHANGE * np.abs(scaled).max(axis=0)
    verdict = identifiability(
        parameters,
        values,
        errors,
        correlation,
        sensitivities,
        uncertainty or scatter,
    )
    return FitResult(
        parameters.names,
        parameters.units,
        np.asarray(values, dtype=float),
        errors,
        np.column_stack([values - quantile * errors, values + quantile * errors]),
        correlation,
        covariance,
        problem.data + residual.reshape(shape),
        residual.reshape(shape),
        curve_band.reshape(shape),
        float(np.sqrt(np.mean(residual**2))),
        uncertainty,
        scatter,
        freedom,
        float(weight),
        rule,
        condition,
        sensitivities,
        verdict,
        problem.trials,
        time.perf_counter() - started,
    )
