"""Scales a run derives from its model: the span of its temperatures and the diffusion time of
its surface elements."""

from __future__ import annotations

import numpy as np

from .model import ThermalModel


def temperature_span(model: ThermalModel) -> float:
    """The range of initial and driving temperatures, K (at least 1 K)."""
    low, high = model.driving_temperatures(1e30)
    return max(high - low, 1.0)


def smallest_surface_edge(model: ThermalModel) -> float:
    """The shortest element edge on a heat-exchanging (or fixed, or any) boundary, m."""
    mesh = model.section.mesh
    groups = model.exchange_groups or tuple(model.fixed) or tuple(mesh.boundaries)
    facets = np.concatenate([mesh.boundaries[g] for g in groups])
    ends = mesh.p[:, mesh.facets[:, facets]]
    return float(np.linalg.norm(ends[:, 0] - ends[:, 1], axis=0).min())


def surface_diffusion_time(model: ThermalModel) -> float:
    """ℓ²/α of the shortest surface edge in the slowest-diffusing material, s: before it the
    mesh does not resolve the field near the surface."""
    slowest = min(m.diffusivity for m in model.materials.values())
    return smallest_surface_edge(model) ** 2 / slowest
