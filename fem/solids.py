"""The material library by name: temperature-dependent data for steels, aluminium alloys,
copper, a nickel and a titanium alloy, ceramics, FR-4, concrete, glass and foods through
freezing, each with its source and valid range; and constants at 300 K under the first names.

``MATERIALS`` maps each name to its :class:`~fem.Material`; ``ENTRIES`` to its
:class:`~fem.material_data.MaterialEntry` (source, valid range). See :mod:`fem.material_data`.
"""

from __future__ import annotations

from .material_data import ENTRIES, MaterialEntry, lookup, range_warnings
from .materials import Material

MATERIALS: dict[str, Material] = {name: e.material for name, e in ENTRIES.items()}


def material(name: str) -> Material:
    """A library material by name; the error lists the names there are.

    >>> round(float(material("carbon steel, structural").conductivity(20.0)), 2)  # W/(m·K)
    53.33
    """
    return lookup(ENTRIES, name).material


def material_entry(name: str) -> MaterialEntry:
    """A library entry (material, source, valid range) by name."""
    return lookup(ENTRIES, name)


def run_range_warnings(materials: dict[str, Material], lowest: float, highest: float):
    """One line per library material whose valid range a run's temperatures (``lowest`` to
    ``highest`` °C) left; see :func:`fem.material_data.range_warnings`."""
    return range_warnings(ENTRIES, materials, lowest, highest)
