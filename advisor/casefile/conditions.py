"""``[boundaries.<group>]``, ``[initial]``, ``[sources]`` and ``[probes]``: the conditions on the
edge groups, the starting temperatures, the heat generated and the named points, with values
that may be schedules of time.
"""

from __future__ import annotations

import math

from fem import (
    ModelError,
    Periodic,
    Sinusoid,
    SurfaceCurve,
    SurfaceTemperatureConvection,
)
from fem.conditions import conditions as checked_combination
from fem.temperatures import check_temperature
from geometries import AXIS_GROUP

from .reader import MISSING, Table, suggest
from .schema import (
    CONDITIONS,
    INSULATION,
    SINUSOID_FIELDS,
    SURFACE_CURVES,
    TABLE_SCHEDULES,
    ConditionKind,
    Field,
)
from .validation import build, raise_at

CURVE_KEYS = ("surface_temperatures", "values")
SCHEDULE_KEYS = ("steps", "linear", "sinusoid")
SCHEDULE_FORMS = (
    "a number or a schedule of time ({steps = [[t, v], ...]}, {linear = [[t, v], ...]} or "
    "{sinusoid = {...}})"
)
CURVE_FORM = "a table of surface temperature {surface_temperatures = [...], values = [...]}"


def read_boundaries(root: Table, groups) -> dict[str, tuple]:
    """The conditions of each edge group, for exactly the section's groups (the axis of an
    axisymmetric section needs none)."""
    table = root.table("boundaries")
    boundaries = {group: _read_group(table.table(group), group) for group in table.data}
    table.done()
    named, known = set(boundaries), set(groups)
    if named - known:
        bad = sorted(named - known)[0]
        table.fail(
            bad,
            f"names an edge group the section does not have; its groups are {sorted(known)}"
            + suggest(bad, known),
        )
    if known - named - {AXIS_GROUP}:
        root.fail(
            "boundaries",
            f"edge group(s) {sorted(known - named - {AXIS_GROUP})} of the section have no "
            "boundary condition; give each one (insulated = true for no heat flow)",
        )
    return boundaries


def _read_group(spec: Table, group: str) -> tuple:
    """The conditions of one edge group, in the schema's order."""
    found = [
        _read_convection(spec, kind) if name == "convection" else _read_condition(spec, name, kind)
        for name, kind in CONDITIONS.items()
        if spec.has(name)
    ]
    spec.done()
    if not found:
        *others, last = CONDITIONS
        spec.fail(
            others[0], f"the edge group has no condition: give {', '.join(others)} or {last}"
        )
    try:
        return checked_combination(tuple(found), group)  # which kinds may share a group
    except ModelError as error:
        message = str(error)
        for name, kind in CONDITIONS.items():  # the library's class names → the case's keys
            message = message.replace(kind.condition.__name__, name)
        message = message.replace(SurfaceTemperatureConvection.__name__, "convection")
        raise_at(spec, ModelError(message), {}, None)


def _read_condition(spec: Table, name: str, kind: ConditionKind):
    """One condition: a single value under its own key, or a table of its fields."""
    table = spec if kind.single else spec.table(name)
    values = {field.argument: _field_value(table, field) for field in kind.fields}
    keys = {field.argument: field.key for field in kind.fields}
    condition = build(table, kind.condition, keys=keys, default=kind.fields[0].key, **values)
    if not kind.single:
        table.done()
    return condition


def _read_convection(spec: Table, kind: ConditionKind):
    """``convection``: with a coefficient of time (the schema's row), or with a curve of
    surface temperature (``coefficient`` or ``heat_flux`` as {surface_temperatures, values}),
    or with ``[[...convection.stages]]``, each a ``from`` time and a curve."""
    raw = spec.raw("convection")
    if not isinstance(raw, dict):
        spec.fail("convection", f"expected a table (coefficient, ambient), got {raw!r}")
    coefficient = raw.get("coefficient")
    curved = "stages" in raw or "heat_flux" in raw
    curved = curved or (
        isinstance(coefficient, dict) and any(k in coefficient for k in CURVE_KEYS)
    )
    if not curved:
        return _read_condition(spec, "convection", kind)
    table = spec.table("convection")
    ambient = schedule(table, "ambient", "temperature")
    if table.has("stages"):
        if table.has("coefficient") or table.has("heat_flux"):
            table.fail("stages", "give either stages or one curve (coefficient or heat_flux)")
        stages = []
        for stage in table.tables("stages"):
            stages.append((stage.get("from", "time"), _curve(stage)))
            stage.done()
        curve, curve_key = tuple(stages), "stages"
    else:
        curve = _curve(table)
        curve_key = "coefficient" if table.has("coefficient") else "heat_flux"
    condition = build(
        table,
        SurfaceTemperatureConvection,
        curve,
        ambient,
        keys={"curve": curve_key},
        default=curve_key,
    )
    table.done()
    return condition


