"""The options of a mesh request and their checks, kept apart from gmsh so that a request
can be validated without loading it."""

from __future__ import annotations

import math

import numpy as np

from .errors import GeometryError
from .shape_tree import Shape

DEFAULT_MAX_ELEMENTS = 2_000_000


def check_mesh_options(
    shape: Shape,
    size: float,
    *,
    order: int = 1,
    refine: dict[str, tuple[float, float]] | None = None,
    max_elements: int = DEFAULT_MAX_ELEMENTS,
    curvature_elements: int = 12,
) -> None:
    """Raise :class:`GeometryError` unless the options of
    :func:`geometries.mesh_section` are valid for ``shape`` (see there for their meaning).

    Checked without gmsh, so a request can be refused before gmsh is loaded; that the
    ``refine`` groups exist and the estimated triangle count are checked when meshing.
    """
    if not isinstance(size, int | float | np.floating) or not (math.isfinite(size) and size > 0):
        raise GeometryError(
            f"mesh size must be a finite length > 0 m, got {size!r}", argument="size"
        )
    if size > shape.size:
        raise GeometryError(
            f"mesh size {size} m is larger than the section ({shape.size:.6g} m); "
            "choose a size below the section's smallest feature",
            argument="size",
        )
    if order not in (1, 2):
        raise GeometryError(f"element order must be 1 or 2, got {order!r}", argument="order")
    if not isinstance(max_elements, int) or max_elements < 1:
        raise GeometryError(
            f"max_elements must be a whole number >= 1, got {max_elements!r}",
            argument="max_elements",
        )
    if not isinstance(curvature_elements, int) or curvature_elements < 0:
        raise GeometryError(
            f"curvature_elements must be a whole number >= 0, got {curvature_elements!r}"
        )
    for group, value in (refine or {}).items():
        try:
            local, growth = (float(v) for v in value)
        except (TypeError, ValueError):
            raise GeometryError(
                f"refine[{group!r}] must be (size in m, growth factor), got {value!r}"
            ) from None
        if not (0 < local <= size):
            raise GeometryError(
                f"refine[{group!r}] size must be in (0, {size}] m (the global size), got {local}"
            )
        if not (growth > 1):
            raise GeometryError(f"refine[{group!r}] growth must be > 1, got {growth}")
