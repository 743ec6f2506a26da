"""Results of a run no lumped model applies to: the field alone, with the reason.

A part whose edges only hold temperatures or take prescribed fluxes (no edge exchanges heat
with surroundings at a temperature) has no lumped time constant, and a lumped model cannot
hold a fixed surface temperature: the advisor then has no comparison to make. The run still
solves, and its results folder holds the field (histories, animation, VTK) and the advisor's
answer that no lumped model applies, in words.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field

from fem import Solution, ThermalModel

from .errors import AdvisorError


@dataclass(frozen=True)
class FieldResults:
    """What a run produced when no lumped model applies.

    Attributes
    ----------
    solution : fem.Solution
        The field.
    reason : str
        Why no lumped model applies (the advisor's answer).
    title : str
        The case's title.
    outputs : mapping of str to bool
        The case's choice of optional outputs (``animation``, ``vtk``; no report is written).
    mirrors : tuple of advisor.whole_part.Mirror
        Lines the pictures unfold the modelled piece across.
    wall_seconds : float
        Wall-clock time of the run, s.
    """

    solution: Solution
    reason: str
    title: str = ""
    outputs: Mapping[str, bool] = field(default_factory=dict)
    wall_seconds: float = 0.0
    mirrors: tuple = ()  # the whole part's mirror lines, for the pictures

    # What the histories writer reads of an assessment: no lumped curves, no quench readings.
    model_temperatures = property(lambda self: {})
    quench = property(lambda self: None)


def no_lumped_reason(model: ThermalModel) -> str | None:
    """Why no lumped model applies to ``model``, or None when one does."""
    from .analysis.lumped import LumpedModel

    try:
        LumpedModel.of(model)
    except AdvisorError as error:
        return str(error)
    return None