def _curve(table: Table) -> SurfaceCurve:
    """``coefficient`` or ``heat_flux`` = {surface_temperatures = [...], values = [...]}."""
    given = [key for key in SURFACE_CURVES if table.has(key)]
    if len(given) != 1:
        table.fail(
            "coefficient",
            "give one curve of surface temperature: coefficient = {surface_temperatures = "
            "[...], values = [...]} or heat_flux = {...} (the heat flux leaving the surface)"
            + (", not both" if given else ""),
        )
    key = given[0]
    raw = table.raw(key)
    if not isinstance(raw, dict) or not any(k in raw for k in CURVE_KEYS):
        hint = ""
        if key == "heat_flux":
            hint = "; for a heat flux whatever the temperature, use flux = ... on the group"
        table.fail(
            key,
            "expected a table of surface temperature {surface_temperatures = [...], "
            f"values = [...]}}, got {raw!r}{hint}",
        )
    curve = Table(raw, table.key(key), table.context)
    temperatures = _values(curve, "surface_temperatures", "temperature")
    values = _values(curve, "values", SURFACE_CURVES[key])
    curve.done()
    return build(
        curve,
        SurfaceCurve,
        temperatures,
        values,
        key,
        keys={"surface_temperatures": "surface_temperatures", "values": "values"},
        default="values",
    )


def _values(table: Table, key: str, kind: str) -> tuple[float, ...]:
    entries = table.raw(key)
    if not isinstance(entries, list) or not entries:
        table.fail(key, f"expected a list of values, got {entries!r}")
    return tuple(table.quantity(key, entry, kind) for entry in entries)


def _field_value(table: Table, field: Field):
    if field.kind == "insulation":
        value = table.raw(field.key)
        if isinstance(value, bool | str) and value in INSULATION:
            return INSULATION[value]
        table.fail(field.key, f'expected true or "symmetry", got {value!r}')
    if field.kind == "name":
        return table.text(field.key, field.default)
    if field.schedule:
        return schedule(table, field.key, field.kind)
    return table.get(field.key, field.kind, field.default)


def schedule(table: Table, name: str, kind: str):
    """A number, a quantity string, or a schedule table: ``{steps | linear = [[t, v], ...],
    period = ...}`` or ``{sinusoid = {mean, amplitude, period, phase}}``. The library object
    that takes it checks the values it may take (a temperature above absolute zero ...)."""
    raw = table.raw(name)
    if not isinstance(raw, dict):
        return table.get(name, kind)
    if not any(key in raw for key in SCHEDULE_KEYS):
        if any(key in raw for key in CURVE_KEYS):
            table.fail(
                name,
                "a table of surface temperature is taken only by convection's coefficient "
                "and heat_flux",
            )
        forms = SCHEDULE_FORMS
        if kind == "heat_transfer_coefficient":
            forms = forms.replace("a number or", "a number,") + " or " + CURVE_FORM
        table.fail(name, f"expected {forms}, got a table with keys {sorted(raw)}")
    spec = Table(raw, table.key(name), table.context)
    result = _sinusoid(spec, kind) if spec.has("sinusoid") else _time_table(spec, kind)
    spec.done()
    return result


def _sinusoid(spec: Table, kind: str) -> Sinusoid:
    wave = spec.table("sinusoid")
    difference = "temperature_difference" if kind == "temperature" else kind
    kinds = dict(zip(SINUSOID_FIELDS, (kind, difference, "time", "angle"), strict=True))
    values = {key: wave.get(key, kinds[key], 0.0 if key == "phase" else MISSING) for key in kinds}
    wave.done()
    values["phase"] = math.radians(values["phase"])
    return build(wave, Sinusoid, **values)


def _time_table(spec: Table, kind: str):
    style = "steps" if spec.has("steps") else "linear"
    pairs = spec.raw(style)
    if not (
        isinstance(pairs, list)
        and pairs
        and all(isinstance(p, list) and len(p) == 2 for p in pairs)
    ):
        spec.fail(style, "expected a list of [time, value] pairs")
    times = tuple(spec.quantity(style, pair[0], "time") for pair in pairs)
    values = tuple(spec.quantity(style, pair[1], kind) for pair in pairs)
    period = spec.get("period", "time", None)
    result = build(spec, TABLE_SCHEDULES[style], times, values, default=style)
    if period is not None:
        result = build(spec, Periodic, result, period, keys={"schedule": style}, default="period")
    return result


def temperature(table: Table, name: str, default=MISSING):
    """A temperature in °C, checked by the library's rule for a temperature."""
    value = table.get(name, "temperature", default)
    if value is not None and value is not default:
        build(table, check_temperature, value, name, default=name)
    return value


def read_initial(root: Table):
    """``[initial] temperature``: one for the whole section or a table of one per region."""
    initial_table = root.table("initial")
    raw = initial_table.raw("temperature")
    if isinstance(raw, dict):
        per_region = Table(raw, initial_table.key("temperature"), root.context)
        initial = {region: temperature(per_region, region) for region in raw}
        per_region.done()
    else:
        initial = temperature(initial_table, "temperature")
    initial_table.done()
    return initial


def read_sources(root: Table) -> dict:
    """``[sources] <region> = power density``, each a value or a schedule."""
    table = root.table("sources", None)
    if table is None:
        return {}
    sources = {region: schedule(table, region, "power_density") for region in table.data}
    table.done()
    return sources


def read_probes(root: Table) -> dict[str, tuple[float, float]]:
    """``[probes] <name> = [x, y]``."""
    table = root.table("probes", None)
    if table is None:
        return {}
    probes = {name: table.point(name) for name in table.data}
    table.done()
    return probes
