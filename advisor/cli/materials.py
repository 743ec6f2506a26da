"""``soakwise materials [NAME] [--plot FILE]``: list the material library, or show one
material's properties over its range."""

from __future__ import annotations

import argparse
from pathlib import Path

from ..errors import AdvisorError
from .common import EXIT_OK

SUMMARY = "list the material library, or show one material"
DESCRIPTION = (
    "List the library's materials with the temperatures their data cover; with NAME, print a "
    "table of that material's properties over its range (and with --plot FILE a PNG)."
)
ROWS = 13  # rows of a material's table


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("name", nargs="?", metavar="NAME", help="a material of the library")
    parser.add_argument(
        "--plot", type=Path, metavar="FILE", help="write k and c over the range as a PNG"
    )


def execute(args: argparse.Namespace) -> int:
    from fem import solids

    if args.name is None:
        if args.plot is not None:
            raise AdvisorError("--plot needs a material NAME")
        _list(solids)
        return EXIT_OK
    try:
        entry = solids.material_entry(args.name)
    except ValueError:
        from difflib import get_close_matches

        close = get_close_matches(args.name, list(solids.ENTRIES), n=3, cutoff=0.5)
        hint = f"; did you mean {', '.join(map(repr, close))}?" if close else ""
        raise AdvisorError(
            f"no material {args.name!r} in the library{hint} (`soakwise materials` lists them)"
        ) from None
    if args.plot is not None and args.plot.suffix.lower() != ".png":
        raise AdvisorError(
            f"--plot writes a PNG: give a file name ending in .png, not {args.plot}"
        )
    temperatures, k, c = _rows(entry)
    print(f"{entry.name}: {entry.source}")
    print(f"density {entry.material.density:.5g} kg/m^3; {entry.range_words()}")
    print(f"{'T (°C)':>10} {'k (W/(m·K))':>12} {'c (J/(kg·K))':>13} {'α (mm²/s)':>15}")
    for t, kk, cc in zip(temperatures, k, c, strict=True):
        alpha = kk / (entry.material.density * cc) * 1e6
        print(f"{t:10.4g} {kk:12.4g} {cc:13.5g} {alpha:15.4g}")
    if entry.material.has_phase_change:
        print("c includes the latent heat released over the freezing range (apparent value).")
    if args.plot is not None:
        from ..writers.material_plot import write_material_plot

        path = write_material_plot(
            args.plot, entry.name, *_curve(entry), entry.material.density, entry.valid_range
        )
        print(f"Wrote {path}")
    return EXIT_OK


def _list(solids) -> None:
    width = max(len(name) for name in solids.ENTRIES) + 2
    for name, entry in sorted(solids.ENTRIES.items()):
        material = entry.material
        k = material.nominal_conductivity
        print(
            f"{name:{width}s} {entry.range_words():22s} k ~ {k:7.4g} W/(m*K)  "
            f"rho = {material.density:6.0f} kg/m^3  ({entry.description})"
        )
    print(
        "\n`soakwise materials NAME` shows a material's properties over its range. Alloys, "
        "tempers and products vary: use your supplier's data where it matters."
    )


def _temperatures(entry):
    import numpy as np

    if entry.valid_range is None:
        return np.array([26.85])  # constants at 300 K
    low, high = entry.valid_range
    points = np.linspace(low, high, ROWS)
    if entry.material.has_phase_change:  # where the latent heat comes out, too
        fine = np.linspace(low, high, 4001)
        peak = fine[np.argmax(entry.material.heat_capacity_at(fine))]
        points = np.union1d(points, [peak - 1.0, peak, peak + 1.0])
    return points


def _rows(entry):
    t = _temperatures(entry)
    material = entry.material
    return t, material.conductivity_at(t), material.heat_capacity_at(t) / material.density


def _curve(entry):
    import numpy as np

    if entry.valid_range is None:
        low, high = 0.0, 100.0
    else:
        low, high = entry.valid_range
    t = np.linspace(low, high, 1200)
    material = entry.material
    return t, material.conductivity_at(t), material.heat_capacity_at(t) / material.density
