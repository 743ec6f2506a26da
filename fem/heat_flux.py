"""The heat flux −k∇T recovered from a temperature field, at the triangles and the vertices.

Numerics for the field writers and for anyone who wants the flux of a solution: the gradient of
the linear interpolant on each triangle, k at the triangle's mean temperature, averaged to the
vertices with area weights. Axisymmetric sections give the (r, z) components.
"""

from __future__ import annotations

from functools import cached_property
from typing import TYPE_CHECKING

import numpy as np
from scipy import sparse

from .materials import Material, PropertyTable
from .orthotropic import Orthotropic

if TYPE_CHECKING:
    from .model import ThermalModel


class HeatFluxRecovery:
    """The heat flux −k∇T of one model's temperature fields, with the geometry factored once.

    Everything that depends only on the mesh and the materials is computed here once: the
    corner differences and Jacobian determinants of the triangles, the conductivity of the
    regions whose conductivity is constant, and a sparse matrix that averages triangle values
    to the vertices with area weights. A field then costs one gather of the corner
    temperatures, a few array operations per triangle (k again only where it depends on
    temperature) and one sparse product per component. ∇T is formed from the corner
    differences T1 − T0 and T2 − T0, so a uniform field gives exactly zero flux.

    Parameters
    ----------
    model : ThermalModel
        The model whose section and materials the fields belong to.

    Examples
    --------
    >>> import numpy as np
    >>> from fem import Insulated, Material, ThermalModel
    >>> from geometries import Rectangle
    >>> section = Rectangle(0.02, 0.01).mesh(0.005)
    >>> steel = Material(40.0, 7850.0, 500.0)
    >>> model = ThermalModel(section, steel, dict.fromkeys(section.edge_groups, Insulated()), 20.0)
    >>> recovery = HeatFluxRecovery(model)
    >>> x, y = model.section.vertices
    >>> flux = recovery(100.0 + 1000.0 * x)  # T rises by 1000 K/m along x
    >>> bool(np.allclose(flux, [-40000.0, 0.0, 0.0], rtol=1e-12, atol=1e-6))
    True
    """

    def __init__(self, model: ThermalModel) -> None:
        section = model.section
        x, y = section.vertices
        t = np.ascontiguousarray(section.mesh.t[:3], dtype=np.intp)
        self._corners = t
        self._vertex_count = x.size
        # Corner differences d1 = p1 − p0, d2 = p2 − p0; with the Jacobian J = [d1 d2] and the
        # temperature differences a = T1 − T0, b = T2 − T0, ∇T = J⁻ᵀ (a, b).
        self._d1x, self._d1y = x[t[1]] - x[t[0]], y[t[1]] - y[t[0]]
        self._d2x, self._d2y = x[t[2]] - x[t[0]], y[t[2]] - y[t[0]]
        self._det = self._d1x * self._d2y - self._d1y * self._d2x
        self._area = 0.5 * np.abs(self._det)
        self._constant_k = np.full(t.shape[1], np.nan)
        self._tabulated: list[tuple[np.ndarray, Material]] = []
        self._tensors: list[tuple[np.ndarray, Orthotropic]] = []
        for name, material in model.materials.items():
            cells = np.asarray(section.regions[name], dtype=np.intp)
            if isinstance(material.conductivity, PropertyTable):
                self._tabulated.append((cells, material))
            else:
                self._constant_k[cells] = material.conductivity
            if material.orthotropic is not None:  # q = −K∇T with the whole tensor
                self._tensors.append((cells, material.orthotropic))

    def element(self, field: np.ndarray) -> np.ndarray:
        """Heat flux −k∇T in W/m² on every triangle, shape (n_triangles, 2).

        Parameters
        ----------
        field : ndarray
            Temperatures in °C at the vertices, shape (n_vertices,).

        Returns
        -------
        ndarray
            ∇T is the (constant) gradient of the linear interpolant of ``field`` on the
            triangle's corners, k the conductivity at the triangle's mean temperature.
        """
        return np.column_stack(self._element_components(field))

    def __call__(self, field: np.ndarray) -> np.ndarray:
        """Heat flux −k∇T in W/m² at the vertices, shape (n_vertices, 3), the third component 0.

        Parameters
        ----------
        field : ndarray
            Temperatures in °C at the vertices, shape (n_vertices,).

        Returns
        -------
        ndarray
            The area-weighted mean of :meth:`element` over the triangles that share each
            vertex.
        """
        result = np.empty((self._vertex_count, 3))
        for component, values in enumerate(self._element_components(field)):
            result[:, component] = self.averaging @ values  # 1-D products: the fast kernel
        result[:, 2] = 0.0
        return result

    @cached_property
    def averaging(self) -> sparse.csr_array:
        """The sparse matrix, (n_vertices, n_triangles), of the area-weighted vertex means."""
        corners = self._corners.ravel()
        weights = np.tile(self._area, 3)
        total = np.bincount(corners, weights=weights, minlength=self._vertex_count)
        triangles = np.tile(np.arange(self._corners.shape[1]), 3)
        return sparse.csr_array(
            (weights / total[corners], (corners, triangles)),
            shape=(self._vertex_count, self._corners.shape[1]),
        )

    def _corner_temperatures(self, field: np.ndarray) -> np.ndarray:
        return np.take(np.asarray(field, dtype=float), self._corners)

    def _conductivity(self, corner_temperatures: np.ndarray) -> np.ndarray:
        if not self._tabulated:
            return self._constant_k
        k = self._constant_k.copy()
        mean_temperature = corner_temperatures.mean(axis=0)
        for cells, material in self._tabulated:
            k[cells] = material.conductivity_at(mean_temperature[cells])
        return k

    def _element_components(self, field: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        corner = self._corner_temperatures(field)
        a = corner[1] - corner[0]
        b = corner[2] - corner[0]
        minus_k = -self._conductivity(corner)
        gradient_x = (self._d2y * a - self._d1y * b) / self._det
        gradient_y = (self._d1x * b - self._d2x * a) / self._det
        flux_x, flux_y = minus_k * gradient_x, minus_k * gradient_y
        for cells, orthotropic in self._tensors:  # K at the triangles' mean temperatures
            k_xx, k_xy, k_yy = orthotropic.components_at(corner[:, cells].mean(axis=0))
            gx, gy = gradient_x[cells], gradient_y[cells]
            flux_x[cells] = -(k_xx * gx + k_xy * gy)
            flux_y[cells] = -(k_xy * gx + k_yy * gy)
        return flux_x, flux_y


def vertex_heat_flux(model: ThermalModel, field: np.ndarray) -> np.ndarray:
    """Heat flux −k∇T in W/m² at the vertices, shape (n_vertices, 3), the third component 0.

    Each vertex gets the area-weighted mean of :meth:`HeatFluxRecovery.element` over the
    triangles that share it; a linear field with one conductivity is reproduced exactly. For
    many fields of one model, build a :class:`HeatFluxRecovery` once.
    """
    return HeatFluxRecovery(model)(field)
