"""The case file's schema as tables: each shape kind, boundary-condition kind and schedule kind
with its keys, the kind of quantity each holds, and the library argument it becomes.

Adding a kind is one row here: the readers (:mod:`.sections`, :mod:`.conditions`) follow the
rows, and the library object checks the values (:mod:`.validation`).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

from fem import (
    Convection,
    CorrelationConvection,
    FixedTemperature,
    HeatFlux,
    Insulated,
    PiecewiseLinear,
    Radiation,
    Steps,
)
from geometries import Annulus, Circle, Ellipse, Polygon, Rectangle, profiles

from .reader import MISSING


@dataclass(frozen=True)
class Field:
    """One key of a table.

    Parameters
    ----------
    key : str
        The key in the case file.
    argument : str
        The library argument it becomes (and that the library's errors name).
    kind : str
        A quantity kind of :mod:`.units` (``"length"``, ``"temperature"`` ...) or a reading of
        the case file's own: ``"point"``, ``"name"``, ``"points"``, ``"edge_table"``,
        ``"edge_names"``, ``"insulation"``.
    default : object
        The value when the key is absent; required without one.
    schedule : bool
        Whether the value may be a schedule of time (see :data:`SCHEDULES`).
    """

    key: str
    argument: str
    kind: str
    default: object = MISSING
    schedule: bool = False


def _length(key: str, default=MISSING) -> Field:
    return Field(key, key, "length", default)


def _name(key: str, argument: str, default: str) -> Field:
    return Field(key, argument, "name", default)


_CENTRE = Field("centre", "centre", "point", (0.0, 0.0))
_FLANGED = tuple(
    _length(key) for key in ("depth", "width", "web_thickness", "flange_thickness")
) + (_length("root_radius", 0.0),)


@dataclass(frozen=True)
class ShapeKind:
    """A shape kind: the library builder and its keys (``region`` is common to all)."""

    builder: Callable
    fields: tuple[Field, ...]


SHAPES: dict[str, ShapeKind] = {
    "rectangle": ShapeKind(
        Rectangle,
        (
            _length("width"),
            _length("height"),
            Field("corner", "corner", "point", (0.0, 0.0)),
            Field("edges", "edge_names", "edge_table", {}),
            _length("corner_radius", 0.0),
            _name("corner_name", "corner_name", "corners"),
        ),
    ),
    "circle": ShapeKind(Circle, (_length("radius"), _CENTRE, _name("edge", "name", "outline"))),
    "ellipse": ShapeKind(
        Ellipse,
        (
            _length("semi_x"),
            _length("semi_y"),
            _CENTRE,
            Field("angle", "degrees", "angle", 0.0),
            _name("edge", "name", "outline"),
        ),
    ),
    "annulus": ShapeKind(
        Annulus,
        (
            _length("outer_radius"),
            _length("inner_radius"),
            _CENTRE,
            _name("outer_edge", "outer_name", "outer"),
            _name("inner_edge", "inner_name", "bore"),
        ),
    ),
    "polygon": ShapeKind(
        Polygon,
        (
            Field("points", "points", "points"),
            Field("edges", "edge_names", "edge_names", "outline"),
            _length("corner_radius", 0.0),
            _name("corner_name", "corner_name", "corners"),
        ),
    ),
    "angle": ShapeKind(
        profiles.angle,
        (
            _length("height"),
            _length("width"),
            _length("thickness"),
            _length("root_radius", 0.0),
            _length("toe_radius", 0.0),
        ),
    ),
    "channel": ShapeKind(profiles.channel, _FLANGED),
    "tee": ShapeKind(profiles.tee, _FLANGED),
    "i_section": ShapeKind(profiles.i_section, _FLANGED),
    "rectangular_tube": ShapeKind(
        profiles.rectangular_tube,
        (
            _length("width"),
            _length("height"),
            _length("wall"),
            _length("outer_radius", 0.0),
            _length("inner_radius", None),
        ),
    ),
    "round_tube": ShapeKind(profiles.round_tube, (_length("outer_diameter"), _length("wall"))),
}

COMBINE_FIRST = ("first",)
COMBINE_LATER = ("add", "subtract", "intersect")
MESH_FILE_UNITS = ("m", "cm", "mm", "um", "in", "ft")


@dataclass(frozen=True)
class ConditionKind:
    """A boundary-condition kind: the library class and its keys.

    ``single`` kinds are written as one value under the kind's own key (``flux = "2 kW/m^2"``),
    the others as a table of their fields (``[boundaries.top.convection]``).
    """

    condition: type
    fields: tuple[Field, ...]
    single: bool = False


# The kind's key in [boundaries.<group>] → what it builds; in this order in each group.
CONDITIONS: dict[str, ConditionKind] = {
    "convection": ConditionKind(
        Convection,
        (
            Field(
                "coefficient",
                "heat_transfer_coefficient",
                "heat_transfer_coefficient",
                schedule=True,
            ),
            Field("ambient", "ambient", "temperature", schedule=True),
        ),
    ),
    "radiation": ConditionKind(
        Radiation,
        (
            Field("emissivity", "emissivity", "number"),
            Field("surroundings", "surroundings", "temperature", schedule=True),
        ),
    ),
    "flux": ConditionKind(HeatFlux, (Field("flux", "flux", "heat_flux", schedule=True),), True),
    "fixed": ConditionKind(
        FixedTemperature, (Field("fixed", "temperature", "temperature", schedule=True),), True
    ),
    "insulated": ConditionKind(Insulated, (Field("insulated", "reason", "insulation"),), True),
    # h from a flow correlation at the film temperature (fem.flow_correlations)
    "correlation": ConditionKind(
        CorrelationConvection,
        (
            Field("kind", "correlation", "name"),
            Field("fluid", "fluid", "name", "air"),
            Field("fluid_temperature", "fluid_temperature", "temperature"),
            Field("velocity", "velocity", "velocity", None),
            Field("length", "length", "length", None),
            Field("nozzle", "nozzle", "length", None),
            Field("nozzle_distance", "nozzle_distance", "length", None),
        ),
    ),
}

# convection's curves of surface temperature: key → the kind of its values (the curve's quantity
# is the key: SurfaceCurve(..., quantity="coefficient" | "heat_flux"))
SURFACE_CURVES = {"coefficient": "heat_transfer_coefficient", "heat_flux": "heat_flux"}

# insulated = <value> → the Insulated reason
INSULATION = {True: "insulated", "insulated": "insulated", "symmetry": "symmetry"}

# Schedules of time: {steps | linear = [[t, v], ...], period = ...} or {sinusoid = {...}}
TABLE_SCHEDULES = {"steps": Steps, "linear": PiecewiseLinear}
SINUSOID_FIELDS = ("mean", "amplitude", "period", "phase")

MATERIAL_PROPERTIES = {
    "conductivity": "conductivity",
    "density": "density",
    "specific_heat": "specific_heat",
}
# Phase change: latent heat with a solidus and liquidus, or a freezing point and range (the
# phase change begins at the freezing point and ends the range below it).
PHASE_CHANGE = {
    "latent_heat": "specific_energy",
    "solidus": "temperature",
    "liquidus": "temperature",
    "freezing_point": "temperature",
    "freezing_range": "temperature_difference",
}

# [run]: options that are quantities, and their kinds (passed to fem.solve under these names)
RUN_QUANTITIES = {
    "time_step": "time",
    "output_interval": "time",
    "tolerance": "temperature_difference",
    "min_step": "time",
    "max_step": "time",
    "newton_tolerance": "temperature_difference",
}
# The library's run arguments → [run] keys, where they differ.
RUN_KEYS = {"stop": "stop.quantity", "stop.quantity": "stop.quantity"}
OUTPUTS = ("animation", "report", "vtk", "plots", "svg", "mp4", "xdmf")

# [interfaces.<name>]: regions = [first, second] and one of these (the key → its kind)
INTERFACE_VALUES = {"conductance": "heat_transfer_coefficient", "resistance": "contact_resistance"}
