"""Element sizes for gmsh: the estimated triangle count and its limit, the global size,
curvature sizes and the refinement ramps along edge groups."""

from __future__ import annotations

import math

import gmsh

from ..errors import GeometryError

_TRIANGLE_AREA = math.sqrt(3) / 4  # an equilateral triangle of unit side

# gmsh's 2-D algorithm: 6, Frontal-Delaunay (gmsh's default, set here so that it stays the
# choice). Measured on a 50 mm square, gmsh 4.15, one core: at 1M triangles Frontal-Delaunay
# took 39 s and gave 1.001 times the estimated count, radius ratio (gmsh's "gamma") min 0.78,
# mean 0.9996; Delaunay (5) took 31 s, gave 1.145 times the estimate (so a coarser size would
# be needed for the same count), min 0.51, mean 0.945; MeshAdapt (1) is about 4 times slower
# than Frontal-Delaunay at 100k triangles with quality like Delaunay's. gmsh's threads
# (General.NumThreads, Mesh.MaxNumThreads2D) mesh different surfaces in parallel and did not
# speed up one surface.
_ALGORITHM = 6


def check_element_count(
    regions: dict[str, list[int]],
    curve_groups: dict[str, list[int]],
    size: float,
    refine: dict[str, tuple[float, float]],
    max_elements: int,
) -> float:
    """The estimated triangle count; raise if it exceeds ``max_elements``."""
    area = sum(gmsh.model.occ.getMass(2, t) for tags in regions.values() for t in tags)
    estimate = area / (_TRIANGLE_AREA * size**2)
    for group, (local, growth) in refine.items():
        length = sum(gmsh.model.occ.getMass(1, c) for c in curve_groups[group])
        # Triangles in the band where the size grows linearly from ``local`` to ``size``.
        estimate += length / (_TRIANGLE_AREA * (growth - 1)) * (1 / local - 1 / size)
    if estimate > max_elements:
        raise GeometryError(
            f"this mesh would have about {estimate:,.0f} triangles, more than max_elements = "
            f"{max_elements:,}; choose a larger size or raise max_elements"
        )
    return estimate


def set_sizes(
    size: float,
    curve_groups: dict[str, list[int]],
    refine: dict[str, tuple[float, float]],
    curvature_elements: int,
    scale: int = 1,
) -> None:
    """Set gmsh's algorithm and sizes: ``scale`` times the requested ``size`` and refinement
    ramps (``scale`` > 1 for a mesh that is split afterwards), curvature sizes as requested."""
    option = gmsh.option.setNumber
    option("Mesh.Algorithm", _ALGORITHM)
    option("Mesh.MeshSizeMax", scale * size)
    option("Mesh.MeshSizeMin", 0.0)
    option("Mesh.MeshSizeFromPoints", 0)
    option("Mesh.MeshSizeExtendFromBoundary", 0)
    option("Mesh.MeshSizeFromCurvature", curvature_elements)
    if not refine:
        return
    field = gmsh.model.mesh.field
    ramps = []
    for group, (local, growth) in refine.items():
        distance = field.add("Distance")
        field.setNumbers(distance, "CurvesList", curve_groups[group])
        field.setNumber(distance, "Sampling", 200)
        ramp = field.add("MathEval")
        expression = f"{scale} * min({size}, {local} + {growth - 1} * F{distance})"
        field.setString(ramp, "F", expression)
        ramps.append(ramp)
    smallest = field.add("Min")
    field.setNumbers(smallest, "FieldsList", ramps)
    field.setAsBackgroundMesh(smallest)
