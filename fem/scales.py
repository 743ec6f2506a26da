"""Scales a run derives from its model: the span of its temperatures, the diffusion time of
its surface elements and the default local-error tolerance of each scheme."""

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


DEFAULT_RELATIVE_TOLERANCE = 1e-4  # local error per step, as a fraction of the temperature span
# Backward Euler is first order: its global error is about (steps)·(local error), so at the
# second-order schemes' tolerance it missed a plane wall's time to 90 % of its approach by
# 1.0 % (Crank–Nicolson 0.014 %, BDF2 0.13 %); a tolerance ten times tighter brings it to
# 0.3 % for three times the steps (tests/test_error_estimate_checks.py).
TOLERANCE_SCALE = {"backward-euler": 0.1}


def default_tolerance(model: ThermalModel, method: str) -> float:
    """The default local-error tolerance of adaptive steps by ``method``, K: 1e-4 of the
    temperature span (at least 1e-6 K), ten times tighter for backward Euler."""
    scale = TOLERANCE_SCALE.get(method, 1.0)
    return max(scale * DEFAULT_RELATIVE_TOLERANCE * temperature_span(model), 1e-6)
