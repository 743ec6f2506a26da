"""Case files: a whole analysis in one TOML file of our own layout.

The loader checks everything it can before any meshing or solving — unknown keys (with a
suggestion), missing values, quantities of the wrong kind, impossible values, and edge groups
named in the boundaries but absent from the section or the other way round — and reports the
first problem as a :class:`CaseError` with the key path and, where it can find it, the line.
The README documents the format with a complete annotated example.
"""

from __future__ import annotations

import difflib
import math
import re
import sys
from dataclasses import dataclass, field
from pathlib import Path

from fem import (
    Convection,
    FixedTemperature,
    HeatFlux,
    Insulated,
    Material,
    ModelError,
    Periodic,
    PiecewiseLinear,
    PropertyTable,
    Radiation,
    Sinusoid,
    Steps,
    StopWhen,
    ThermalModel,
    solids,
)
from fem.boundary import conditions as check_conditions
from fem.exponential_run import check_exponential_parts
from geometries import (
    AXIS_GROUP,
    Annulus,
    Circle,
    Composite,
    Difference,
    Ellipse,
    GeometryError,
    Intersection,
    Polygon,
    Rectangle,
    Section,
    Union,
    profiles,
    read_section_mesh,
)

from ..errors import AdvisorError
from .units import UnitError, quantity

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - Python 3.10
    import tomli as tomllib

_MISSING = object()


class CaseError(AdvisorError):
    """A case file that cannot be run: the message starts with the file, line and key path."""


@dataclass
class _Context:
    path: Path
    lines: list[str]

    def fail(self, key_path: str, message: str):
        line = _line_of(self.lines, key_path)
        where = f"{self.path.name}" + (f", line {line}" if line else "")
        raise CaseError(f"{where}: {key_path}: {message}")


def _line_of(lines: list[str], key_path: str) -> int | None:
    """The line of a key, or None when it is not written out (a wrong line is worse than none).

    The file is cut into tables at their headers (``[a.b]``, ``[[a.b]]`` numbered in order);
    the key is looked up in the table whose path is the longest prefix of ``key_path``, on a
    line that assigns the next part of the path and, for keys inside an inline table, holds the
    rest of it.
    """
    blocks: list[tuple[str, int, int]] = [("", 1, len(lines))]  # path, first line, last line
    counts: dict[str, int] = {}
    for number, text in enumerate(lines, start=1):
        stripped = text.strip()
        match = re.match(r"^(\[\[?)\s*([^\]]+?)\s*\]\]?", stripped)
        if not match:
            continue
        name = match.group(2).replace(" ", "")
        if match.group(1) == "[[":
            counts[name] = counts.get(name, -1) + 1
            name = f"{name}[{counts[name]}]"
        path, start, _ = blocks[-1]
        blocks[-1] = (path, start, number - 1)
        blocks.append((name, number, len(lines)))
    best = None
    for path, start, end in blocks:
        if path == "" or key_path == path or key_path.startswith(path + "."):
            if best is None or len(path) > len(best[0]):
                best = (path, start, end)
    if best is None:
        return None
    path, start, end = best
    rest = key_path[len(path) + 1 :] if path else key_path
    if not rest:
        return start
    parts = rest.split(".")
    for number in range(start, end + 1):
        text = lines[number - 1].split("#", 1)[0]
        head = text.split("=", 1)[0].strip().replace(" ", "") if "=" in text else None
        if head is None or text.strip().startswith("["):
            continue
        if head == rest:
            return number
        if head == parts[0] and all(re.search(rf"\b{re.escape(p)}\s*=", text) for p in parts[1:]):
            return number
    return None


