"""Starting case files for common scenarios, written by ``soakwise new``.

The scenarios are our own invented parts and conditions; the same files are in
``examples/``.
"""

from importlib.resources import files

SCENARIOS = {
    "quench-bar": "a steel bar quenched in oil (the demo as a case file)",
    "extrusion-quench": "an aluminium channel profile, different sprays on different faces",
    "furnace-round": "a steel round soaked in a furnace: axisymmetric, radiation, tables",
    "heated-conductor": "a copper bus bar heated by its current in still air",
    "coated-plate": "a coated steel plate in hot gas: two materials on one mesh",
    "cyclic-ambient": "a concrete column in a daily temperature cycle",
    "quench-probe": "an alloy probe quenched in a water-like quenchant: a boiling curve",
    "freezing": "a food cylinder frozen in cold air: latent heat, Plank and Pham",
}


def starter_text(scenario: str) -> str:
    """The case file text of ``scenario``."""
    if scenario not in SCENARIOS:
        raise KeyError(f"no scenario {scenario!r}; there are {sorted(SCENARIOS)}")
    return files(__package__).joinpath(f"{scenario}.toml").read_text(encoding="utf-8")
