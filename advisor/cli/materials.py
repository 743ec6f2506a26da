"""``soakwise materials``: list the material library."""

from __future__ import annotations

import argparse

from .common import EXIT_OK

SUMMARY = "list the material library"
DESCRIPTION = "List the library's materials with their properties and sources."


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """The command takes no arguments."""


def execute(args: argparse.Namespace) -> int:
    from fem import solids

    for name, m in sorted(solids.MATERIALS.items()):
        print(
            f"{name:36s} k = {m.conductivity:7.4g} W/(m*K)  rho = {m.density:6.0f} kg/m^3  "
            f"c = {m.specific_heat:5.0f} J/(kg*K)"
        )
    print(
        f"\nSource: {next(iter(solids.MATERIALS.values())).source}; values near room "
        "temperature. Use a property table from your supplier's data where it matters."
    )
    return EXIT_OK