class _Table:
    """One table of the case file, remembering which keys were read."""

    def __init__(self, data: dict, path: str, context: _Context):
        self.data, self.path, self.context = data, path, context
        self.read: set[str] = set()
        self.known: set[str] = set()  # keys this table accepts, read or not

    def key(self, name: str) -> str:
        return f"{self.path}.{name}" if self.path else name

    def fail(self, name: str, message: str):
        self.context.fail(self.key(name), message)

    def has(self, name: str) -> bool:
        self.known.add(name)
        return name in self.data

    def raw(self, name: str, default=_MISSING):
        self.read.add(name)
        self.known.add(name)
        if name not in self.data:
            if default is _MISSING:
                misspelt = [
                    k
                    for k in self.data
                    if k not in self.known
                    and difflib.get_close_matches(name, [str(k)], n=1, cutoff=0.6)
                ]
                if misspelt:  # report the misspelling, where it is, rather than the absence
                    self.fail(misspelt[0], f"is not a known key; did you mean {name!r}?")
                self.fail(name, "is missing")
            return default
        return self.data[name]

    def get(self, name: str, kind: str, default=_MISSING):
        value = self.raw(name, default)
        if value is default and default is not _MISSING:
            return default
        try:
            return quantity(value, kind)
        except UnitError as error:
            self.fail(name, str(error))

    def point(self, name: str, default=_MISSING):
        value = self.raw(name, default)
        if value is default and default is not _MISSING:
            return default
        if not (isinstance(value, list) and len(value) == 2):
            self.fail(name, f"expected a point [x, y] of two lengths, got {value!r}")
        try:
            return (quantity(value[0], "length"), quantity(value[1], "length"))
        except UnitError as error:
            self.fail(name, str(error))

    def text(self, name: str, default=_MISSING, choices=None) -> str:
        value = self.raw(name, default)
        if value is default and default is not _MISSING:
            return default
        if not isinstance(value, str) or not value.strip():
            self.fail(name, f"expected a name (text), got {value!r}")
        if choices is not None and value not in choices:
            self.fail(
                name, f"must be one of {list(choices)}, got {value!r}" + _suggest(value, choices)
            )
        return value

    def flag(self, name: str, default: bool) -> bool:
        value = self.raw(name, default)
        if not isinstance(value, bool):
            self.fail(name, f"expected true or false, got {value!r}")
        return value

    def table(self, name: str, default=_MISSING) -> _Table | None:
        value = self.raw(name, default)
        if value is default and default is not _MISSING:
            return default
        if not isinstance(value, dict):
            self.fail(name, f"expected a table, got {value!r}")
        return _Table(value, self.key(name), self.context)

    def tables(self, name: str) -> list[_Table]:
        value = self.raw(name, [])
        if isinstance(value, dict):
            value = [value]
        if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
            self.fail(name, "expected a list of tables ([[...]])")
        return [_Table(v, f"{self.key(name)}[{i}]", self.context) for i, v in enumerate(value)]

    def done(self) -> None:
        unknown = [k for k in self.data if k not in self.read]
        if unknown:
            name = unknown[0]
            known = sorted(self.known | self.read)
            self.fail(
                name,
                "is not a known key"
                + _suggest(name, known)
                + (f" (keys here: {', '.join(known)})" if known else ""),
            )


def _suggest(name: str, choices) -> str:
    close = difflib.get_close_matches(str(name), [str(c) for c in choices], n=1, cutoff=0.6)
    return f"; did you mean {close[0]!r}?" if close else ""


# ---------------------------------------------------------------------------------------------
# The case
# ---------------------------------------------------------------------------------------------

TOP_LEVEL = (
    "title",
    "section",
    "material",
    "materials",
    "boundaries",
    "initial",
    "sources",
    "probes",
    "run",
    "advisor",
    "outputs",
)
SHAPES = (
    "rectangle",
    "circle",
    "ellipse",
    "annulus",
    "polygon",
    "angle",
    "channel",
    "tee",
    "i_section",
    "rectangular_tube",
    "round_tube",
)
METHODS = ("crank-nicolson", "bdf2", "backward-euler", "exponential")
QUANTITIES = ("slowest", "mean", "peak_difference", "time_to_target")


@dataclass
class Case:
    """A validated case, ready to mesh and solve.

    ``model()`` meshes and builds the thermal model; ``run_options`` and ``advisor_options``
    are the keyword arguments of :func:`fem.solve` and :func:`advisor.assess`.
    """

    path: Path
    title: str
    section: Section | None
    imported: object | None
    mesh_options: dict
    materials: dict
    boundaries: dict
    initial: object
    sources: dict
    probes: dict
    element_order: int
    end_time: float
    run_options: dict
    advisor_options: dict
    outputs: dict = field(default_factory=dict)

    def model(self) -> ThermalModel:
        if self.imported is not None:
            section_mesh = self.imported
        else:
            size = self.mesh_options["size"]
            options = {k: v for k, v in self.mesh_options.items() if k != "size"}
            section_mesh = self.section.mesh(size, **options)
        material = self.materials.get("*")
        materials = (
            material
            if material is not None
            else {r: self.materials[r] for r in section_mesh.regions}
        )
        if material is None:
            missing = sorted(set(section_mesh.regions) - set(self.materials))
            if missing:
                raise CaseError(
                    f"{self.path.name}: materials: no material for region(s) {missing}"
                )
        return ThermalModel(
            section_mesh,
            materials,
            self.boundaries,
            self.initial,
            probes=self.probes,
            element_order=self.element_order,
            heat_sources=self.sources,
        )


