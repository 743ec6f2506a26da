"""Constants at 300 K under the library's first names (case files use them).

Incropera, DeWitt, Bergman & Lavine, Fundamentals of Heat and Mass Transfer, 6th ed., Table A.1
(metallic solids) and Table A.3 (non-metallic materials) at 300 K, all from memory. The plain
carbon steel and AISI 1010 rows had been swapped: plain carbon steel is 7854 kg/m³,
60.5 W/(m·K); AISI 1010 7832 kg/m³, 63.9 W/(m·K); both 434 J/(kg·K) (as recalled).
"""

from __future__ import annotations

from .entries import MaterialEntry, entry

_BOOK = "Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed."
_TABLE_A1 = f"{_BOOK}, Table A.1, values at 300 K"
_TABLE_A3 = f"{_BOOK}, Table A.3, values at 300 K"
_WHAT = "constants at 300 K"


def room_temperature() -> list[MaterialEntry]:
    rows = (
        (237.0, 2702.0, 903.0, "aluminium, pure", _TABLE_A1),
        (177.0, 2770.0, 875.0, "aluminium alloy 2024-T6", _TABLE_A1),
        (401.0, 8933.0, 385.0, "copper, pure", _TABLE_A1),
        (110.0, 8530.0, 380.0, "brass (cartridge, 70 Cu 30 Zn)", _TABLE_A1),
        (60.5, 7854.0, 434.0, "carbon steel, plain", _TABLE_A1),
        (63.9, 7832.0, 434.0, "carbon steel AISI 1010", _TABLE_A1),
        (14.9, 7900.0, 477.0, "stainless steel AISI 304", _TABLE_A1),
        (13.4, 8238.0, 468.0, "stainless steel AISI 316", _TABLE_A1),
        (21.9, 4500.0, 522.0, "titanium, pure", _TABLE_A1),
        (1.4, 2220.0, 745.0, "fused silica glass", _TABLE_A3),
    )
    return [entry(name, k, rho, c, source, None, _WHAT) for k, rho, c, name, source in rows]
