"""One ``[[section.shape]]`` table → a geometries shape: its kind's keys read by the schema's
rows, then renaming, mirroring, rotating and moving."""

from __future__ import annotations

from .reader import Table
from .schema import SHAPES, Field
from .validation import build


def read_shape(spec: Table):
    """The shape of one ``[[section.shape]]`` table, placed and renamed.

    The library's builder checks the values (lengths > 0, an outline that does not cross
    itself ...); an error it names no key for points at ``kind``.
    """
    kind = SHAPES[spec.text("kind", choices=SHAPES)]
    arguments = {field.argument: _value(spec, field) for field in kind.fields}
    arguments["region"] = spec.text("region", "solid")
    keys = {field.argument: field.key for field in kind.fields}
    shape = build(spec, kind.builder, keys=keys, default="kind", **arguments)
    return _placed(spec, _renamed(spec, shape))


def _value(spec: Table, field: Field):
    """The value of one shape key, as the builder takes it."""
    if field.kind == "point":
        return spec.point(field.key, field.default)
    if field.kind == "name":
        return spec.text(field.key, field.default)
    if field.kind == "points":
        return _points(spec, field.key)
    if field.kind == "edge_table":
        edges = spec.raw(field.key, field.default)
        if not isinstance(edges, dict):
            spec.fail(field.key, "expected a table of side = group name")
        return dict(edges)
    if field.kind == "edge_names":
        edges = spec.raw(field.key, field.default)
        return edges if isinstance(edges, str) else tuple(edges)
    return spec.get(field.key, field.kind, field.default)


def _points(spec: Table, key: str) -> tuple[tuple[float, float], ...]:
    raw = spec.raw(key)
    if not (isinstance(raw, list) and len(raw) >= 3):
        spec.fail(key, "expected a list of at least three points [x, y]")
    points = []
    for index, point in enumerate(raw):
        if not (isinstance(point, list) and len(point) == 2):
            spec.fail(key, f"point {index} must be [x, y], got {point!r}")
        x, y = (spec.quantity(key, value, "length") for value in point)
        points.append((x, y))
    return tuple(points)


def _renamed(spec: Table, shape):
    rename = spec.raw("rename", None)
    if rename is None:
        return shape
    if not isinstance(rename, dict):
        spec.fail("rename", "expected a table of old group = new group")
    return build(spec, shape.renamed, rename, default="rename")


def _placed(spec: Table, shape):
    mirror = spec.table("mirror", None)
    if mirror is not None:
        shape = build(
            mirror,
            shape.mirrored,
            mirror.point("point", (0.0, 0.0)),
            direction(mirror, "direction"),
            default="direction",
        )
        mirror.done()
    rotate = spec.get("rotate", "angle", None)
    if rotate is not None:
        shape = shape.rotated(rotate, spec.point("rotate_about", (0.0, 0.0)))
    move = spec.point("move", None)
    if move is not None:
        shape = shape.moved(*move)
    return shape


def direction(table: Table, name: str) -> tuple[float, float]:
    """A direction [dx, dy] of two plain numbers (the library refuses a zero one)."""
    value = table.raw(name, [1.0, 0.0])
    if not (
        isinstance(value, list)
        and len(value) == 2
        and all(isinstance(v, int | float) and not isinstance(v, bool) for v in value)
    ):
        table.fail(name, f"expected a direction [dx, dy] of two plain numbers, got {value!r}")
    return (float(value[0]), float(value[1]))
