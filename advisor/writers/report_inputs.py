"""The report's inputs part: the section, its materials, boundary conditions, heat sources,
probes and the run's settings, as they were given."""

from __future__ import annotations

from fem.schedules import schedule_text

from ..analysis.assessment import Assessment
from ..analysis.process_words import process_words
from .report_document import Block, Facts, Part, Table, part
from .report_words import (
    condition_text,
    duration,
    initial_text,
    millimetres,
    property_text,
)


def inputs_part(a: Assessment) -> Part:
    """What was modelled: the general facts, then a table per kind of input."""
    model = a.solution.model
    blocks: list[Block] = [_general_facts(a), _materials_table(a), _edges_table(a)]
    if model.heat_sources:
        blocks.append(_sources_table(a))
    if model.probes:
        blocks.append(_probes_table(a))
    return part("inputs", blocks)


def _per_depth(a: Assessment) -> str:
    """How the section's sizes are counted: planar ones per metre of depth."""
    return "" if a.solution.model.section.facts.axisymmetric else " per metre of depth"


def copies_words(copies: int, declared: bool = False) -> str:
    """How many copies of the modelled piece make the whole part, and what the energies are
    of. ``declared`` is for copies the case states (mirror lines or a count for a piece drawn
    by hand); without it only symmetry cuts count, and a single copy is said to be the
    modelled piece, since a hand-drawn quarter cannot be told from a whole part."""
    if copies > 1:
        how = "declared in the case" if declared else "the modelled piece and its mirror images"
        return (
            f"{copies} ({how}); the energy plot is of the whole part, while the capacities, "
            f"conductances and heat flows in the tables are those of the modelled piece "
            f"(× {copies} for the whole part)"
        )
    return "1 as modelled: energies and heat flows here are those of the modelled piece"


def process_line(verdict) -> str:
    """The kind of process the verdict's words are chosen for, and whether it was inferred."""
    how = "inferred; set [advisor] process to change" if verdict.process_inferred else "as set"
    return f"{process_words(verdict.process, 'name')} ({how})"


def _end_time(a: Assessment) -> float:
    return float(a.solution.times[-1])


def _general_facts(a: Assessment) -> Facts:
    model = a.solution.model
    section = model.section
    facts = section.facts
    return Facts(
        (
            (
                "Section",
                "axisymmetric (the solid of revolution about r = 0)"
                if facts.axisymmetric
                else "planar (per metre of depth)",
            ),
            ("Modelled area", f"{facts.area * 1e6:.5g} mm²"),
            ("Volume", f"{facts.volume:.5g} m³{_per_depth(a)}"),
            ("Copies that make the whole part", copies_words(facts.symmetry_multiplier)),
            (
                "Mesh",
                f"{section.mesh.p.shape[1]} nodes, {section.mesh.t.shape[1]} triangles, "
                f"element order {model.element_order}",
            ),
            ("Initial temperature", initial_text(model.initial_temperature)),
            ("Simulated time", duration(_end_time(a))),
            ("Target", f"{a.target:g} °C" if a.target is not None else "none"),
            ("Judged quantity", a.verdict.subject),
            ("Words chosen for", process_line(a.verdict)),
            ("Tolerance", f"{100 * a.verdict.tolerance:.3g} %"),
        )
    )


def _materials_table(a: Assessment) -> Table:
    model = a.solution.model
    region_areas = model.section.facts.region_areas
    return Table(
        ("region", "area", "material", "conductivity", "density", "specific heat", "source"),
        tuple(
            (
                region,
                f"{region_areas[region] * 1e6:.5g} mm²",
                material.name,
                material.orthotropic.describe()
                if material.orthotropic
                else property_text(material.conductivity, "W/(m·K)"),
                property_text(material.density, "kg/m³"),
                property_text(material.specific_heat, "J/(kg·K)"),
                material.source or "—",
            )
            for region, material in sorted(model.materials.items())
        ),
        caption="Materials by region",
    )


def _edges_table(a: Assessment) -> Table:
    model = a.solution.model
    facts = model.section.facts
    exchange = model.exchange_groups
    end = _end_time(a)
    return Table(
        ("edge group", "length", "surface", "exchanges heat", "condition"),
        tuple(
            (
                name,
                millimetres(facts.edge_lengths[name]),
                f"{facts.surface_areas[name]:.4g} m²{_per_depth(a)}",
                "yes" if name in exchange else "no",
                "; ".join(condition_text(c, end) for c in conditions),
            )
            for name, conditions in sorted(model.boundaries.items())
        ),
        caption="Boundary conditions by edge group",
    )


def _sources_table(a: Assessment) -> Table:
    end = _end_time(a)
    return Table(
        ("region", "heat generated"),
        tuple(
            (region, schedule_text(q, "W/m³", end))
            for region, q in sorted(a.solution.model.heat_sources.items())
        ),
        caption="Heat sources",
    )


def _probes_table(a: Assessment) -> Table:
    solution = a.solution
    return Table(
        ("probe", "position", "final temperature"),
        tuple(
            (
                name,
                f"({millimetres(x)}, {millimetres(y)})",
                f"{float(solution.probes[name][-1]):.4g} °C",
            )
            for name, (x, y) in solution.model.probes.items()
        ),
        caption="Probes",
    )
