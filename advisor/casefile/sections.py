"""``[section]``: the shapes and how they combine, symmetry cuts, edge-naming rules, local
refinement and the mesh options, or a mesh file to import instead.

The geometry is built (booleans included) but not meshed, so the edge groups and regions the
mesh will have are known while the file is read.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

from geometries import (
    Composite,
    Difference,
    GeometryError,
    Intersection,
    Section,
    SectionMesh,
    Union,
    check_mesh_options,
    read_dxf,
    read_section_mesh,
)

from ..whole_part import Mirror
from .reader import Table, suggest
from .schema import COMBINE_FIRST, COMBINE_LATER, MESH_FILE_UNITS
from .shapes import direction, read_shape
from .validation import build, raise_at


@dataclass(frozen=True)
class SectionPlan:
    """What ``[section]`` describes, before meshing.

    Parameters
    ----------
    section : Section or None
        The geometry to mesh (None for an imported mesh).
    imported : SectionMesh or None
        A mesh read from a file.
    mesh_options : dict
        ``size`` in m and the keyword arguments of :meth:`geometries.Section.mesh`.
    groups, regions : frozenset of str
        The edge groups and regions the mesh will have.
    mirrors : tuple of Mirror
        The whole part's mirror lines, in folding order: ``mirror_lines`` first, then the
        symmetry cuts in the order they were made.
    declared_mirrors : int
        How many of ``mirrors`` come from ``mirror_lines`` (the cuts' copies are counted by
        the geometry already).
    """

    section: Section | None
    imported: SectionMesh | None
    mesh_options: dict = field(default_factory=dict)
    groups: frozenset[str] = frozenset()
    regions: frozenset[str] = frozenset()
    mirrors: tuple[Mirror, ...] = ()
    declared_mirrors: int = 0


def read_section(table: Table) -> SectionPlan:
    """The section of the ``[section]`` table (which is left for the caller to close)."""
    axisymmetric = table.flag("axisymmetric", False)
    mesh_options = _mesh_options(table)
    declared = mirror_lines(table, axisymmetric)
    file_table = table.table("file", None)
    drawing = None
    if file_table is not None and _is_drawing(file_table):
        drawing = _drawing(file_table)
    elif file_table is not None:
        imported = _imported(file_table, axisymmetric)
        table.read.update({"shape", "cut", "refine", "name_edges"})
        return SectionPlan(
            None,
            imported,
            mesh_options,
            frozenset(imported.edge_groups),
            frozenset(imported.regions),
            declared,
            len(declared),
        )
    shape = _combined(table, drawing)
    cuts = []
    for cut in table.tables("cut"):
        cuts.append(Mirror(cut.point("point", (0.0, 0.0)), direction(cut, "keep")))
        shape = build(
            cut,
            shape.symmetry_cut,
            cut.point("point", (0.0, 0.0)),
            direction(cut, "keep"),
            cut.text("name", "symmetry"),
            default="keep",
        )
        cut.done()
    section = _named_edges(table, Section(shape, axisymmetric=axisymmetric))
    try:  # the mesher's own rules, before the geometry is built
        check_mesh_options(shape, **mesh_options)
    except GeometryError as error:
        raise_at(table, error, _MESH_KEYS, "mesh_size")
    try:
        groups = frozenset(section.boundary_groups())  # builds the geometry, does not mesh it
    except GeometryError as error:
        raise_at(table, error, {}, "shape")
    refine = _refinement(table, groups)
    if refine is not None:
        mesh_options["refine"] = refine
    regions = frozenset(_regions(shape))
    mirrors = declared + tuple(cuts)
    return SectionPlan(section, None, mesh_options, groups, regions, mirrors, len(declared))


_MIRROR_LINE = re.compile(r"^\s*([xyrz])\s*=\s*(.+?)\s*$")


def mirror_lines(table: Table, axisymmetric: bool) -> tuple[Mirror, ...]:
    """``mirror_lines = ["x = 0 mm", "y = 0 mm"]``: the lines a section drawn as a piece of a
    symmetric part is mirrored across to make the whole part (each doubles the copies); for
    sections cut with ``[[section.cut]]`` the cuts say so themselves. Axisymmetric sections
    take ``z = ...`` lines only (the axis r = 0 is whole already)."""
    given = table.raw("mirror_lines", None)
    if given is None:
        return ()
    if not isinstance(given, list):
        table.fail("mirror_lines", f'expected a list such as ["x = 0 mm"], got {given!r}')
    lines = []
    for text in given:
        found = _MIRROR_LINE.match(text) if isinstance(text, str) else None
        if found is None:
            table.fail(
                "mirror_lines",
                f'{text!r} is not a line: write "x = <length>" (a vertical line) or '
                '"y = <length>" (a horizontal one); r and z for axisymmetric sections',
            )
        axis, value = found.groups()
        at = table.quantity("mirror_lines", value, "length")
        vertical = axis in "xr"
        if axisymmetric and vertical:
            table.fail(
                "mirror_lines",
                f"{text!r}: an axisymmetric section is whole about its axis already; only "
                '"z = <length>" lines (across the axis) make copies',
            )
        lines.append(Mirror((at, 0.0), (1.0, 0.0)) if vertical else Mirror((0.0, at), (0.0, 1.0)))
    if len(set(lines)) != len(lines):
        table.fail("mirror_lines", f"a line is given twice in {given!r}")
    return tuple(lines)


# The mesher's arguments → the keys of [section].
_MESH_KEYS = {"size": "mesh_size", "order": "order", "max_elements": "max_elements"}


def _mesh_options(table: Table) -> dict:
    """Size, geometry order and element limit, checked by the mesher's own rules."""
    options = {"size": table.get("mesh_size", "length")}
    order = table.get("order", "number", 1)
    options["order"] = int(order) if order == int(order) else order
    max_elements = table.get("max_elements", "number", None)
    if max_elements is not None:
        options["max_elements"] = int(max_elements)
    return options


