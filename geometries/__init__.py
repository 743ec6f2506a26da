"""Two-dimensional sections with named edge groups and regions, meshed by gmsh.

This package knows geometry only: no heat, no materials.
"""

from .errors import GeometryError
from .meshing import mesh_section
from .section_mesh import SectionFacts, SectionMesh, section_mesh_from_arrays
from .shapes import EdgeSegment, Rectangle

__all__ = [
    "EdgeSegment",
    "GeometryError",
    "Rectangle",
    "SectionFacts",
    "SectionMesh",
    "mesh_section",
    "section_mesh_from_arrays",
]
