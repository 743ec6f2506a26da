"""A small library of common solids with constant properties near room temperature.

Values are those of Incropera, DeWitt, Bergman & Lavine, *Fundamentals of Heat and Mass
Transfer*, 6th ed., Table A.1 (metallic solids at 300 K) and Table A.3 (common non-metallic
materials at 300 K), quoted from memory: check them against the table before relying on them.
Properties of real alloys vary with composition, temper and temperature; use a
:class:`~fem.PropertyTable` from the supplier's data for anything that matters.
"""

from __future__ import annotations

from .errors import ModelError
from .materials import Material

_BOOK = "Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed."
_TABLE_A1 = f"{_BOOK}, Table A.1, 300 K (from memory)"
_TABLE_A3 = f"{_BOOK}, Table A.3, 300 K (from memory)"

MATERIALS: dict[str, Material] = {
    m.name: m
    for m in (
        Material(237.0, 2702.0, 903.0, "aluminium, pure", _TABLE_A1),
        Material(177.0, 2770.0, 875.0, "aluminium alloy 2024-T6", _TABLE_A1),
        Material(401.0, 8933.0, 385.0, "copper, pure", _TABLE_A1),
        Material(110.0, 8530.0, 380.0, "brass (cartridge, 70 Cu 30 Zn)", _TABLE_A1),
        Material(63.9, 7832.0, 434.0, "carbon steel, plain", _TABLE_A1),
        Material(60.5, 7854.0, 434.0, "carbon steel AISI 1010", _TABLE_A1),
        Material(14.9, 7900.0, 477.0, "stainless steel AISI 304", _TABLE_A1),
        Material(13.4, 8238.0, 468.0, "stainless steel AISI 316", _TABLE_A1),
        Material(21.9, 4500.0, 522.0, "titanium, pure", _TABLE_A1),
        Material(1.4, 2220.0, 745.0, "fused silica glass", _TABLE_A3),
    )
}


def material(name: str) -> Material:
    """A library material by name; the error lists the names there are."""
    try:
        return MATERIALS[name]
    except KeyError:
        raise ModelError(
            f"no material {name!r} in the library; it has {sorted(MATERIALS)}"
        ) from None
