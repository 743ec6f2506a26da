"""Shapes of a section, each with named edges that the meshing step can recognise.

A shape describes its outline as *edge primitives*: exact geometric pieces (so far straight
segments) that each carry the name of the edge group they belong to. After gmsh has built and
meshed the geometry, every boundary curve is matched against these primitives by position, so
the names survive whatever gmsh does to its own entity numbers.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .errors import GeometryError


@dataclass(frozen=True)
class EdgeSegment:
    """A straight piece of a shape's outline, named for the edge group it belongs to.

    Parameters
    ----------
    group : str
        Name of the edge group.
    start, end : tuple of float
        End points (x, y) in m.
    """

    group: str
    start: tuple[float, float]
    end: tuple[float, float]

    def distance(self, points: np.ndarray) -> np.ndarray:
        """Distance in m from each of the (n, 2) ``points`` to this segment."""
        a = np.asarray(self.start, dtype=float)
        b = np.asarray(self.end, dtype=float)
        ab = b - a
        s = np.clip((points - a) @ ab / (ab @ ab), 0.0, 1.0)
        return np.linalg.norm(points - (a + s[:, None] * ab), axis=1)

    @property
    def length(self) -> float:
        """Length in m."""
        return float(np.hypot(self.end[0] - self.start[0], self.end[1] - self.start[1]))


_RECTANGLE_SIDES = ("bottom", "right", "top", "left")


def _check_name(value: object, what: str) -> str:
    if not isinstance(value, str) or not value.strip():
        raise GeometryError(f"{what} must be a non-empty string, got {value!r}")
    return value


@dataclass(frozen=True)
class Rectangle:
    """An axis-aligned rectangular section.

    Parameters
    ----------
    width, height : float
        Side lengths in m along x and y; both > 0.
    corner : tuple of float
        Lower-left corner (x, y) in m.
    edge_names : dict, optional
        Edge group for each side, keyed by ``"bottom"``, ``"right"``, ``"top"``, ``"left"``.
        Sides not named keep their side name. Several sides may share one group.
    region : str
        Name of the region (material zone) the rectangle fills.

    Examples
    --------
    A quarter of a 40 mm x 20 mm bar, cut on its two symmetry lines:

    >>> quarter = Rectangle(0.020, 0.010,
    ...     edge_names={"left": "symmetry", "bottom": "symmetry",
    ...                 "right": "cooled", "top": "cooled"})
    >>> sorted({e.group for e in quarter.edges()})
    ['cooled', 'symmetry']
    """

    width: float
    height: float
    corner: tuple[float, float] = (0.0, 0.0)
    edge_names: dict[str, str] = field(default_factory=dict)
    region: str = "solid"

    def __post_init__(self) -> None:
        for name in ("width", "height"):
            value = getattr(self, name)
            if not np.isfinite(value) or value <= 0:
                raise GeometryError(
                    f"Rectangle {name} must be a finite length > 0 m, got {value!r}"
                )
        unknown = set(self.edge_names) - set(_RECTANGLE_SIDES)
        if unknown:
            raise GeometryError(
                f"Rectangle edge_names has unknown side(s) {sorted(unknown)}; "
                f"valid sides are {list(_RECTANGLE_SIDES)}"
            )
        for side, group in self.edge_names.items():
            _check_name(group, f"edge name for side {side!r}")
        _check_name(self.region, "region")

    def edges(self) -> list[EdgeSegment]:
        """The four sides as named segments, counter-clockwise from the bottom."""
        x0, y0 = self.corner
        x1, y1 = x0 + self.width, y0 + self.height
        corners = [(x0, y0), (x1, y0), (x1, y1), (x0, y1)]
        return [
            EdgeSegment(self.edge_names.get(side, side), corners[i], corners[(i + 1) % 4])
            for i, side in enumerate(_RECTANGLE_SIDES)
        ]

    @property
    def size(self) -> float:
        """The longest dimension in m, the scale for geometric tolerances."""
        return max(self.width, self.height)

    def mesh(self, size: float):
        """Mesh the rectangle with gmsh; see :func:`geometries.meshing.mesh_section`."""
        from .meshing import mesh_section

        return mesh_section(self, size)
