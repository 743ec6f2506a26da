"""Words chosen by the kind of process a case models: heat treatment, food, electronics or
general.

The verdict says why a wrong lumped estimate matters, and that depends on the trade: an
internal temperature difference drives distortion in a quenched steel part, leaves the centre
of a food product under-processed, and sets hot spots at an electronic part's joints. A case
names its process (``[advisor] process``); without it one is inferred from the model and the
target (:func:`infer_process`), and the report says which.
"""

from __future__ import annotations

from ..errors import AdvisorError

PROCESSES = ("heat-treatment", "food", "electronics", "general")
HOT_PROCESS = 300.0  # °C: a start or ambient this hot is a furnace or a quench (our rule)
CHILLING_TARGET = 10.0  # °C: a cooling target at or below this is chilling (common practice)
FOOD_HIGHEST = 100.0  # °C: a chilled product starts no hotter than boiling (our rule)

_WORDS = {
    "heat-treatment": {
        "heating": "non-conservative for a soak or hold time",
        "cooling": "non-conservative for the end of a quench or a safe-to-handle time",
        "difference": "that drives distortion and cracking",
        "name": "heat treatment",
    },
    "food": {
        "heating": "non-conservative for a cooking or pasteurising time (food safety)",
        "cooling": "non-conservative for a chilling or freezing time (food safety)",
        "difference": "that leaves the centre behind the surface (a safe surface over an "
        "under-processed centre)",
        "name": "food processing",
    },
    "electronics": {
        "heating": "non-conservative for a warm-up time or a hot-spot temperature",
        "cooling": "non-conservative for a cool-down or safe-to-touch time",
        "difference": "that sets hot spots and thermal stress at joints and interfaces",
        "name": "electronics",
    },
    "general": {
        "heating": "non-conservative for the time to get there",
        "cooling": "non-conservative for a cool-down or safe-to-handle time",
        "difference": "that sets thermal stress and uneven properties",
        "name": "a general process",
    },
}


def check_process(process: str | None) -> None:
    """Refuse a process that is not one of :data:`PROCESSES` (None: inferred)."""
    if process is not None and process not in PROCESSES:
        raise AdvisorError(
            f"process must be one of {PROCESSES}, got {process!r}", argument="process"
        )


def infer_process(model, initial: float, equilibrium: float, target: float | None) -> str:
    """The kind of process a model looks like, by rules stated here.

    Parameters
    ----------
    model : fem.ThermalModel
        The model (its heat sources and materials).
    initial, equilibrium : float
        The lumped start and end temperatures in °C.
    target : float or None
        The target temperature in °C.

    Returns
    -------
    str
        ``"electronics"`` when a region generates heat; ``"heat-treatment"`` when the start
        or the ambient reaches :data:`HOT_PROCESS`; ``"food"`` when a material freezes below
        10 °C or the part is chilled from at most 100 °C to a target at or below
        :data:`CHILLING_TARGET`; otherwise ``"general"``.
    """
    if model.heat_sources:
        return "electronics"
    if max(initial, equilibrium) >= HOT_PROCESS:
        return "heat-treatment"
    freezes = any(
        m.latent_heat > 0 and m.liquidus is not None and m.liquidus < CHILLING_TARGET
        for m in model.materials.values()
    )
    chilled = (
        target is not None
        and initial > equilibrium
        and initial <= FOOD_HIGHEST
        and target <= CHILLING_TARGET
    )
    return "food" if freezes or chilled else "general"


def process_words(process: str, what: str) -> str:
    """The words for ``what`` (``"heating"``, ``"cooling"``, ``"difference"``, ``"name"``)
    in ``process``."""
    return _WORDS[process][what]
