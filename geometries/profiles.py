"""Builders for common structural and extruded profiles from their usual dimensions.

All lengths in m. Open profiles name their edges by role: ``outer`` (faces on the profile's
envelope), ``inner`` (faces inside it, root fillets included) and ``tips`` (the ends of
flanges, legs and webs). Tubes name them ``outer`` and ``bore``. Placement: the I-section,
rectangular and round tubes are centred on the origin; the channel has its web's back on x = 0
and is centred on y = 0; the tee is centred on x = 0 with its web's foot on y = 0; the angle has
its heel at the origin.
"""

from __future__ import annotations

from .checks import check_length
from .errors import GeometryError
from .outline import Outline
from .shape_tree import Difference
from .shapes import Annulus, Rectangle, rounded_polygon


def _outline(points, sides, radii, corner_names, region) -> Outline:
    return Outline(rounded_polygon(points, sides, radii, corner_names), region)


def _require(condition: bool, message: str) -> None:
    if not condition:
        raise GeometryError(message)


def _flanged(profile: str, depth, width, web_thickness, flange_thickness, flanges: int):
    """Checked dimensions of a flanged section: ``flanges`` flanges must fit in the depth and
    the web must be thinner than the flanges are wide."""
    h, b, tw, tf = (
        check_length(v, f"{profile} {n}")
        for n, v in (
            ("depth", depth),
            ("width", width),
            ("web_thickness", web_thickness),
            ("flange_thickness", flange_thickness),
        )
    )
    if flanges == 2:
        _require(2 * tf < h, f"{profile} flanges ({tf} m each) do not fit in the depth {h} m")
    else:
        _require(tf < h, f"{profile} flange_thickness {tf} m must be below the depth {h} m")
    _require(tw < b, f"{profile} web_thickness {tw} m must be below the width {b} m")
    return h, b, tw, tf


def angle(
    height: float,
    width: float,
    thickness: float,
    *,
    root_radius: float = 0.0,
    toe_radius: float = 0.0,
    region: str = "solid",
) -> Outline:
    """An angle (L) section: legs ``height`` along y and ``width`` along x, both ``thickness``
    thick, with a root fillet inside the corner and rounded toes."""
    h, b, t = (
        check_length(v, f"angle {n}")
        for n, v in (("height", height), ("width", width), ("thickness", thickness))
    )
    _require(t < min(h, b), f"angle thickness {t} m must be below both legs ({h}, {b} m)")
    points = [(0, 0), (b, 0), (b, t), (t, t), (t, h), (0, h)]
    sides = ["outer", "tips", "inner", "inner", "tips", "outer"]
    radii = [0, 0, toe_radius, root_radius, toe_radius, 0]
    corners = ["outer", "outer", "tips", "inner", "tips", "outer"]
    return _outline(points, sides, radii, corners, region)


def channel(
    depth: float,
    width: float,
    web_thickness: float,
    flange_thickness: float,
    *,
    root_radius: float = 0.0,
    region: str = "solid",
) -> Outline:
    """A channel (C/U) section with parallel flanges: ``depth`` along y, flanges ``width``
    along x."""
    h, b, tw, tf = _flanged("channel", depth, width, web_thickness, flange_thickness, 2)
    y0, y1 = -h / 2, h / 2
    points = [
        (0, y0),
        (b, y0),
        (b, y0 + tf),
        (tw, y0 + tf),
        (tw, y1 - tf),
        (b, y1 - tf),
        (b, y1),
        (0, y1),
    ]
    sides = ["outer", "tips", "inner", "inner", "inner", "tips", "outer", "outer"]
    radii = [0, 0, 0, root_radius, root_radius, 0, 0, 0]
    return _outline(points, sides, radii, ["inner"] * 8, region)


def tee(
    depth: float,
    width: float,
    web_thickness: float,
    flange_thickness: float,
    *,
    root_radius: float = 0.0,
    region: str = "solid",
) -> Outline:
    """A tee section: flange ``width`` along x on top, total ``depth`` along y."""
    h, b, tw, tf = _flanged("tee", depth, width, web_thickness, flange_thickness, 1)
    yf = h - tf
    points = [
        (-tw / 2, 0),
        (tw / 2, 0),
        (tw / 2, yf),
        (b / 2, yf),
        (b / 2, h),
        (-b / 2, h),
        (-b / 2, yf),
        (-tw / 2, yf),
    ]
    sides = ["tips", "inner", "inner", "tips", "outer", "tips", "inner", "inner"]
    radii = [0, 0, root_radius, 0, 0, 0, 0, root_radius]
    return _outline(points, sides, radii, ["inner"] * 8, region)


def i_section(
    depth: float,
    width: float,
    web_thickness: float,
    flange_thickness: float,
    *,
    root_radius: float = 0.0,
    region: str = "solid",
) -> Outline:
    """An I or H section with parallel flanges, centred on the origin: ``depth`` along y,
    flanges ``width`` along x."""
    h, b, tw, tf = _flanged("i_section", depth, width, web_thickness, flange_thickness, 2)
    x, y, w = b / 2, h / 2, tw / 2
    points = [
        (-x, -y),
        (x, -y),
        (x, -y + tf),
        (w, -y + tf),
        (w, y - tf),
        (x, y - tf),
        (x, y),
        (-x, y),
        (-x, y - tf),
        (-w, y - tf),
        (-w, -y + tf),
        (-x, -y + tf),
    ]
    sides = [
        "outer",
        "tips",
        "inner",
        "inner",
        "inner",
        "tips",
        "outer",
        "tips",
        "inner",
        "inner",
        "inner",
        "tips",
    ]
    radii = [0, 0, 0, root_radius, root_radius, 0, 0, 0, 0, root_radius, root_radius, 0]
    return _outline(points, sides, radii, ["inner"] * 12, region)


def rectangular_tube(
    width: float,
    height: float,
    wall: float,
    *,
    outer_radius: float = 0.0,
    inner_radius: float | None = None,
    region: str = "solid",
) -> Difference:
    """A rectangular hollow section centred on the origin. ``inner_radius`` defaults to
    ``max(outer_radius - wall, 0)``."""
    b, h, t = (
        check_length(v, f"rectangular_tube {n}")
        for n, v in (("width", width), ("height", height), ("wall", wall))
    )
    _require(2 * t < min(b, h), f"rectangular_tube wall {t} m leaves no bore in {b} x {h} m")
    inner = max(outer_radius - t, 0.0) if inner_radius is None else inner_radius
    outside = Rectangle(
        b,
        h,
        (-b / 2, -h / 2),
        dict.fromkeys(("bottom", "right", "top", "left"), "outer"),
        outer_radius,
        "outer",
        region,
    )
    bore = Rectangle(
        b - 2 * t,
        h - 2 * t,
        (-b / 2 + t, -h / 2 + t),
        dict.fromkeys(("bottom", "right", "top", "left"), "bore"),
        inner,
        "bore",
        region,
    )
    return Difference(outside, (bore,))


def round_tube(outer_diameter: float, wall: float, *, region: str = "solid") -> Annulus:
    """A round tube (circular hollow section) centred on the origin."""
    d = check_length(outer_diameter, "round_tube outer_diameter")
    t = check_length(wall, "round_tube wall")
    _require(2 * t < d, f"round_tube wall {t} m leaves no bore in a {d} m tube")
    return Annulus(d / 2, d / 2 - t, region=region)