def load_case(path: str | Path, overrides: dict | None = None) -> Case:
    """Read and check a case file; nothing is meshed or solved.

    ``overrides`` replaces values by dotted key path before checking, e.g.
    ``{"section.mesh_size": "3 mm", "run.end_time": "2 min"}`` (for reduced-size runs).
    """
    path = Path(path)
    if not path.is_file():
        raise CaseError(f"case file {str(path)!r} does not exist")
    text = path.read_text(encoding="utf-8")
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        raise CaseError(f"{path.name}: not valid TOML: {error}") from None
    for dotted, value in (overrides or {}).items():
        target = data
        *parents, last = dotted.split(".")
        for key in parents:
            target = target.setdefault(key, {})
        target[last] = value
    context = _Context(path, text.splitlines())
    root = _Table(data, "", context)
    try:
        return _read_case(root, path)
    except (ModelError, GeometryError) as error:  # raised by the model objects' own checks
        raise CaseError(f"{path.name}: {error}") from None


def _read_case(root: _Table, path: Path) -> Case:
    title = root.text("title", "untitled case")
    section_table = root.table("section")
    section, imported, mesh_options, groups, regions = _read_section(section_table, path)
    section_table.done()

    materials = _read_materials(root, regions)
    boundaries_table = root.table("boundaries")
    boundaries = {}
    for group in boundaries_table.data:
        boundaries[group] = _read_boundary(boundaries_table.table(group))
    boundaries_table.done()
    named, known = set(boundaries), set(groups)
    if named - known:
        bad = sorted(named - known)[0]
        boundaries_table.fail(
            bad,
            f"names an edge group the section does not have; its "
            f"groups are {sorted(known)}" + _suggest(bad, known),
        )
    if known - named - {AXIS_GROUP}:
        root.fail(
            "boundaries",
            f"edge group(s) {sorted(known - named - {AXIS_GROUP})} of "
            "the section have no boundary condition; give each one "
            "(insulated = true for no heat flow)",
        )

    initial_table = root.table("initial")
    raw_initial = initial_table.raw("temperature")
    if isinstance(raw_initial, dict):
        per_region = _Table(raw_initial, initial_table.key("temperature"), root.context)
        initial = {r: _temperature(per_region, r) for r in raw_initial}
        per_region.done()
    else:
        initial = _temperature(initial_table, "temperature")
    initial_table.done()

    sources = {}
    sources_table = root.table("sources", None)
    if sources_table is not None:
        for region in sources_table.data:
            sources[region] = _schedule(sources_table, region, "power_density")
        sources_table.done()

    probes = {}
    probes_table = root.table("probes", None)
    if probes_table is not None:
        for name in probes_table.data:
            probes[name] = probes_table.point(name)
        probes_table.done()

    run = root.table("run")
    end_time = run.get("end_time", "time")
    if end_time <= 0:
        run.fail("end_time", f"must be > 0 s, got {end_time:g} s")
    options: dict = {"method": run.text("method", "crank-nicolson", METHODS)}
    if options["method"] == "exponential":
        try:
            check_exponential_parts(materials, boundaries, sources)
        except ModelError as error:
            run.fail("method", str(error))
    for key, kind in (
        ("time_step", "time"),
        ("output_interval", "time"),
        ("tolerance", "temperature_difference"),
        ("min_step", "time"),
        ("max_step", "time"),
    ):
        value = run.get(key, kind, None)
        if value is not None:
            if value <= 0:
                run.fail(key, f"must be > 0, got {value:g}")
            options[key] = value
    stop = run.table("stop", None)
    if stop is not None:
        quantity_name = stop.text("quantity")
        choices = ("mean", "minimum", "maximum", *probes)
        if quantity_name not in choices:
            stop.fail(
                "quantity",
                f"must be one of {list(choices)}, got {quantity_name!r}"
                + _suggest(quantity_name, choices),
            )
        options["stop"] = StopWhen(quantity_name, _temperature(stop, "target"))
        stop.done()
    element_order = run.get("element_order", "number", 1)
    if element_order not in (1, 2):
        run.fail("element_order", f"must be 1 or 2, got {element_order}")
    run.done()

    advisor_options: dict = {}
    advisor = root.table("advisor", None)
    if advisor is not None:
        target = _temperature(advisor, "target", None)
        if target is not None:
            advisor_options["target"] = target
        tolerance = advisor.get("tolerance", "number", 0.05)
        if not 0 < tolerance < 1:
            advisor.fail("tolerance", f"must be a fraction in (0, 1), got {tolerance:g}")
        advisor_options["tolerance"] = tolerance
        advisor_options["quantity"] = advisor.text("quantity", "slowest", QUANTITIES)
        advisor.done()

    outputs = {}
    outputs_table = root.table("outputs", None)
    if outputs_table is not None:
        for key in ("animation", "report", "vtk"):
            if outputs_table.has(key):
                outputs[key] = outputs_table.flag(key, True)
        outputs_table.done()
    root.done()
    return Case(
        path,
        title,
        section,
        imported,
        mesh_options,
        materials,
        boundaries,
        initial,
        sources,
        probes,
        element_order,
        end_time,
        options,
        advisor_options,
        outputs,
    )


