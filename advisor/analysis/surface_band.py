"""The surface temperatures a run passed through on one edge group: the part of a coefficient
curve (h or heat flux against surface temperature) the run actually used; and which edge groups
carry such a curve."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fem.conditions import SurfaceTemperatureConvection

from ..errors import AdvisorError


@dataclass(frozen=True)
class SurfaceBand:
    """The lowest and highest temperature on an edge group at each output time.

    Attributes
    ----------
    group : str
        The edge group.
    times : ndarray
        The output times, s.
    lowest, highest : ndarray
        The lowest and highest nodal temperature on the group at those times, °C.
    """

    group: str
    times: np.ndarray
    lowest: np.ndarray
    highest: np.ndarray

    @property
    def low(self) -> float:
        """The lowest surface temperature over the run's output times, °C."""
        return float(self.lowest.min())

    @property
    def high(self) -> float:
        """The highest surface temperature over the run's output times, °C."""
        return float(self.highest.max())


def surface_band(solution, group: str) -> SurfaceBand:
    """The temperatures of the nodes of edge ``group`` at every output time of ``solution``.

    The band is read from the stored fields, so between output times the surface may have
    passed somewhat beyond it (the initial field is always the first output).

    Parameters
    ----------
    solution : fem.Solution
        A finished run.
    group : str
        An edge group of the solution's section.

    Returns
    -------
    SurfaceBand
    """
    mesh = solution.model.section.mesh
    if group not in mesh.boundaries:
        raise AdvisorError(
            f"edge group {group!r} is not in the section; its edge groups are "
            f"{sorted(mesh.boundaries)}"
        )
    nodes = np.unique(mesh.facets[:, mesh.boundaries[group]])
    values = np.array([np.asarray(solution.fields[i])[nodes] for i in range(len(solution.fields))])
    return SurfaceBand(
        group,
        np.asarray(solution.output_times, dtype=float),
        values.min(axis=1),
        values.max(axis=1),
    )


def curve_conditions(model) -> list[tuple[tuple[str, ...], SurfaceTemperatureConvection]]:
    """Every distinct coefficient of ``model`` that follows the surface temperature, with the
    edge groups that carry it (in the model's order)."""
    found: list[tuple[list[str], SurfaceTemperatureConvection]] = []
    for group, conditions in model.boundaries.items():
        for condition in conditions:
            if not isinstance(condition, SurfaceTemperatureConvection):
                continue
            same = next((entry for entry in found if entry[1] == condition), None)
            if same is None:
                found.append(([group], condition))
            else:
                same[0].append(group)
    return [(tuple(groups), condition) for groups, condition in found]
