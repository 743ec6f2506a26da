"""Two-dimensional sections with named edge groups and regions, meshed by gmsh.

This package knows geometry only: no heat, no materials. Shapes and sections are plain data;
gmsh (through :func:`mesh_section`), meshio (through :func:`read_section_mesh`) and
scikit-fem (through :func:`section_mesh_from_arrays`) are imported when those are first used,
so importing the package stays light.
"""

from importlib import import_module

from . import profiles
from .errors import GeometryError
from .mesh_options import check_mesh_options
from .outline import Outline
from .primitives import EdgeArc, EdgeEllipse, EdgeSegment, Placement
from .section import AXIS_GROUP, EdgeRule, Section
from .section_mesh import SectionFacts, SectionMesh
from .shape_tree import (
    Composite,
    Difference,
    Intersection,
    Renamed,
    Shape,
    SymmetryCut,
    Union,
)
from .shapes import Annulus, Circle, Ellipse, Polygon, Rectangle

# Public functions whose modules load heavy libraries, imported on first access.
_LAZY = {
    "mesh_section": ".meshing",
    "read_dxf": ".dxf_import",
    "read_section_mesh": ".mesh_import",
    "section_mesh_from_arrays": ".mesh_arrays",
}


def __getattr__(name: str):
    if name in _LAZY:
        value = getattr(import_module(_LAZY[name], __name__), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(_LAZY))


__all__ = [
    "AXIS_GROUP",
    "Annulus",
    "Circle",
    "Composite",
    "Difference",
    "EdgeArc",
    "EdgeEllipse",
    "EdgeRule",
    "EdgeSegment",
    "Ellipse",
    "GeometryError",
    "Intersection",
    "Outline",
    "Placement",
    "Polygon",
    "Rectangle",
    "Renamed",
    "Section",
    "SectionFacts",
    "SectionMesh",
    "Shape",
    "SymmetryCut",
    "Union",
    "check_mesh_options",
    "mesh_section",
    "profiles",
    "read_dxf",
    "read_section_mesh",
    "section_mesh_from_arrays",
]
