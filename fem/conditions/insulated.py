"""No heat flow across an edge: an insulated face, a symmetry line or the axis."""

from __future__ import annotations

from dataclasses import dataclass

from ..errors import ModelError
from .base import Condition, register

REASONS = ("insulated", "symmetry", "axis")


@register
@dataclass(frozen=True)
class Insulated(Condition):
    """No heat flow across the edge: an insulated face, a symmetry line or the axis.

    Parameters
    ----------
    reason : str
        ``"insulated"``, ``"symmetry"`` or ``"axis"`` (the axis of an axisymmetric section);
        reported, with no effect on the equations.
    """

    name = "insulated"
    label = "no heat flow"
    alone = True
    flows = False

    reason: str = "insulated"

    def __post_init__(self) -> None:
        if self.reason not in REASONS:
            raise ModelError(
                f"Insulated reason must be 'insulated', 'symmetry' or 'axis', got {self.reason!r}",
                argument="reason",
            )

    def describe(self, end_time: float) -> str:
        return f"no heat flow ({self.reason})"
