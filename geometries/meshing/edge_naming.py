"""Edge groups found after gmsh's booleans: every boundary curve is sampled and matched to the
shapes' named edge primitives, then to the section's rules, then to the axis.

OCC booleans lose labels, so names are never carried through them: they are given afterwards,
and every curve must be matched. An unnamed edge is an error, never a silent insulated boundary.
"""

from __future__ import annotations

import gmsh
import numpy as np

from ..errors import GeometryError
from ..section import AXIS_GROUP, Section

_CURVE_SAMPLES = 9
_MATCH_TOLERANCE = 1e-6  # relative to the section size


def name_curves(section: Section, regions: dict[str, list[int]]) -> dict[str, list[int]]:
    """Assign every boundary curve of the built ``regions`` to an edge group: the shapes'
    names, then the rules, then the axis. Return the curve tags of each group.

    A curve belongs to a primitive or a rule when every one of its samples lies within a
    millionth of the section's size of it.
    """
    primitives = section.shape.edges()
    tolerance = _MATCH_TOLERANCE * section.shape.size
    surfaces = [(2, tag) for tags in regions.values() for tag in tags]
    boundary = gmsh.model.getBoundary(surfaces, combined=True, oriented=False)
    groups: dict[str, list[int]] = {}
    claimed = [False] * len(section.rules)
    for _, tag in sorted({(d, abs(t)) for d, t in boundary}):
        points = _curve_points(tag)
        group = None
        for primitive in primitives:
            if primitive.distance(points).max() <= tolerance:
                group = primitive.group  # later primitives have priority
        for k, rule in enumerate(section.rules):
            if rule.claims(points, tolerance):
                group = rule.group
                claimed[k] = True
        if section.axisymmetric and np.abs(points[:, 0]).max() <= tolerance:
            group = AXIS_GROUP
        if group is None:
            midpoint = tuple(float(v) for v in np.round(points[_CURVE_SAMPLES // 2], 9))
            raise GeometryError(
                f"the boundary curve through {midpoint} m belongs to no edge group; known "
                f"groups are {sorted({p.group for p in primitives})}"
            )
        groups.setdefault(group, []).append(tag)
    idle = [rule.group for rule, used in zip(section.rules, claimed, strict=True) if not used]
    if idle:
        raise GeometryError(
            f"edge rule(s) for group(s) {idle} name no boundary curve: a box or predicate must "
            "hold a whole curve (every sample along it), not part of one"
        )
    return groups


def _curve_points(tag: int) -> np.ndarray:
    low, high = gmsh.model.getParametrizationBounds(1, tag)
    t = np.linspace(low[0], high[0], _CURVE_SAMPLES)
    return np.reshape(gmsh.model.getValue(1, tag, t), (-1, 3))[:, :2]
