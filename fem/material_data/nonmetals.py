"""Ceramics, a circuit-board laminate, concrete and glass of the library.

Every value was written from memory of the cited document (the comments say so); check it
against the document before relying on it. The user-facing source names the document and the
range only.
"""

from __future__ import annotations

import numpy as np

from .entries import MaterialEntry, entry, kelvin_table, table
from .metals import INCROPERA

EUROCODE_CONCRETE = "EN 1992-1-2:2004, Design of concrete structures, structural fire design"


def concrete_conductivity_upper(theta):
    """EN 1992-1-2:2004, 3.3.3, eq. 3.7 (upper limit; from memory), W/(m·K), 20-1200 °C."""
    t = np.asarray(theta, dtype=float) / 100.0
    return 2.0 - 0.2451 * t + 0.0107 * t**2


def concrete_specific_heat_dry(theta):
    """EN 1992-1-2:2004, 3.3.2, eq. 3.6a (dry concrete, siliceous or calcareous aggregate;
    from memory), J/(kg·K)."""
    t = np.asarray(theta, dtype=float)
    return np.select(
        [t <= 100, t <= 200, t <= 400], [900.0, 900 + (t - 100), 1000 + (t - 200) / 2], 1100.0
    )


def nonmetals() -> list[MaterialEntry]:
    """The non-metal entries."""
    concrete_points = np.arange(20.0, 1200.0 + 1e-9, 20.0)
    return [
        # Incropera et al., Table A.2, polycrystalline aluminium oxide (from memory); c at 1200
        # and 1500 K continued along the table's trend (approximate)
        entry(
            "alumina, polycrystalline",
            kelvin_table(
                (300, 400, 600, 800, 1000, 1200, 1500), (36.0, 26.4, 15.8, 10.4, 7.85, 6.55, 5.66)
            ),
            3970.0,
            kelvin_table(
                (300, 400, 600, 800, 1000, 1200, 1500), (765, 940, 1110, 1180, 1225, 1260, 1300)
            ),
            f"{INCROPERA}, Table A.2 (aluminum oxide, polycrystalline)",
            (26.85, 1226.85),
        ),
        # dense 8 mol% yttria-stabilised zirconia: k after Schlichting, Padture & Klemens
        # (2001), J. Mater. Sci. 36, 3003; c of ZrO2 from the NIST-JANAF tables (both from memory)
        entry(
            "zirconia, yttria-stabilised",
            table((25, 200, 400, 600, 800, 1000), (2.5, 2.4, 2.3, 2.25, 2.3, 2.4)),
            5900.0,
            table((25, 200, 400, 600, 800, 1000), (456, 540, 590, 610, 625, 640)),
            "Schlichting, Padture & Klemens (2001), Thermal conductivity of dense and porous "
            "yttria-stabilized zirconia, J. Mater. Sci. 36; c: NIST-JANAF Thermochemical Tables "
            "(ZrO2)",
            (25.0, 1000.0),
        ),
        *_laminate(),
        entry(
            "concrete, normal-weight",
            table(concrete_points, concrete_conductivity_upper(concrete_points)),
            2300.0,
            table(concrete_points, concrete_specific_heat_dry(concrete_points)),
            f"{EUROCODE_CONCRETE}, 3.3 (dry, upper conductivity limit)",
            (20.0, 1200.0),
        ),
        # Incropera et al., Table A.3, plate glass (soda lime) at 300 K; c's rise with
        # temperature approximate (from memory)
        entry(
            "glass, soda-lime",
            1.4,
            2500.0,
            table((25, 100, 200, 300, 400, 500), (750, 830, 900, 960, 1010, 1050)),
            f"{INCROPERA}, Table A.3 (glass, plate, soda lime)",
            (25.0, 500.0),
        ),
    ]


def _laminate() -> list[MaterialEntry]:
    """FR-4 glass-epoxy: k in the plane of the glass cloth and through it from Sarvar, Poole &
    Witting (1990), PCB glass-fibre laminates: thermal conductivity measurements and their
    effect on simulation, J. Electron. Mater. 19; c rising to the glass transition (all from
    memory). Give the section's regions the direction that matters."""
    source = (
        "Sarvar, Poole & Witting (1990), PCB glass-fibre laminates: thermal conductivity "
        "measurements and their effect on simulation, J. Electronic Materials 19"
    )
    specific_heat = table((20, 50, 100, 130), (1100, 1170, 1290, 1360))
    return [
        entry(
            f"FR-4, {direction}",
            k,
            1850.0,
            specific_heat,
            f"{source} ({direction} conductivity)",
            (20.0, 130.0),
        )
        for direction, k in (("in-plane", 0.81), ("through-thickness", 0.29))
    ]
