"""``[material]`` (one for the whole section) or ``[materials.<region>]``: a solid of the
library by name, or properties given as constants or tables of temperature."""

from __future__ import annotations

from fem import Material, PropertyTable, solids

from .reader import Table, suggest
from .schema import MATERIAL_PROPERTIES
from .validation import build

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
    values = {key: _property(spec, key, kind) for key, kind in MATERIAL_PROPERTIES.items()}
    return build(
        spec,
        Material,
        **values,
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
    temperatures = _list(table, "temperatures", "temperature")
    values = _list(table, "values", kind)
    table.done()
    return build(spec, PropertyTable, temperatures, values, default=key)


def _list(table: Table, key: str, kind: str) -> tuple[float, ...]:
    entries = table.raw(key)
    if not isinstance(entries, list):
        table.fail(key, f"expected a list, got {entries!r}")
    return tuple(table.quantity(key, entry, kind) for entry in entries)