def _imported(file_table: Table, axisymmetric: bool) -> SectionMesh:
    mesh_file = file_table.context.folder / file_table.text("path")
    units = file_table.text("units", "m", MESH_FILE_UNITS)
    file_table.done()
    return build(
        file_table,
        read_section_mesh,
        mesh_file,
        units=units,
        axisymmetric=axisymmetric,
        default="path",
    )


def _is_drawing(file_table: Table) -> bool:
    path = file_table.raw("path", None)
    return isinstance(path, str) and path.lower().endswith(".dxf")


def _drawing(file_table: Table):
    """``[section.file]`` naming a ``.dxf`` drawing: its outlines as the first shape."""
    drawing_file = file_table.context.folder / file_table.text("path")
    units = file_table.text("units", None, MESH_FILE_UNITS)
    layers = file_table.raw("layers", None)
    if layers is not None and not (
        isinstance(layers, list) and layers and all(isinstance(x, str) for x in layers)
    ):
        file_table.fail("layers", f"expected a list of layer names, got {layers!r}")
    group_by = file_table.text("edge_groups_from", "layer", ("layer", "colour"))
    region = file_table.text("region", "solid")
    tolerance = file_table.get("join_tolerance", "length", None)
    file_table.done()
    keys = {"group_by": "edge_groups_from", "tolerance": "join_tolerance"}
    return build(
        file_table,
        read_dxf,
        drawing_file,
        units=units,
        layers=layers,
        group_by=group_by,
        region=region,
        tolerance=tolerance,
        keys=keys,
        default="path",
    )


def _combined(table: Table, drawing=None):
    """The shapes in order, each added to, subtracted from or intersected with the ones
    before (the drawing's outlines first, if any); a shape of another region makes a
    composite of regions."""
    specs = table.tables("shape")
    if not specs and drawing is None:
        table.fail(
            "shape",
            "is missing: give at least one [[section.shape]] (or a "
            "[section.file] to import a mesh)",
        )
    shape = drawing
    for spec in specs:
        piece = read_shape(spec)
        later = shape is not None
        combine = spec.text(
            "combine", "add" if later else "first", COMBINE_LATER if later else COMBINE_FIRST
        )
        spec.done()
        shape = piece if shape is None else build(spec, _combine, shape, piece, combine)
    return shape


def _combine(shape, piece, combine: str):
    if combine == "subtract":
        return Difference(shape, (piece,))
    if combine == "intersect":
        return Intersection((shape, piece))
    if piece.region == shape.region and not isinstance(shape, Composite):
        return Union((shape, piece))
    parts = shape.parts if isinstance(shape, Composite) else (shape,)
    return Composite((*parts, piece))


def _named_edges(table: Table, section: Section) -> Section:
    """``[[section.name_edges]]``: the edges inside a box renamed to a group."""
    for rule in table.tables("name_edges"):
        group = rule.text("group")
        box = rule.raw("box", None)
        if box is None:
            rule.fail("box", "is missing: give [x_min, y_min, x_max, y_max]")
        if not (isinstance(box, list) and len(box) == 4):
            rule.fail("box", f"expected [x_min, y_min, x_max, y_max], got {box!r}")
        corners = tuple(rule.quantity("box", value, "length") for value in box)
        section = build(rule, section.name_edges, group, box=corners, default="box")
        rule.done()
    return section


def _refinement(table: Table, groups: frozenset[str]) -> dict | None:
    """``[section.refine.<group>]``: a smaller size along an edge group, growing away."""
    refine_table = table.table("refine", None)
    if refine_table is None:
        return None
    refine = {}
    for group in refine_table.data:
        spec = refine_table.table(group)
        if group not in groups:
            refine_table.fail(
                group,
                f"is not an edge group of the section {sorted(groups)}" + suggest(group, groups),
            )
        refine[group] = (spec.get("size", "length"), spec.get("growth", "number", 1.2))
        spec.done()
    refine_table.done()
    return refine


def _regions(shape) -> set[str]:
    """The regions a shape's parts make (a composite has one per part)."""
    node = shape.expanded()
    if isinstance(node, Composite):
        return {region for part in node.parts for region in _regions(part)}
    inner = getattr(node, "shape", None) or getattr(node, "base", None)
    if inner is not None and not isinstance(node, Union | Intersection):
        return _regions(inner)
    return {shape.region}
