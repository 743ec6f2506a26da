"""The gathers to quadrature points that a nonlinear residual and its tangent use
(``fem.quadrature.QuadratureOperator``) against scikit-fem's own assembly, computed here.

The capacity tangent ∫ c φ_j φ_i dV with a coefficient c varying over the points (c = 1 + x² +
3y, as ρc(T) varies with a field), and the stored heat's ∫ f φ_i dV, on P1 and P2 triangles,
planar and axisymmetric (weight 2πr): scikit-fem's ``asm`` of the same forms with the same
quadrature rule evaluates the same sums in another order, so they agree to round-off
(tolerance 1e-12 of the largest entry).
"""

from __future__ import annotations

import numpy as np
import pytest
from skfem import Basis, BilinearForm, ElementTriP1, ElementTriP2, LinearForm, MeshTri, asm

from fem.quadrature import QuadratureOperator


def _coefficient(x, y):
    return 1.0 + x**2 + 3.0 * y


@BilinearForm
def _capacity(u, v, w):
    radius = 2.0 * np.pi * w.x[0] if w.axisymmetric else 1.0
    return _coefficient(w.x[0], w.x[1]) * u * v * radius


@LinearForm
def _load(v, w):
    radius = 2.0 * np.pi * w.x[0] if w.axisymmetric else 1.0
    return _coefficient(w.x[0], w.x[1]) ** 2 * v * radius


@pytest.mark.parametrize("element", [ElementTriP1, ElementTriP2], ids=["P1", "P2"])
@pytest.mark.parametrize("axisymmetric", [False, True], ids=["planar", "axisymmetric"])
def test_mass_and_integral_match_scikit_fem(element, axisymmetric):
    mesh = MeshTri.init_sqsymmetric().refined(3).translated((0.5, 0.2))
    basis = Basis(mesh, element())
    operator = QuadratureOperator(basis, axisymmetric)
    x, y = (np.asarray(c).ravel() for c in basis.global_coordinates())
    c = _coefficient(x, y)
    expected = asm(_capacity, basis, axisymmetric=axisymmetric).toarray()
    computed = operator.mass(c).toarray()
    assert np.abs(computed - expected).max() <= 1e-12 * np.abs(expected).max()
    assert operator._mass_gather is not None  # the folded product served
    load = asm(_load, basis, axisymmetric=axisymmetric)
    assert np.allclose(operator.integrate(c**2), load, rtol=0.0, atol=1e-12 * np.abs(load).max())
