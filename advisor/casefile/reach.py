"""Checks of a case that need the whole file but no mesh: every region named in ``[sources]``
and ``[initial.temperature]`` is one the section makes, and a stop target lies where the part
can go.

A part with no heat sources and no heat supplied regardless of its temperature (every
condition bounded: convection, radiation, fixed temperatures, insulation) stays between the
lowest and the highest of its initial temperatures and the temperatures its conditions drive it
towards (the maximum principle; its lumped model tends to the ambient and never passes it). A
stop target outside that range is never reached, so the run would go to its end for nothing.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping

from .reader import Context, suggest


def check_regions_named(
    context: Context, key_path: str, names: Iterable[str], regions: Iterable[str]
) -> None:
    """Refuse the first of ``names`` (keys under ``key_path``) that is not a region."""
    regions = sorted(regions)
    for name in names:
        if name not in regions:
            context.fail(
                f"{key_path}.{name}",
                f"is not a region of the section {regions}" + suggest(name, regions),
            )


def check_stop_reachable(
    context: Context,
    stop,
    initial,
    boundaries: Mapping[str, tuple],
    sources: Mapping,
    end_time: float,
) -> None:
    """Refuse a stop target (``[run] stop``, a :class:`fem.StopWhen`) that the part can never
    reach: beyond every initial and driving temperature of a part whose conditions are all
    bounded and that has no heat sources."""
    if stop is None or sources:
        return
    conditions = [c for group in boundaries.values() for c in group]
    if any(not c.bounded for c in conditions):
        return  # a prescribed flux can take the part anywhere
    values = list(initial.values()) if isinstance(initial, Mapping) else [float(initial)]
    for condition in conditions:
        values.extend(condition.driving_temperatures(end_time))
    low, high = min(values), max(values)
    if low <= stop.target <= high:
        return
    side = "below the lowest" if stop.target < low else "above the highest"
    context.fail(
        "run.stop.target",
        f"{stop.target:.6g} °C is never reached: it is {side} of the initial temperatures and "
        f"the temperatures the conditions drive the part towards ({low:.6g} °C to "
        f"{high:.6g} °C), and with no heat sources or prescribed fluxes the part stays "
        "between them; choose a target in that range",
    )
