"""``[interfaces.<name>]``: a thermal contact between two regions, with its conductance or its
resistance, across which the temperature jumps (:class:`fem.Interface`).

The regions are checked while the file is read: they must be regions of the section, two
different ones, named by one interface only, and they must share an edge (the geometry is built,
not meshed, to find out).
"""

from __future__ import annotations

from fem import Interface
from geometries import GeometryError

from .reader import Table, echo, suggest
from .schema import INTERFACE_VALUES
from .validation import build


def read_interfaces(root: Table, plan) -> dict[str, Interface]:
    """Each named interface of ``[interfaces]``; ``plan`` is the section's
    :class:`~advisor.casefile.sections.SectionPlan`."""
    table = root.table("interfaces", None)
    if table is None:
        return {}
    interfaces: dict[str, Interface] = {}
    named: dict[frozenset, str] = {}
    contacts = None
    for name in table.data:
        spec = table.table(name)
        regions = _regions(spec, plan.regions)
        pair = frozenset(regions)
        if pair in named:
            spec.fail("regions", f"interface {named[pair]!r} already joins {sorted(pair)}")
        if contacts is None:
            contacts = _contacts(spec, plan)
        if pair not in contacts:
            touching = sorted(sorted(p) for p in contacts)
            spec.fail(
                "regions",
                f"{regions[0]!r} and {regions[1]!r} do not touch (they share no edge); "
                f"regions that touch: {touching or 'none'}",
            )
        named[pair] = name
        interfaces[name] = _interface(spec, regions)
        spec.done()
    table.done()
    return interfaces


def _regions(spec: Table, regions) -> tuple[str, str]:
    value = spec.raw("regions")
    names = isinstance(value, list) and all(isinstance(v, str) for v in value)
    if not (names and len(value) == 2):
        spec.fail("regions", f"expected two region names such as ['a', 'b'], got {echo(value)}")
    for region in value:
        if region not in regions:
            spec.fail(
                "regions",
                f"{region!r} is not a region of the section {sorted(regions)}"
                + suggest(region, regions),
            )
    if value[0] == value[1]:
        spec.fail("regions", f"an interface joins two different regions, got {value[0]!r} twice")
    return (value[0], value[1])


def _interface(spec: Table, regions: tuple[str, str]) -> Interface:
    given = [key for key in INTERFACE_VALUES if spec.has(key)]
    if len(given) == 2:
        spec.fail(
            "resistance",
            "give conductance or resistance, not both (the resistance is 1/conductance)",
        )
    if not given:
        spec.done()  # a misspelt key is the likelier mistake: name it first
        spec.fail(
            "conductance",
            "is missing: give conductance (e.g. '5000 W/(m^2*K)') or resistance "
            "(e.g. '2e-4 m^2*K/W')",
        )
    key = given[0]
    value = spec.get(key, INTERFACE_VALUES[key])
    return build(spec, Interface, regions, default=key, **{key: value})


def _contacts(spec: Table, plan) -> set[frozenset]:
    """The pairs of regions that share an edge, from the geometry or the imported mesh."""
    if plan.imported is not None:
        from fem.interface_mesh import region_contacts

        return region_contacts(plan.imported)
    try:
        return plan.section.region_contacts()
    except GeometryError as error:  # the section was built once already; this is unlikely
        spec.fail("regions", f"the regions' contacts could not be found: {error}")
