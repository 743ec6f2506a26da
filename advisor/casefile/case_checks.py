"""The checks a case can only make once its section is meshed (a probe inside the part, a
target the part can reach), reported like every other case error: the key path, its line and
the values in the units the case used ("45 mm", not "0.045 m")."""

from __future__ import annotations

import numpy as np

from ..errors import AdvisorError
from .reader import Context
from .units import shown_in, unit_of


def check_probes(
    section_mesh, probes: dict, raw: dict, context: Context | None, piece: bool = False
) -> None:
    """Refuse the first probe outside ``section_mesh`` at ``probes.<name>``, with the point
    and the section's extent in the units the case wrote the probe in; ``piece``: the mesh
    is a symmetric piece of the part (the pictures show the whole), which the message says."""
    for name, point in probes.items():
        try:
            section_mesh.locate(np.asarray(point, dtype=float).reshape(2, 1))
        except ValueError:  # GeometryError is one
            values = raw.get(name) if isinstance(raw.get(name), list) else [None, None]
            unit = unit_of(values[0]) or unit_of(values[-1])
            x0, y0 = section_mesh.mesh.p.min(axis=1)
            x1, y1 = section_mesh.mesh.p.max(axis=1)

            def length(v: float, unit: str | None = unit) -> str:
                return shown_in(float(v), "length", unit)

            message = (
                f"the point ({length(point[0])}, {length(point[1])}) lies outside the "
                f"section, which spans x = {length(x0)} to {length(x1)} and y = "
                f"{length(y0)} to {length(y1)}"
            )
            if piece:
                message += (
                    "; probes are placed on the modelled piece (the pictures mirror it to the "
                    "whole part): give the point's mirror image inside the piece"
                )
            _fail(context, f"probes.{name}", message)


def check_target(model, target: float | None, raw_target, context: Context | None) -> None:
    """Refuse a target the lumped model cannot reach at ``advisor.target``, the range in the
    unit the case wrote the target in."""
    if target is None:
        return
    from ..analysis.lumped import LumpedModel  # the analysis loads only when a case meshes

    try:
        lumped = LumpedModel.of(model)
    except AdvisorError:
        return  # no exchanging edge: the assessment says so with its own words
    start, end = lumped.initial_temperature, lumped.equilibrium
    low, high = sorted((start, end))
    if low < target < high:
        return
    unit = unit_of(raw_target)

    def shown(v: float) -> str:
        return shown_in(v, "temperature", unit)

    way = "heats" if end > start else "cools"
    _fail(
        context,
        "advisor.target",
        f"{shown(target)} is not a temperature the part passes through: it {way} from "
        f"{shown(start)} towards {shown(end)} (the lumped equilibrium); choose a target "
        "strictly between them",
    )


def _fail(context: Context | None, key_path: str, message: str):
    if context is None:
        raise AdvisorError(f"{key_path}: {message}", argument=key_path)
    context.fail(key_path, message)