# ---------------------------------------------------------------------------------------------
# Section
# ---------------------------------------------------------------------------------------------


def _read_section(table: _Table, path: Path):
    axisymmetric = table.flag("axisymmetric", False)
    mesh_options = {"size": table.get("mesh_size", "length")}
    if mesh_options["size"] <= 0:
        table.fail("mesh_size", "must be a length > 0")
    order = table.get("order", "number", 1)
    if order not in (1, 2):
        table.fail("order", f"must be 1 or 2, got {order:g}")
    mesh_options["order"] = int(order)
    max_elements = table.get("max_elements", "number", None)
    if max_elements is not None:
        mesh_options["max_elements"] = int(max_elements)

    file_table = table.table("file", None)
    if file_table is not None:
        mesh_file = Path(file_table.text("path"))
        if not mesh_file.is_absolute():
            mesh_file = path.parent / mesh_file
        units = file_table.text("units", "m", ("m", "cm", "mm", "um", "in", "ft"))
        file_table.done()
        try:
            imported = read_section_mesh(mesh_file, units=units, axisymmetric=axisymmetric)
        except GeometryError as error:
            file_table.fail("path", str(error))
        table.read.update({"shape", "cut", "refine", "name_edges"})
        return None, imported, mesh_options, set(imported.edge_groups), set(imported.regions)

    shapes = table.tables("shape")
    if not shapes:
        table.fail(
            "shape",
            "is missing: give at least one [[section.shape]] (or a "
            "[section.file] to import a mesh)",
        )
    shape = None
    for index, spec in enumerate(shapes):
        piece = _read_shape(spec)
        combine = spec.text(
            "combine",
            "add" if index else "first",
            ("add", "subtract", "intersect") if index else ("first",),
        )
        spec.done()
        if shape is None:
            shape = piece
        elif combine == "subtract":
            shape = Difference(shape, (piece,))
        elif combine == "intersect":
            shape = Intersection((shape, piece))
        elif piece.region == shape.region and not isinstance(shape, Composite):
            shape = Union((shape, piece))
        else:
            shape = (
                Composite((*getattr(shape, "parts", (shape,)), piece))
                if isinstance(shape, Composite)
                else Composite((shape, piece))
            )
    for cut in table.tables("cut"):
        shape = shape.symmetry_cut(
            cut.point("point", (0.0, 0.0)), _direction(cut, "keep"), cut.text("name", "symmetry")
        )
        cut.done()
    section = Section(shape, axisymmetric=axisymmetric)
    for rule in table.tables("name_edges"):
        group = rule.text("group")
        box = rule.raw("box", None)
        if box is None:
            rule.fail("box", "is missing: give [x_min, y_min, x_max, y_max]")
        if not (isinstance(box, list) and len(box) == 4):
            rule.fail("box", f"expected [x_min, y_min, x_max, y_max], got {box!r}")
        try:
            corners = tuple(quantity(v, "length") for v in box)
        except UnitError as error:
            rule.fail("box", str(error))
        section = section.name_edges(group, box=corners)
        rule.done()
    if mesh_options["size"] > shape.size:
        table.fail(
            "mesh_size",
            f"{mesh_options['size']:g} m is larger than the section "
            f"({shape.size:.6g} m); choose a size below its smallest feature",
        )
    try:
        groups = section.boundary_groups()  # builds the geometry, does not mesh it
    except GeometryError as error:
        table.fail("shape", str(error))
    refine_table = table.table("refine", None)
    if refine_table is not None:
        refine = {}
        for group in refine_table.data:
            spec = refine_table.table(group)
            if group not in groups:
                refine_table.fail(
                    group,
                    f"is not an edge group of the section "
                    f"{sorted(groups)}" + _suggest(group, groups),
                )
            refine[group] = (spec.get("size", "length"), spec.get("growth", "number", 1.2))
            spec.done()
        refine_table.done()
        mesh_options["refine"] = refine
    regions = _regions(shape)
    return section, None, mesh_options, groups, regions


