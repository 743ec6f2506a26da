"""Metals of the library with temperature-dependent data.

Every value below was written from memory of the cited document, not read from it while
writing (the code comments say so per entry); check against the document before relying on
them. The user-facing source names the document and the range only.
"""

from __future__ import annotations

import numpy as np

from .entries import MaterialEntry, entry, kelvin_table, table

INCROPERA = "Incropera, DeWitt, Bergman & Lavine, Fundamentals of Heat and Mass Transfer, 6th ed."
EUROCODE_STEEL = "EN 1993-1-2:2005, Design of steel structures, structural fire design"
MILLS = "Mills, Recommended Values of Thermophysical Properties for Selected Commercial Alloys"


def carbon_steel_specific_heat(theta):
    """EN 1993-1-2:2005, 3.4.1.2, eqs. 3.2a-d (from memory): c_a(θ) of carbon steel, J/(kg·K),
    θ in °C, 20-1200 °C, with the peak of the ferrite-austenite change at 735 °C."""
    t = np.asarray(theta, dtype=float)
    return np.select(
        [t < 600, t < 735, t < 900],
        [
            425 + 7.73e-1 * t - 1.69e-3 * t**2 + 2.22e-6 * t**3,
            666 + 13002 / (738 - np.minimum(t, 737)),
            545 + 17820 / (np.maximum(t, 732) - 731),
        ],
        650.0,
    )


def carbon_steel_conductivity(theta):
    """EN 1993-1-2:2005, 3.4.1.3, eq. 3.3 (from memory): λ_a = 54 − 3.33·10⁻² θ below 800 °C,
    27.3 W/(m·K) above."""
    t = np.asarray(theta, dtype=float)
    return np.where(t < 800, 54 - 3.33e-2 * t, 27.3)


def stainless_specific_heat(theta):
    """EN 1993-1-2:2005, Annex C, eq. C.2 (from memory): 450 + 0.280θ − 2.91·10⁻⁴θ² +
    1.34·10⁻⁷θ³ J/(kg·K)."""
    t = np.asarray(theta, dtype=float)
    return 450 + 0.280 * t - 2.91e-4 * t**2 + 1.34e-7 * t**3


def stainless_conductivity(theta):
    """EN 1993-1-2:2005, Annex C, eq. C.3 (from memory): 14.6 + 1.27·10⁻² θ W/(m·K)."""
    return 14.6 + 1.27e-2 * np.asarray(theta, dtype=float)


def _sampled(function, low: float, high: float, dense=()) -> object:
    """A table of ``function`` every 10 K, every 1 K inside the ``dense`` interval."""
    points = np.arange(low, high + 1e-9, 10.0)
    if dense:
        points = np.union1d(points, np.arange(dense[0], dense[1] + 1e-9, 1.0))
    return table(points, function(points))


def metals() -> list[MaterialEntry]:
    """The metal entries."""
    return [
        entry(
            "carbon steel, structural",
            _sampled(carbon_steel_conductivity, 20, 1200),
            7850.0,
            _sampled(carbon_steel_specific_heat, 20, 1200, dense=(700, 780)),
            f"{EUROCODE_STEEL}, 3.4.1 (carbon steel)",
            (20.0, 1200.0),
        ),
        # Incropera et al., Table A.1, 1 Cr-1/2 Mo steel, 300-1000 K (from memory)
        entry(
            "low-alloy steel 1Cr-0.5Mo",
            kelvin_table((300, 400, 600, 800, 1000), (42.3, 42.0, 39.1, 34.5, 27.4)),
            7858.0,
            kelvin_table((300, 400, 600, 800, 1000), (442.0, 492.0, 575.0, 688.0, 969.0)),
            f"{INCROPERA}, Table A.1 (1 Cr-1/2 Mo steel)",
            (26.85, 726.85),
        ),
        # density of grade 1.4301 from EN 10088-1 (from memory); EN 1993-1-2 Annex C for k, c
        entry(
            "stainless steel, austenitic",
            _sampled(stainless_conductivity, 20, 1200),
            7900.0,
            _sampled(stainless_specific_heat, 20, 1200),
            f"{EUROCODE_STEEL}, Annex C (austenitic stainless steel 1.4301)",
            (20.0, 1200.0),
        ),
        *_aluminium(),
        # Incropera et al., Table A.1, pure copper, 300-1200 K (from memory)
        entry(
            "copper, oxygen-free",
            kelvin_table((300, 400, 600, 800, 1000, 1200), (401, 393, 379, 366, 352, 339)),
            8933.0,
            kelvin_table((300, 400, 600, 800, 1000, 1200), (385, 397, 417, 433, 451, 480)),
            f"{INCROPERA}, Table A.1 (pure copper)",
            (26.85, 926.85),
        ),
        # Mills (2002), Inconel 718 (from memory; values rounded)
        entry(
            "nickel alloy 718",
            table(
                range(0, 1001, 100),
                (11.2, 12.5, 14.0, 15.5, 17.0, 18.6, 20.2, 21.8, 23.6, 25.4, 27.2),
            ),
            8190.0,
            table(range(0, 1001, 100), (430, 450, 470, 485, 500, 515, 530, 550, 580, 610, 640)),
            f"{MILLS} (2002), Inconel 718",
            (0.0, 1000.0),
        ),
        # Mills (2002), Ti-6Al-4V, alpha+beta field below the beta transus (from memory)
        entry(
            "titanium alloy Ti-6Al-4V",
            table(
                (25, 100, 200, 300, 400, 500, 600, 700, 800, 900),
                (7.0, 7.45, 8.75, 10.15, 11.35, 12.6, 14.2, 15.5, 17.8, 20.2),
            ),
            4420.0,
            table(
                (25, 100, 200, 300, 400, 500, 600, 700, 800, 900),
                (546, 562, 584, 606, 629, 651, 673, 694, 714, 734),
            ),
            f"{MILLS} (2002), Ti-6Al-4V",
            (25.0, 900.0),
        ),
    ]


def _aluminium() -> list[MaterialEntry]:
    """6061-T6, 6063-T6 and 7075-T6: k and c at 25 °C from ASM Handbook Vol. 2 (1990); the
    rise of c with temperature that of pure aluminium in Incropera et al., Table A.1, and a
    small rise of k (from memory, approximate: the temper changes above about 200 °C)."""
    asm = "ASM Handbook Vol. 2 (1990), Properties of wrought aluminum alloys"
    rise = f"; c(T) after {INCROPERA}, Table A.1 (pure aluminium)"
    temperatures = (25, 100, 200, 300, 400, 500)
    c_pure = (1.0, 1.045, 1.09, 1.14, 1.19, 1.24)  # c(T)/c(25 °C) of pure aluminium
    return [
        entry(
            "aluminium alloy 6061-T6",
            table(temperatures, (167, 172, 177, 180, 183, 185)),  # from memory
            2700.0,
            table(temperatures, [896 * f for f in c_pure]),
            f"{asm}, 6061{rise}",
            (25.0, 500.0),
        ),
        entry(
            "aluminium alloy 6063-T6",
            table(temperatures, (200, 203, 205, 207, 208, 209)),  # from memory
            2690.0,
            table(temperatures, [900 * f for f in c_pure]),
            f"{asm}, 6063{rise}",
            (25.0, 500.0),
        ),
        entry(
            "aluminium alloy 7075-T6",
            table(temperatures[:4], (130, 138, 148, 155)),  # from memory
            2810.0,
            table(temperatures[:4], [960 * f for f in c_pure[:4]]),
            f"{asm}, 7075{rise}",
            (25.0, 300.0),
        ),
    ]
