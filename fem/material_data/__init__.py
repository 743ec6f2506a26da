"""The material library: metals, ceramics, a laminate, concrete, glass and foods with
temperature-dependent data, each with its source and the temperatures its data cover; and the
room-temperature constants kept under their earlier names."""

from __future__ import annotations

from .entries import LibraryTable, MaterialEntry, entry_of, lookup, range_warnings
from .foods import foods
from .metals import metals
from .nonmetals import nonmetals
from .room_temperature import room_temperature

ENTRIES: dict[str, MaterialEntry] = {
    e.name: e for e in (*room_temperature(), *metals(), *nonmetals(), *foods())
}

__all__ = [
    "ENTRIES",
    "MaterialEntry",
    "LibraryTable",
    "entry_of",
    "lookup",
    "range_warnings",
]
