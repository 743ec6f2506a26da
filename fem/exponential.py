"""The exact-in-time solution of a linear step of constant coefficients by shift-and-invert
Krylov approximation of the matrix exponential.

Between two breakpoints of a linear model, M·u' = r − A·u with M, A and r constant (M
symmetric positive definite, A symmetric positive semi-definite). From u(0) = u0,

    u(τ) = u0 + τ·φ1(−τK)·M⁻¹(r − A·u0),    K = M⁻¹A,   φ1(x) = (eˣ − 1)/x,

for every τ at once. The shift-and-invert Lanczos process (van den Eshof & Hochbruck,
"Preconditioning Lanczos approximations to the matrix exponential", SIAM J. Sci. Comput. 27
(2006) 1438–1457; Moret & Novati, BIT 44 (2004) 595–615; from memory) builds an
M-orthonormal basis V of the Krylov space of S = (M + γA)⁻¹M, whose eigenvalues 1/(1 + γλ)
lie in (0, 1] whatever the mesh, so the basis needed for a given accuracy does not grow as
the mesh is refined. One factorisation of M + γA serves the whole interval and every output
time in it; each basis vector costs one triangular solve.

With V's tridiagonal T = QΘQᵀ, K acts on the space as (T⁻¹ − I)/γ with eigenvalues
λ_i = (1/θ_i − 1)/γ, and (the start is z = (M + γA)⁻¹(r − A·u0) = S·M⁻¹(r − A·u0))

    u(τ) ≈ u0 + ‖z‖_M · V·Q·diag(g(τ, λ_i)/θ_i)·Qᵀe₁,

with g = τφ1(−τλ) for u, e^{−τλ} for u' and τ²φ2(−τλ) for ∫₀^τ u dt (the heat balance).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

CHECK_EVERY = 4  # basis vectors between convergence checks
WORST_TIMES = 16  # the largest nodal change is looked for at this many times
LAG = 2  # the error of dimension m is estimated by the change from dimension m − LAG
SMALL = 1e-4  # below this τλ, φ1 is taken from its series
PHI2_SMALL = 2e-3  # and φ2 from its


def phi1(tau: np.ndarray, rate: np.ndarray) -> np.ndarray:
    """(1 − e^{−τλ})/λ = τ·φ1(−τλ), with its limit τ at λ = 0."""
    x = tau * rate
    series = tau * (1.0 - x / 2.0 + x * x / 6.0)
    with np.errstate(divide="ignore", invalid="ignore"):
        exact = -np.expm1(-x) / rate
    return np.where(x < SMALL, series, exact)


def phi2(tau: np.ndarray, rate: np.ndarray) -> np.ndarray:
    """∫₀^τ (1 − e^{−sλ})/λ ds = (τ − τφ1)/λ, with its limit τ²/2 at λ = 0."""
    x = tau * rate
    # x + expm1(−x) ≈ x²/2 loses ~2ε/x to cancellation: the series goes further (x < 2e-3,
    # truncation below x⁵/2520)
    series = tau * tau * (0.5 - x / 6.0 + x * x / 24.0 - x**3 / 120.0 + x**4 / 720.0)
    with np.errstate(divide="ignore", invalid="ignore"):
        exact = (x + np.expm1(-x)) / (rate * rate)
    return np.where(x < PHI2_SMALL, series, exact)


@dataclass(frozen=True)
class KrylovExponential:
    """u(τ) on one interval of constant coefficients, for any τ in it.

    Attributes
    ----------
    start : ndarray
        u0, the state at τ = 0.
    basis : ndarray
        Vᵀ, shape (m, n): its rows are the M-orthonormal basis vectors (rows, so that every
        product with it reads memory in order).
    eigenvectors : ndarray
        Q, shape (m, m).
    theta : ndarray
        Θ, the eigenvalues of T, in (0, 1].
    rates : ndarray
        λ = (1/θ − 1)/γ in 1/s.
    scale : float
        ‖z‖_M.
    solves : int
        Triangular solves spent.
    """

    start: np.ndarray
    basis: np.ndarray
    eigenvectors: np.ndarray
    theta: np.ndarray
    rates: np.ndarray
    scale: float
    solves: int

    @property
    def dimension(self) -> int:
        return self.basis.shape[0]

    def _coefficients(self, kind, taus: np.ndarray) -> np.ndarray:
        """Coefficient vectors in the basis, shape (m, len(taus))."""
        taus = np.asarray(taus, dtype=float)[:, None]
        if kind == "value":
            g = phi1(taus, self.rates)
        elif kind == "rate":
            g = np.exp(-taus * self.rates)
        else:
            g = phi2(taus, self.rates)
        if self.dimension == 0:  # started at rest: u(τ) = u0
            return np.zeros((0, taus.shape[0]))
        weights = g / self.theta * (self.eigenvectors[0] * self.scale)
        return self.eigenvectors @ weights.T

    def fields(self, taus, out: np.ndarray | None = None) -> np.ndarray:
        """u(τ) for each τ, shape (len(taus), n); written into ``out`` (rows) when given, so
        a run of many records reuses one buffer instead of faulting in fresh pages."""
        coefficients = self._coefficients("value", taus).T
        if out is None:
            out = np.empty((coefficients.shape[0], self.start.size))
        out = out[: coefficients.shape[0]]
        if self.dimension:
            np.matmul(coefficients, self.basis, out=out)
            out += self.start
        else:
            out[:] = self.start
        return out

    def functional(self, row: np.ndarray, taus, kind: str = "value") -> np.ndarray:
        """rowᵀu(τ) ("value"), rowᵀu'(τ) ("rate") or rowᵀ∫₀^τ u ("integral") for each τ,
        without forming the fields."""
        taus = np.asarray(taus, dtype=float)
        projected = self.basis @ row
        change = projected @ self._coefficients(kind, taus)
        if kind == "value":
            return float(row @ self.start) + change
        if kind == "integral":
            return float(row @ self.start) * taus + change
        return change


def krylov_exponential(
    solve,
    capacity: sp.spmatrix,
    operator: sp.spmatrix,
    forcing: np.ndarray,
    start: np.ndarray,
    shift: float,
    taus: np.ndarray,
    tolerance: float,
    max_dimension: int,
) -> tuple[KrylovExponential, float, bool]:
    """Build the approximation of u on (0, max(taus)] to ``tolerance`` at ``taus``.

    Parameters
    ----------
    solve : callable
        x ↦ (M + shift·A)⁻¹x.
    capacity, operator : sparse matrix
        M (J/K) and A (W/K).
    forcing : ndarray
        r in W.
    start : ndarray
        u0 in °C.
    shift : float
        γ in s.
    taus : ndarray
        Times in s after the start where the accuracy is checked.
    tolerance : float
        Largest change in K at any node and τ between the approximation and the one with
        ``LAG`` fewer basis vectors.
    max_dimension : int
        Largest basis.

    Returns
    -------
    (KrylovExponential, estimate, converged)
        The approximation, its error estimate in K and whether the estimate met the
        tolerance.
    """
    n = start.size
    residual = forcing - operator @ start
    z = solve(residual)
    solves = 1
    Mz = capacity @ z
    norm = float(np.sqrt(max(z @ Mz, 0.0)))
    if norm == 0.0:  # already at rest: u(τ) = u0
        empty = KrylovExponential(
            start, np.zeros((0, n)), np.zeros((0, 0)), np.zeros(0), np.zeros(0), 0.0, solves
        )
        return empty, 0.0, True
    total_capacity = float(capacity.sum())
    basis = np.empty((max_dimension, n))
    alpha = np.zeros(max_dimension)
    beta = np.zeros(max_dimension)
    basis[0] = z / norm
    estimate = np.inf
    for j in range(max_dimension):
        w = solve(capacity @ basis[j])
        solves += 1
        Mw = capacity @ w
        alpha[j] = basis[j] @ Mw
        for _ in range(2):  # full reorthogonalisation in the M inner product, twice
            w -= (basis[: j + 1] @ Mw) @ basis[: j + 1]
            Mw = capacity @ w
        beta[j] = float(np.sqrt(max(w @ Mw, 0.0)))
        m = j + 1
        invariant = beta[j] <= 1e-13 * max(abs(alpha[j]), 1e-300)
        if not (invariant or m == max_dimension):
            basis[m] = w / beta[j]
        due = m >= 2 * LAG + CHECK_EVERY and m % CHECK_EVERY == 0
        if invariant or m == max_dimension or due:
            result = _project(start, basis[:m], alpha[:m], beta[: m - 1], norm, shift, solves)
            if invariant:  # the space holds the exact solution
                return result, 0.0, True
            smaller = _project(
                start, basis[: m - LAG], alpha[: m - LAG], beta[: m - LAG - 1], norm, shift
            )
            difference = result._coefficients("value", taus)
            difference[: m - LAG] -= smaller._coefficients("value", taus)
            # cheap first: the M-norm of the change as a root-mean-square temperature
            rms = np.sqrt((difference**2).sum(axis=0) / total_capacity)
            if rms.max() <= tolerance or m == max_dimension:
                # then the nodes: at the times where the change is largest on average
                worst = np.argsort(rms)[-WORST_TIMES:]
                estimate = float(np.abs(difference[:, worst].T @ result.basis).max())
                if estimate <= tolerance:
                    return result, estimate, True
    return result, estimate, False


def _project(start, basis, alpha, beta, norm, shift, solves=0) -> KrylovExponential:
    tridiagonal = np.diag(alpha) + np.diag(beta, 1) + np.diag(beta, -1)
    theta, eigenvectors = np.linalg.eigh(tridiagonal)
    theta = np.clip(theta, 1e-300, 1.0)  # S has its spectrum in (0, 1]: clip round-off
    rates = (1.0 / theta - 1.0) / shift
    return KrylovExponential(start, basis, eigenvectors, theta, rates, norm, solves)