def _temperature(table: _Table, name: str, default=_MISSING):
    """A temperature in °C, refused below absolute zero."""
    value = table.get(name, "temperature", default)
    if value is not None and value is not default and value <= -273.15:
        table.fail(name, f"is below absolute zero ({value:g} degC)")
    return value


def _regions(shape) -> set[str]:
    node = shape.expanded()
    for attribute in ("parts", "shapes"):
        if hasattr(node, attribute) and isinstance(node, Composite):
            return {r for part in node.parts for r in _regions(part)}
    inner = getattr(node, "shape", None) or getattr(node, "base", None)
    if inner is not None and not isinstance(node, Union | Intersection):
        return _regions(inner)
    return {shape.region}


def _direction(table: _Table, name: str):
    value = table.raw(name, [1.0, 0.0])
    if not (
        isinstance(value, list)
        and len(value) == 2
        and all(isinstance(v, int | float) for v in value)
        and any(value)
    ):
        table.fail(name, f"expected a direction [dx, dy] of two plain numbers, got {value!r}")
    return (float(value[0]), float(value[1]))


_SHAPE_KEYS = {
    "rectangle": ("width", "height"),
    "circle": ("radius",),
    "ellipse": ("semi_x", "semi_y"),
    "annulus": ("outer_radius", "inner_radius"),
    "angle": ("height", "width", "thickness"),
    "channel": ("depth", "width", "web_thickness", "flange_thickness"),
    "tee": ("depth", "width", "web_thickness", "flange_thickness"),
    "i_section": ("depth", "width", "web_thickness", "flange_thickness"),
    "rectangular_tube": ("width", "height", "wall"),
    "round_tube": ("outer_diameter", "wall"),
}


