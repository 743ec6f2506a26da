"""Foods of the library through freezing, from their composition by the Choi–Okos model
(:mod:`fem.food_properties`)."""

from __future__ import annotations

from ..food_properties import Composition
from .entries import MaterialEntry

CHOI_OKOS = (
    "Choi & Okos (1986), Effects of temperature and composition on the thermal properties of "
    "foods, with the ice fraction below the initial freezing point (ASHRAE Handbook, "
    "Refrigeration, ch. 19)"
)
RANGE = (-40.0, 90.0)

# Compositions after the USDA National Nutrient Database (raw; from memory, rounded), initial
# freezing points after the ASHRAE Handbook, Refrigeration, ch. 19 (from memory).
FOODS = {
    "lean beef": (
        Composition(0.735, 0.225, 0.030, 0.0, 0.0, 0.010, -1.7),
        "water 73.5 %, protein 22.5 %, fat 3 %, ash 1 %; initial freezing point -1.7 °C",
    ),
    "potato": (
        Composition(0.793, 0.020, 0.001, 0.153, 0.022, 0.011, -0.8),
        "water 79.3 %, carbohydrate 15.3 %, fibre 2.2 %, protein 2 %, ash 1.1 %; initial "
        "freezing point -0.8 °C",
    ),
}


def foods() -> list[MaterialEntry]:
    """The food entries: k(T) and the enthalpy with the latent heat, −40 to 90 °C."""
    entries = []
    for name, (composition, words) in FOODS.items():
        source = f"{CHOI_OKOS}; {words}; {RANGE[0]:.0f} to {RANGE[1]:.0f} °C"
        material = composition.material(name, source, *RANGE)
        entries.append(
            MaterialEntry(material, f"{CHOI_OKOS}; {words}", RANGE, "k(T), enthalpy with freezing")
        )
    return entries
