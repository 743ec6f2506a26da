"""Two-dimensional sections with named edge groups and regions, meshed by gmsh.

This package knows geometry only: no heat, no materials.
"""

from . import profiles
from .errors import GeometryError
from .mesh_import import read_section_mesh
from .meshing import mesh_section
from .primitives import EdgeArc, EdgeEllipse, EdgeSegment, Placement
from .section import AXIS_GROUP, EdgeRule, Section
from .section_mesh import SectionFacts, SectionMesh, section_mesh_from_arrays
from .shapes import (
    Annulus,
    Circle,
    Composite,
    Difference,
    Ellipse,
    Intersection,
    Outline,
    Polygon,
    Rectangle,
    Renamed,
    Shape,
    SymmetryCut,
    Union,
)

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
    "mesh_section",
    "profiles",
    "read_section_mesh",
    "section_mesh_from_arrays",
]
