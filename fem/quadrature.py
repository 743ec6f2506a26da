"""Gathers from nodal values to quadrature points, built once per basis, for the parts of the
equations that change with temperature; the edge terms the boundary conditions use.

scikit-fem's ``Basis.interpolate`` recomputes ``np.unique`` over every element's degrees of
freedom on each call, and ``asm`` rebuilds its index arrays on each call; a nonlinear step
interpolates and assembles a few times per iteration. Here the shape functions at the
quadrature points become sparse matrices once: V (values) and G_x, G_y (gradients), rows one
per quadrature point, with w the quadrature weights times the measure (2πr for axisymmetric
sections). Then, exactly as the forms of :mod:`fem.forms` integrate,

    ∫ f φ_i dV = Vᵀ(w·f),   ∫ c φ_j φ_i dV = Vᵀ diag(w·c) V,
    ∫ k ∇T·∇φ_i dV = Σ_d G_dᵀ(w·k·G_d T),

each a sparse product; the same quadrature rule as ``asm``, so results agree to round-off.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from functools import cached_property

import numpy as np
import scipy.sparse as sp
from skfem import FacetBasis, asm

from . import forms
from .conditions import Condition


class QuadratureOperator:
    """Sparse interpolation to the quadrature points of a scikit-fem basis (cells or facets).

    Parameters
    ----------
    basis : skfem.CellBasis or skfem.FacetBasis
    axisymmetric : bool
        Weight by 2πr (r = x) for a section revolved about x = 0.
    gradients : bool
        Also build the gradient gathers (cells only).
    """

    def __init__(self, basis, axisymmetric: bool, gradients: bool = False):
        dofs = basis.element_dofs  # (local shape function, element)
        elements, points = basis.dx.shape
        self.shape = (elements, points)
        rows = np.arange(elements * points).reshape(elements, points)
        size = (elements * points, basis.N)

        def gather(pick) -> sp.csr_matrix:
            data = np.concatenate([pick(basis.basis[i][0]).ravel() for i in range(basis.Nbfun)])
            cols = np.concatenate(
                [np.repeat(dofs[i], points) for i in range(basis.Nbfun)]
            )  # element-major, like the rows
            return sp.csr_matrix((data, (np.tile(rows.ravel(), basis.Nbfun), cols)), shape=size)

        self.values = gather(np.asarray)
        self.transposed = self.values.T.tocsr()
        self._dofs, self._size = dofs, basis.N
        self._phi = np.array([np.asarray(basis.basis[i][0]) for i in range(basis.Nbfun)])
        weights = np.asarray(basis.dx, dtype=float)
        if axisymmetric:
            weights = weights * 2.0 * np.pi * np.asarray(basis.global_coordinates())[0]
        self.weights = weights.ravel()
        if gradients:
            self._gradient_gathers(basis, gather)

    def _gradient_gathers(self, basis, gather) -> None:
        """∂/∂x and ∂/∂y stacked in one matrix: at every quadrature point, or once per element
        where the gradients are constant in it (P1 on straight triangles), which cuts a
        conduction residual's products by the number of points."""
        elements, points = self.shape
        fields = [np.asarray(basis.basis[i][0].grad) for i in range(basis.Nbfun)]
        self._grads = np.array(fields)  # (shape function, direction, element, point)
        scale = max(float(np.abs(f).max()) for f in fields)
        self.per_element = points > 1 and all(
            float(np.ptp(f, axis=-1).max()) <= 1e-12 * scale for f in fields
        )
        if self.per_element:
            dofs = basis.element_dofs
            rows = np.tile(np.arange(elements), basis.Nbfun)
            cols = np.concatenate([dofs[i] for i in range(basis.Nbfun)])
            parts = [
                sp.csr_matrix(
                    (np.concatenate([f[d, :, 0] for f in fields]), (rows, cols)),
                    shape=(elements, basis.N),
                )
                for d in range(2)
            ]
        else:
            parts = [gather(lambda field, d=d: field.grad[d]) for d in range(2)]
        self.gradient = sp.vstack(parts).tocsr()
        self.gradient_transposed = self.gradient.T.tocsr()

    def interpolate(self, field: np.ndarray) -> np.ndarray:
        """The nodal ``field`` at the quadrature points, flat (element-major)."""
        return self.values @ field

    def integrate(self, value) -> np.ndarray:
        """∫ f φ_i for ``value`` f at the quadrature points (flat or (elements, points))."""
        return self._weighted_transposed @ np.ravel(value)

    @cached_property
    def _weighted_transposed(self) -> sp.csr_matrix:
        """Vᵀ·diag(w): the weights folded into the scatter once, not multiplied every call."""
        return (self.transposed @ sp.diags(self.weights)).tocsr()

    @cached_property
    def _scatter(self):
        """Element matrices → the global matrix: the pattern (indices, indptr) of every pair of
        an element's degrees of freedom, and the sparse sum S of each element entry (ordered
        element, row, column) into its place, so assembling is one product S·entries."""
        dofs, size = self._dofs, self._size
        local = dofs.shape[0]
        rows = np.broadcast_to(dofs[:, None, :], (local, local, dofs.shape[1]))
        cols = np.broadcast_to(dofs[None, :, :], (local, local, dofs.shape[1]))
        keys = (
            rows.transpose(2, 0, 1).astype(np.int64).ravel() * size
            + cols.transpose(2, 0, 1).ravel()
        )
        unique, inverse = np.unique(keys, return_inverse=True)
        scatter = sp.csr_matrix(
            (np.ones(keys.size), (inverse, np.arange(keys.size))), shape=(unique.size, keys.size)
        )
        indices = (unique % size).astype(np.int32)
        indptr = np.searchsorted(unique // size, np.arange(size + 1)).astype(np.int32)
        return scatter, indices, indptr

    def _assembled(self, entries: np.ndarray) -> sp.csr_matrix:
        """The global matrix of element matrices ``entries`` (element, row, column)."""
        scatter, indices, indptr = self._scatter
        data = scatter @ entries.ravel()
        return sp.csr_matrix((data, indices, indptr), shape=(self._size, self._size))

    def mass(self, coefficient) -> sp.csr_matrix:
        """∫ c φ_j φ_i for ``coefficient`` c at the quadrature points."""
        weighted = self.weights * np.ravel(coefficient)
        if self._mass_gather is not None:
            _, indices, indptr = self._scatter
            data = self._mass_gather @ weighted
            return sp.csr_matrix((data, indices, indptr), shape=(self._size, self._size))
        weighted = weighted.reshape(self.shape)
        phi = self._phi
        # Two operands need no contraction path (einsum's search costs ~0.1 ms a call).
        return self._assembled(np.einsum("iep,jep->eij", phi * weighted, phi))

    @cached_property
    def _mass_gather(self) -> sp.csr_matrix | None:
        """The mass matrix's entries as one sparse product with w·c at the points: the shape
        functions' values at the quadrature points are the reference element's, the same on
        every element, so entry ij of element e is Σ_p w·c(e, p)·φ_i(p)·φ_j(p), and the
        element entries' sum into place (:attr:`_scatter`) folds into the same matrix. None if
        the values differ between elements (then the element matrices are formed each call)."""
        phi = self._phi  # (shape function, element, point)
        if not np.allclose(phi, phi[:, :1, :], rtol=0.0, atol=1e-12 * np.abs(phi).max()):
            return None
        elements, points = self.shape
        local = phi.shape[0]
        products = np.einsum("ip,jp->ijp", phi[:, 0, :], phi[:, 0, :]).reshape(local**2, points)
        rows = np.repeat(np.arange(elements * local**2), points)
        columns = (
            np.arange(elements)[:, None, None] * points + np.arange(points)[None, None, :]
        ) + np.zeros((1, local**2, 1), dtype=np.int64)
        values = np.broadcast_to(products[None], (elements, local**2, points))
        spread = sp.csr_matrix(
            (values.ravel(), (rows, columns.ravel())),
            shape=(elements * local**2, elements * points),
        )
        scatter, _, _ = self._scatter
        return (scatter @ spread).tocsr()

    def _weighted(self, conductivity: np.ndarray) -> np.ndarray:
        """w·k at each row of the stacked gradient (per element: summed over its points)."""
        weighted = self.weights * conductivity
        if self.per_element:  # a product, not .sum(axis=1): numpy's short-axis sums are slow
            weighted = weighted.reshape(self.shape) @ np.ones(self.shape[1])
        return np.concatenate((weighted, weighted))

    def conduction(self, conductivity, field: np.ndarray) -> np.ndarray:
        """∫ k ∇T·∇φ_i for ``conductivity`` k at the quadrature points and nodal ``field``;
        with k a tuple (k_xx, k_xy, k_yy) of an orthotropic region, ∫ (K ∇T)·∇φ_i."""
        if isinstance(conductivity, tuple):
            k_xx, k_xy, k_yy = (self._weighted(k) for k in conductivity)
            m = len(k_xx) // 2  # rows of one direction (points, or elements)
            k_xx, k_xy, k_yy = k_xx[:m], k_xy[:m], k_yy[:m]
            gradient = self.gradient @ field
            g_x, g_y = gradient[:m], gradient[m:]
            flux = np.concatenate((k_xx * g_x + k_xy * g_y, k_xy * g_x + k_yy * g_y))
            return self.gradient_transposed @ flux
        return self.gradient_transposed @ (self._weighted(conductivity) * (self.gradient @ field))

    def conduction_tangent(
        self, conductivity: np.ndarray, slope: np.ndarray, field: np.ndarray
    ) -> sp.csr_matrix:
        """∫ (k ∇δ + k'(T) δ ∇T)·∇φ_i: the derivative of :meth:`conduction` for k(T)."""
        if isinstance(conductivity, tuple):
            return self._tensor_tangent(conductivity, slope, field)
        grads, phi = self._grads, self._phi
        conducting = (self.weights * conductivity).reshape(self.shape)
        entries = np.einsum("idep,jdep,ep->eij", grads, grads, conducting, optimize=True)
        gradient = np.einsum("idep,ie->dep", grads, field[self._dofs], optimize=True)  # ∇T
        along = np.einsum("idep,dep->iep", grads, gradient, optimize=True)  # ∇φ_i·∇T
        sloping = (self.weights * slope).reshape(self.shape)
        entries += np.einsum("iep,jep,ep->eij", along, phi, sloping, optimize=True)
        return self._assembled(entries)

    def _tensor_tangent(self, components, slopes, field: np.ndarray) -> sp.csr_matrix:
        """∫ (K ∇δ + K'(T) δ ∇T)·∇φ_i, K = [[k_xx, k_xy], [k_xy, k_yy]]: the derivative of
        :meth:`conduction` for an orthotropic K(T)."""
        grads, phi = self._grads, self._phi
        k_xx, k_xy, k_yy = ((self.weights * k).reshape(self.shape) for k in components)
        tensor = ((k_xx, k_xy), (k_xy, k_yy))
        entries = sum(
            np.einsum("iep,jep,ep->eij", grads[:, a], grads[:, b], tensor[a][b], optimize=True)
            for a in range(2)
            for b in range(2)
        )
        gradient = np.einsum("idep,ie->dep", grads, field[self._dofs], optimize=True)  # ∇T
        s_xx, s_xy, s_yy = (np.reshape(s, self.shape) for s in slopes)
        flux = np.array(
            [s_xx * gradient[0] + s_xy * gradient[1], s_xy * gradient[0] + s_yy * gradient[1]]
        )  # K'(T) ∇T
        along = np.einsum("idep,dep->iep", grads, flux, optimize=True)  # ∇φ_i·K'∇T
        weights = self.weights.reshape(self.shape)
        entries = entries + np.einsum("iep,jep,ep->eij", along, phi, weights, optimize=True)
        return self._assembled(entries)


def remembered(system, name: str, temperature: np.ndarray, compute) -> np.ndarray:
    """``compute(temperature)``, or the last result when ``temperature`` is the field it was
    computed for: a step's last residual and the next step's known part share their field.
    The result is read-only, since callers receive the remembered array itself."""
    memo = system.__dict__.get(name)
    if memo is not None and np.array_equal(memo[0], temperature):
        return memo[1]
    result = compute(temperature)
    result.flags.writeable = False
    system.__dict__[name] = (temperature.copy(), result)
    return result


@dataclass
class EdgeTerms:
    """One edge group's basis and what its conditions ask of it (a
    :class:`fem.conditions.SurfaceEdge`): fields at its quadrature points, fluxes given there
    integrated against the shape functions, and exchange matrices for coefficients given
    there."""

    basis: FacetBasis
    weights: np.ndarray  # ∫ φ_i dS
    area: float  # Σ weights: the group's surface area
    axisymmetric: bool
    conditions: tuple[Condition, ...]  # those of its conditions through which heat flows

    def with_conditions(self, conditions: tuple[Condition, ...]) -> EdgeTerms:
        """The same edge terms for other conditions (what is already built is kept)."""
        terms = dataclasses.replace(self, conditions=conditions)
        for built in ("exchange_matrix", "quadrature"):
            if built in self.__dict__:
                terms.__dict__[built] = self.__dict__[built]
        return terms

    @cached_property
    def exchange_matrix(self) -> sp.csr_matrix:
        """∫ φ_j φ_i dS: the exchange matrix of a unit coefficient, m²."""
        return self._exchange(1.0)

    @cached_property
    def quadrature(self) -> QuadratureOperator:
        """The gather to this edge's quadrature points, built on first use."""
        return QuadratureOperator(self.basis, self.axisymmetric)

    def interpolate(self, field_: np.ndarray) -> np.ndarray:
        """The nodal ``field_`` at the quadrature points, shape (facets, points)."""
        return self.quadrature.interpolate(field_).reshape(self.quadrature.shape)

    def integrate(self, flux) -> np.ndarray:
        """∫ q φ_i dS per node, ``flux`` q in W/m² at the quadrature points (or a number)."""
        if np.ndim(flux) == 0:
            return flux * self.weights
        return self.quadrature.integrate(flux)

    def exchange(self, coefficient) -> sp.csr_matrix:
        """∫ c φ_j φ_i dS, ``coefficient`` c in W/(m²·K) at the quadrature points (or a
        number)."""
        if np.ndim(coefficient) == 0:
            return coefficient * self.exchange_matrix
        return self._exchange(coefficient)

    def _exchange(self, coefficient) -> sp.csr_matrix:
        if np.ndim(coefficient):
            return self.quadrature.mass(coefficient)
        return asm(
            forms.surface_exchange,
            self.basis,
            coefficient=coefficient,
            axisymmetric=self.axisymmetric,
        ).tocsr()
