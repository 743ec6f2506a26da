"""``[material]`` (one for the whole section) or ``[materials.<region>]``: a solid of the
library by name, or properties given as constants or tables of temperature."""

from __future__ import annotations

from fem import EnthalpyTable, Material, Orthotropic, PropertyTable, solids

from .reader import Table, suggest
from .schema import MATERIAL_PROPERTIES, PHASE_CHANGE
from .validation import build

RANGE_KEYS = (("solidus", "liquidus"), ("freezing_point", "freezing_range"))

WHOLE_SECTION = "*"  # the key of the one material of the whole section


def read_materials(root: Table, regions) -> dict[str, Material]:
    """The material of each region, or ``{"*": material}`` for the whole section."""
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
        return {WHOLE_SECTION: material}
    if several is None:
        root.fail("material", "is missing: give [material] or [materials.<region>]")
    materials = {}
    for region in several.data:
        if region not in regions:
            several.fail(
                region,
                f"is not a region of the section {sorted(regions)}" + suggest(region, regions),
            )
        spec = several.table(region)
        materials[region] = _read_material(spec)
        spec.done()
    several.done()
    missing = sorted(set(regions) - set(materials))
    if missing:
        root.fail("materials", f"region(s) {missing} have no material")
    return materials


def _read_material(spec: Table) -> Material:
    if spec.has("solid"):
        name = spec.text("solid")
        if name not in solids.MATERIALS:
            spec.fail(
                "solid",
                "is not in the material library"
                + suggest(name, solids.MATERIALS)
                + " (see `soakwise materials`)",
            )
        return solids.MATERIALS[name]
    if spec.has("enthalpy"):
        return _enthalpy_material(spec)
    values = {key: _property(spec, key, kind) for key, kind in MATERIAL_PROPERTIES.items()}
    return build(
        spec,
        Material,
        **values,
        **_phase_change(spec),
        name=spec.text("name", "material"),
        source=spec.text("source", ""),
        default="conductivity",
        keys={"solidus": _range_key(spec, 0), "liquidus": _range_key(spec, 1)},
    )


def _phase_change(spec: Table) -> dict:
    """``latent_heat`` with ``solidus`` and ``liquidus``, or with ``freezing_point`` and
    ``freezing_range`` (solidus = freezing point − range, liquidus = freezing point)."""
    given = {key: spec.get(key, kind, None) for key, kind in PHASE_CHANGE.items()}
    pairs = [pair for pair in RANGE_KEYS if any(given[key] is not None for key in pair)]
    if given["latent_heat"] is None:
        if pairs:
            spec.fail(pairs[0][0], "needs latent_heat (the heat released over the range)")
        return {}
    if len(pairs) != 1 or any(given[key] is None for key in pairs[0]):
        spec.fail(
            "latent_heat",
            "needs the range it is released over: solidus and liquidus, or freezing_point and "
            "freezing_range (one pair, both keys)",
        )
    if pairs[0][0] == "solidus":
        return {k: given[k] for k in ("latent_heat", "solidus", "liquidus")}
    point, width = given["freezing_point"], given["freezing_range"]
    if not width > 0:
        spec.fail("freezing_range", f"must be > 0 K (0.5-2 K is typical), got {width:g} K")
    return {"latent_heat": given["latent_heat"], "solidus": point - width, "liquidus": point}


def _range_key(spec: Table, index: int) -> str:
    """The key a library error about the solidus (0) or liquidus (1) points at."""
    if spec.has("freezing_point"):
        return ("freezing_range", "freezing_point")[index]
    return ("solidus", "liquidus")[index]


def _enthalpy_material(spec: Table) -> Material:
    """``enthalpy = {temperatures = [...], values = [...]}`` (J/kg, latent heat included)
    instead of ``specific_heat`` and ``latent_heat``."""
    for key in ("specific_heat", *PHASE_CHANGE):
        if spec.has(key):
            spec.fail(key, "give either enthalpy (which includes the latent heat) or " + key)
    raw = spec.raw("enthalpy")
    if not isinstance(raw, dict):
        spec.fail("enthalpy", f"expected {{temperatures = [...], values = [...]}}, got {raw!r}")
    table = Table(raw, spec.key("enthalpy"), spec.context)
    temperatures = _list(table, "temperatures", "temperature")
    values = _list(table, "values", "specific_energy")
    table.done()
    enthalpy = build(table, EnthalpyTable, temperatures, values, default="values")
    return build(
        spec,
        Material.from_enthalpy,
        _property(spec, "conductivity", "conductivity"),
        _property(spec, "density", "density"),
        enthalpy,
        name=spec.text("name", "material"),
        source=spec.text("source", ""),
        default="conductivity",
    )


def _property(spec: Table, key: str, kind: str):
    """A constant, or ``{temperatures = [...], values = [...]}`` for a table of temperature."""
    raw = spec.raw(key)
    if not isinstance(raw, dict):
        return spec.get(key, kind)
    table = Table(raw, spec.key(key), spec.context)
    if key == "conductivity" and ("principal" in raw or "tensor" in raw):
        return _orthotropic(table)
    temperatures = _list(table, "temperatures", "temperature")
    values = _list(table, "values", kind)
    table.done()
    return build(spec, PropertyTable, temperatures, values, default=key)


def _orthotropic(table: Table) -> Orthotropic:
    """``{principal = [k1, k2], angle = ...}`` (the angle of direction 1 from x, or r) or
    ``{tensor = [[k_xx, k_xy], [k_xy, k_yy]]}``."""
    if "tensor" in table.data:
        rows = table.raw("tensor")
        if not (isinstance(rows, list) and len(rows) == 2):
            table.fail("tensor", f"expected [[k_xx, k_xy], [k_xy, k_yy]], got {rows!r}")
        tensor = []
        for row in rows:
            if not (isinstance(row, list) and len(row) == 2):
                table.fail("tensor", f"expected [[k_xx, k_xy], [k_xy, k_yy]], got {rows!r}")
            tensor.append([_conductivity(table, "tensor", value, signed=True) for value in row])
        table.done()
        return build(table, Orthotropic.from_tensor, tensor, default="tensor")
    values = table.raw("principal")
    if not (isinstance(values, list) and len(values) == 2):
        table.fail("principal", f"expected two conductivities [k1, k2], got {values!r}")
    first, second = (_principal(table, value) for value in values)
    angle = table.get("angle", "angle", 0.0)
    table.done()
    keys = {"first": "principal", "second": "principal"}
    return build(table, Orthotropic, first, second, angle, keys=keys)


def _principal(table: Table, value):
    """A principal value: a conductivity, or {temperatures = [...], values = [...]}."""
    if not isinstance(value, dict):
        return _conductivity(table, "principal", value)
    entries = Table(value, table.key("principal"), table.context)
    temperatures = _list(entries, "temperatures", "temperature")
    values = _list(entries, "values", "conductivity")
    entries.done()
    return build(entries, PropertyTable, temperatures, values, default="values")


def _conductivity(table: Table, key: str, value, signed: bool = False) -> float:
    """One conductivity of an orthotropic table (an off-diagonal tensor entry may be < 0)."""
    number = table.quantity(key, value, "conductivity")
    if not signed and not number > 0:
        table.fail(key, f"conductivities must be > 0 W/(m*K), got {value!r}")
    return number


def _list(table: Table, key: str, kind: str) -> tuple[float, ...]:
    entries = table.raw(key)
    if not isinstance(entries, list):
        table.fail(key, f"expected a list, got {entries!r}")
    return tuple(table.quantity(key, entry, kind) for entry in entries)
