"""Symmetric factorisations of Newton tangents that are not symmetric themselves.

With k(T) by product approximation (:mod:`fem.nonlinear_assembly`) the step's tangent is

    J = a·M + β·(K⁰·D + E),   D = diag(k(T_j)),

a the formula's a₀/h, M the capacity, K⁰ the unit stiffness and E the symmetric exchange and
capacity tangents: the columns of the conduction are scaled by the nodal conductivity, so J is
not symmetric and wants LU. Scaled on the right by D⁻¹ (the Kirchhoff variable δΦ = k·δT as
unknown), J·D⁻¹ = a·M·D⁻¹ + β·K⁰ + β·E·D⁻¹ is symmetric but for the capacity and exchange
terms, whose entries couple neighbouring nodes only, where k differs by k'·ΔT over one element.
Its symmetric part P = (J·D⁻¹ + D⁻¹·Jᵀ)/2 then differs from J·D⁻¹ only by
M_ij·(1 − k_j/k_i)/2 in the capacity (and alike in E), so the chord δ = D⁻¹·P⁻¹·r converges
nearly as Newton's, and P takes the Cholesky factorisation, whose solves cost a third of the
LU's. (Taking the symmetric part of J itself errs by K⁰_ij·(k_j − k_i)/2 in the conduction, the
dominant term, and was measured to need 40 % more iterations.)
"""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp


class ScaledFactor:
    """The solve δ = D⁻¹·P⁻¹·r with P = sym(J·D⁻¹) factorised (see the module).

    Parameters
    ----------
    factor : object with ``solve(rhs)``
        The factorisation of the free block of P.
    scale : ndarray
        The nodal conductivity on the free degrees of freedom, W/(m·K).
    """

    def __init__(self, factor, scale: np.ndarray):
        self.factor, self.scale = factor, scale
        self.solver = getattr(factor, "solver", "superlu")

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        """δ with P·(D·δ) = ``rhs`` (W), K."""
        return self.factor.solve(rhs) / self.scale


def symmetric_scaled(jacobian: sp.spmatrix, scale: np.ndarray) -> sp.csr_matrix:
    """P = (J·D⁻¹ + D⁻¹·Jᵀ)/2 for D = diag(``scale``), the nodal conductivity."""
    right = sp.csr_matrix(jacobian) @ sp.diags(1.0 / scale)
    return (0.5 * (right + right.T)).tocsr()