def _read_shape(spec: _Table):
    kind = spec.text("kind", choices=SHAPES)
    region = spec.text("region", "solid")
    lengths = {k: spec.get(k, "length") for k in _SHAPE_KEYS.get(kind, ())}
    for key, value in lengths.items():
        if value <= 0:
            spec.fail(key, f"must be a length > 0, got {value:g} m")
    try:
        if kind == "rectangle":
            edges = spec.raw("edges", {})
            if not isinstance(edges, dict):
                spec.fail("edges", "expected a table of side = group name")
            shape = Rectangle(
                lengths["width"],
                lengths["height"],
                spec.point("corner", (0.0, 0.0)),
                dict(edges),
                spec.get("corner_radius", "length", 0.0),
                spec.text("corner_name", "corners"),
                region,
            )
        elif kind == "circle":
            shape = Circle(
                lengths["radius"],
                spec.point("centre", (0.0, 0.0)),
                spec.text("edge", "outline"),
                region,
            )
        elif kind == "ellipse":
            shape = Ellipse(
                lengths["semi_x"],
                lengths["semi_y"],
                spec.point("centre", (0.0, 0.0)),
                spec.get("angle", "angle", 0.0),
                spec.text("edge", "outline"),
                region,
            )
        elif kind == "annulus":
            shape = Annulus(
                lengths["outer_radius"],
                lengths["inner_radius"],
                spec.point("centre", (0.0, 0.0)),
                spec.text("outer_edge", "outer"),
                spec.text("inner_edge", "bore"),
                region,
            )
        elif kind == "polygon":
            raw = spec.raw("points")
            if not (isinstance(raw, list) and len(raw) >= 3):
                spec.fail("points", "expected a list of at least three points [x, y]")
            points = []
            for i, p in enumerate(raw):
                if not (isinstance(p, list) and len(p) == 2):
                    spec.fail("points", f"point {i} must be [x, y], got {p!r}")
                try:
                    points.append((quantity(p[0], "length"), quantity(p[1], "length")))
                except UnitError as error:
                    spec.fail("points", f"point {i}: {error}")
            edges = spec.raw("edges", "outline")
            shape = Polygon(
                tuple(points),
                edges if isinstance(edges, str) else tuple(edges),
                spec.get("corner_radius", "length", 0.0),
                spec.text("corner_name", "corners"),
                region,
            )
        elif kind == "angle":
            shape = profiles.angle(
                lengths["height"],
                lengths["width"],
                lengths["thickness"],
                root_radius=spec.get("root_radius", "length", 0.0),
                toe_radius=spec.get("toe_radius", "length", 0.0),
                region=region,
            )
        elif kind in ("channel", "tee", "i_section"):
            builder = getattr(profiles, kind)
            shape = builder(
                lengths["depth"],
                lengths["width"],
                lengths["web_thickness"],
                lengths["flange_thickness"],
                root_radius=spec.get("root_radius", "length", 0.0),
                region=region,
            )
        elif kind == "rectangular_tube":
            shape = profiles.rectangular_tube(
                lengths["width"],
                lengths["height"],
                lengths["wall"],
                outer_radius=spec.get("outer_radius", "length", 0.0),
                inner_radius=spec.get("inner_radius", "length", None),
                region=region,
            )
        else:
            shape = profiles.round_tube(lengths["outer_diameter"], lengths["wall"], region=region)
    except GeometryError as error:
        spec.fail("kind", str(error))
    rename = spec.raw("rename", None)
    if rename is not None:
        if not isinstance(rename, dict):
            spec.fail("rename", "expected a table of old group = new group")
        try:
            shape = shape.renamed(rename)
        except GeometryError as error:
            spec.fail("rename", str(error))
    mirror = spec.table("mirror", None)
    if mirror is not None:
        shape = shape.mirrored(mirror.point("point", (0.0, 0.0)), _direction(mirror, "direction"))
        mirror.done()
    rotate = spec.get("rotate", "angle", None)
    if rotate is not None:
        shape = shape.rotated(rotate, spec.point("rotate_about", (0.0, 0.0)))
    move = spec.point("move", None)
    if move is not None:
        shape = shape.moved(*move)
    return shape


# ---------------------------------------------------------------------------------------------
# Materials, boundaries, schedules
# ---------------------------------------------------------------------------------------------


def _read_materials(root: _Table, regions: set[str]) -> dict:
    single = root.table("material", None)
    several = root.table("materials", None)
    if single is not None and several is not None:
        root.fail(
            "material",
            "give either [material] (one for the whole section) or [materials.<region>], not both",
        )
    if single is not None:
        material = _read_material(single)
        single.done()
        return {"*": material}
    if several is None:
        root.fail("material", "is missing: give [material] or [materials.<region>]")
    materials = {}
    for region in several.data:
        if region not in regions:
            several.fail(
                region,
                f"is not a region of the section {sorted(regions)}" + _suggest(region, regions),
            )
        spec = several.table(region)
        materials[region] = _read_material(spec)
        spec.done()
    several.done()
    missing = sorted(regions - set(materials))
    if missing:
        root.fail("materials", f"region(s) {missing} have no material")
    return materials


def _read_material(spec: _Table) -> Material:
    if spec.has("solid"):
        name = spec.text("solid")
        if name not in solids.MATERIALS:
            spec.fail(
                "solid",
                "is not in the material library"
                + _suggest(name, solids.MATERIALS)
                + " (see `soakwise materials`)",
            )
        return solids.MATERIALS[name]
    values = {}
    for key, kind in (
        ("conductivity", "conductivity"),
        ("density", "density"),
        ("specific_heat", "specific_heat"),
    ):
        raw = spec.raw(key)
        if isinstance(raw, dict):
            table = _Table(raw, spec.key(key), spec.context)
            temperatures = table.raw("temperatures")
            entries = table.raw("values")
            table.done()
            try:
                values[key] = PropertyTable(
                    tuple(quantity(t, "temperature") for t in temperatures),
                    tuple(quantity(v, kind) for v in entries),
                )
            except (UnitError, ModelError, TypeError) as error:
                spec.fail(key, str(error))
        else:
            values[key] = spec.get(key, kind)
            if values[key] <= 0:
                spec.fail(key, f"must be > 0, got {values[key]:g}")
    try:
        return Material(
            values["conductivity"],
            values["density"],
            values["specific_heat"],
            spec.text("name", "material"),
            spec.text("source", ""),
        )
    except ModelError as error:
        spec.fail("conductivity", str(error))


