"""A section ready to mesh: a shape, whether it is axisymmetric, and rules that name edges by
position."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from .checks import check_name
from .errors import GeometryError
from .mesh_options import DEFAULT_MAX_ELEMENTS
from .shape_tree import Shape

AXIS_GROUP = "axis"


@dataclass(frozen=True)
class EdgeRule:
    """Put every boundary curve lying wholly inside ``box`` or satisfying ``where`` in ``group``.

    ``box`` is (x_min, y_min, x_max, y_max) in m; ``where(x, y)`` takes coordinate arrays in m
    and returns a boolean array. Rules apply after the shapes' own names, in order.
    """

    group: str
    box: tuple[float, float, float, float] | None = None
    where: Callable[[np.ndarray, np.ndarray], np.ndarray] | None = None

    def __post_init__(self) -> None:
        check_name(self.group, "edge rule group")
        if (self.box is None) == (self.where is None):
            raise GeometryError("an edge rule needs exactly one of box= or where=")
        if self.box is not None:
            x0, y0, x1, y1 = self.box
            if not (x0 <= x1 and y0 <= y1):
                raise GeometryError(
                    f"edge rule box must be (x_min, y_min, x_max, y_max), got {self.box!r}"
                )

    def claims(self, points: np.ndarray, tolerance: float) -> bool:
        x, y = points[:, 0], points[:, 1]
        if self.box is not None:
            x0, y0, x1, y1 = self.box
            return bool(
                np.all(
                    (x >= x0 - tolerance)
                    & (x <= x1 + tolerance)
                    & (y >= y0 - tolerance)
                    & (y <= y1 + tolerance)
                )
            )
        return bool(np.all(np.asarray(self.where(x, y), dtype=bool)))


@dataclass(frozen=True)
class Section:
    """A shape to mesh, planar (per metre of depth) or axisymmetric (x is r, y is z).

    Parameters
    ----------
    shape : Shape
        The cross-section (or, axisymmetric, the half-section with r >= 0).
    axisymmetric : bool
        Whether the shape is a half-section revolved about the y axis. Edges on the axis form
        the group ``"axis"``.
    rules : tuple of EdgeRule
        Extra naming by position, applied in order after the shapes' own names.

    Examples
    --------
    >>> from geometries import Rectangle
    >>> plate = Section(Rectangle(0.04, 0.01)).name_edges("clamped", box=(0, 0, 0.01, 0))
    >>> [rule.group for rule in plate.rules]
    ['clamped']
    """

    shape: Shape
    axisymmetric: bool = False
    rules: tuple[EdgeRule, ...] = ()

    def __post_init__(self) -> None:
        if not isinstance(self.shape, Shape):
            raise GeometryError(f"Section needs a shape, got {self.shape!r}")
        if self.axisymmetric:
            x_min = self.shape.bounds()[0]
            if x_min < -1e-9 * self.shape.size:
                raise GeometryError(
                    f"an axisymmetric half-section must lie in r >= 0; this one reaches "
                    f"r = {x_min:.6g} m"
                )

    def name_edges(self, group: str, *, box=None, where=None) -> Section:
        """A copy with one more naming rule (see :class:`EdgeRule`)."""
        rule = EdgeRule(group, None if box is None else tuple(box), where)
        return Section(self.shape, self.axisymmetric, (*self.rules, rule))

    def boundary_groups(self) -> set[str]:
        """The edge groups of the section's boundary (its geometry is built, not meshed)."""
        from .meshing import boundary_groups

        return boundary_groups(self)

    def region_contacts(self) -> set[frozenset[str]]:
        """The pairs of regions that share an edge (its geometry is built, not meshed)."""
        from .meshing import region_contacts

        return region_contacts(self)

    def mesh(
        self,
        size: float,
        *,
        order: int = 1,
        refine: dict[str, tuple[float, float]] | None = None,
        max_elements: int = DEFAULT_MAX_ELEMENTS,
        curvature_elements: int = 12,
    ):
        """Mesh the section with gmsh; see :func:`geometries.meshing.mesh_section`."""
        from .meshing import mesh_section

        return mesh_section(
            self,
            size,
            order=order,
            refine=refine,
            max_elements=max_elements,
            curvature_elements=curvature_elements,
        )
