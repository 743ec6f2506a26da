"""A library entry: a material with its source and the temperatures its data covers, and the
once-per-run check that a run stayed inside them."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import ModelError
from ..materials import Material, PropertyTable
from ..temperatures import KELVIN


class LibraryTable(PropertyTable):
    """A library property table: beyond its ends the end value holds without a warning per
    evaluation; the run checks warn once (:func:`range_warnings`)."""

    def __call__(self, temperature):
        return np.interp(np.asarray(temperature, dtype=float), self.temperatures, self.values)


def table(temperatures, values) -> LibraryTable:
    """A library table from (°C, SI value) lists."""
    return LibraryTable(tuple(float(t) for t in temperatures), tuple(float(v) for v in values))


def kelvin_table(kelvins, values) -> LibraryTable:
    """A library table from temperatures in K (as handbooks tabulate them)."""
    return table([k - KELVIN for k in kelvins], values)


@dataclass(frozen=True)
class MaterialEntry:
    """A library material with where its data come from and where it holds.

    Attributes
    ----------
    material : Material
        The properties (constants or tables of temperature, °C).
    source : str
        Author, title, table or equation of the data.
    valid_range : (float, float) or None
        The temperatures the data cover, °C; None for constants at one temperature.
    description : str
        What the data are, in a few words for listings (``"k(T), c(T); 20-1200 °C"``).
    """

    material: Material
    source: str
    valid_range: tuple[float, float] | None
    description: str

    @property
    def name(self) -> str:
        return self.material.name

    def range_words(self) -> str:
        if self.valid_range is None:
            return self.description
        low, high = self.valid_range
        # Whole degrees: ranges quoted in kelvin read 26.85 °C otherwise.
        return f"{low:.0f} to {high:.0f} °C"


def entry(
    name: str,
    conductivity,
    density: float,
    specific_heat,
    source: str,
    valid_range: tuple[float, float] | None,
    what: str = "",
) -> MaterialEntry:
    """An entry whose material's user-facing source says what the data are and their range."""
    span = "" if valid_range is None else f"; {valid_range[0]:.0f} to {valid_range[1]:.0f} °C"
    material = Material(conductivity, density, specific_heat, name, f"{source}{span}")
    varying = [
        words
        for words, value in (("k(T)", conductivity), ("c(T)", specific_heat))
        if isinstance(value, PropertyTable)
    ]
    description = what or (", ".join(varying) if varying else "constants")
    return MaterialEntry(material, source, valid_range, description)


def entry_of(entries: dict[str, MaterialEntry], material: Material) -> MaterialEntry | None:
    """The library entry ``material`` is, or None for a material of the user's own."""
    found = entries.get(getattr(material, "name", None))
    return found if found is not None and found.material == material else None


def range_warnings(entries, materials: dict, lowest: float, highest: float) -> list[str]:
    """One line per library material whose valid range the run's temperatures left.

    Parameters
    ----------
    entries : dict of str to MaterialEntry
    materials : dict of str to Material
        The material of each region.
    lowest, highest : float
        The lowest and highest temperature of the run, °C (over the whole section).
    """
    lines, seen = [], set()
    several = len({id(m) for m in materials.values()}) > 1
    where = "the section's temperatures" if several else "the part's temperatures"
    for region, material in materials.items():
        found = entry_of(entries, material)
        if found is None or found.valid_range is None or found.name in seen:
            continue
        seen.add(found.name)
        low, high = found.valid_range
        # A stepping overshoot of a fraction of a kelvin is no departure from the data.
        slack = max(0.5, 1e-3 * (high - low))
        if lowest < low - slack or highest > high + slack:
            lines.append(
                f"{where} ({lowest:.4g} to {highest:.4g} °C) leave the range of the "
                f"library's data for {found.name!r} (region {region!r}: {low:.0f} to {high:.0f} "
                "°C); beyond it the end values are used"
            )
    return lines


def lookup(entries: dict[str, MaterialEntry], name: str) -> MaterialEntry:
    try:
        return entries[name]
    except KeyError:
        raise ModelError(
            f"no material {name!r} in the library; it has {sorted(entries)}", argument="name"
        ) from None