def _read_boundary(spec: _Table):
    conditions = []
    convection = spec.table("convection", None)
    if convection is not None:
        h = _schedule(convection, "coefficient", "heat_transfer_coefficient")
        _positive(convection, "coefficient", h)
        conditions.append(Convection(h, _schedule(convection, "ambient", "temperature")))
        convection.done()
    radiation = spec.table("radiation", None)
    if radiation is not None:
        emissivity = radiation.get("emissivity", "number")
        if not 0 <= emissivity <= 1:
            radiation.fail("emissivity", f"must be in [0, 1], got {emissivity:g}")
        conditions.append(
            Radiation(emissivity, _schedule(radiation, "surroundings", "temperature"))
        )
        radiation.done()
    if spec.has("flux"):
        conditions.append(HeatFlux(_schedule(spec, "flux", "heat_flux")))
    if spec.has("fixed"):
        conditions.append(FixedTemperature(_schedule(spec, "fixed", "temperature")))
    if spec.has("insulated"):
        value = spec.raw("insulated")
        if value not in (True, "symmetry", "insulated"):
            spec.fail("insulated", f'expected true or "symmetry", got {value!r}')
        conditions.append(Insulated("symmetry" if value == "symmetry" else "insulated"))
    spec.done()
    if not conditions:
        spec.fail(
            "convection",
            "the edge group has no condition: give convection, "
            "radiation, flux, fixed or insulated",
        )
    try:
        return check_conditions(tuple(conditions), spec.path)
    except ModelError as error:
        spec.fail("convection", str(error))


def _positive(table: _Table, name: str, schedule) -> None:
    low = schedule.bounds()[0] if hasattr(schedule, "bounds") else schedule
    if low <= 0:
        table.fail(name, "must be > 0 at all times")


def _schedule(table: _Table, name: str, kind: str):
    """A number, a quantity string, or a schedule table: {steps | linear = [[t, v], ...],
    period = ...} or {sinusoid = {mean, amplitude, period, phase}}."""
    raw = table.raw(name)
    if not isinstance(raw, dict):
        value = table.get(name, kind)
        if kind == "temperature" and value <= -273.15:
            table.fail(name, f"is below absolute zero ({value:g} degC)")
        return value
    spec = _Table(raw, table.key(name), table.context)
    if spec.has("sinusoid"):
        wave = spec.table("sinusoid")
        mean = wave.get("mean", kind)
        amplitude = wave.get(
            "amplitude", "temperature_difference" if kind == "temperature" else kind
        )
        period = wave.get("period", "time")
        phase = wave.get("phase", "angle", 0.0)
        wave.done()
        spec.done()
        if period <= 0:
            spec.fail("sinusoid", "period must be > 0")
        schedule = Sinusoid(mean, amplitude, period, math.radians(phase))
    else:
        style = "steps" if spec.has("steps") else "linear"
        pairs = spec.raw(style)
        if not (
            isinstance(pairs, list)
            and pairs
            and all(isinstance(p, list) and len(p) == 2 for p in pairs)
        ):
            spec.fail(style, "expected a list of [time, value] pairs")
        try:
            times = tuple(quantity(p[0], "time") for p in pairs)
            values = tuple(quantity(p[1], kind) for p in pairs)
        except UnitError as error:
            spec.fail(style, str(error))
        period = spec.get("period", "time", None)
        spec.done()
        try:
            schedule = Steps(times, values) if style == "steps" else PiecewiseLinear(times, values)
            if period is not None:
                schedule = Periodic(schedule, period)
        except ModelError as error:
            spec.fail(style, str(error))
    if kind == "temperature" and schedule.bounds()[0] <= -273.15:
        table.fail(name, "goes below absolute zero")
    return schedule
