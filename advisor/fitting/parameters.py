"""What a fit adjusts: blocks of parameters, each tied to one edge group's condition.

A request is written ``QUANTITY:GROUP[:nodes=N]``:

- ``h:GROUP`` — one constant heat-transfer coefficient on the group;
- ``h(t):GROUP:nodes=N`` — h against time, piecewise linear between N equally spaced times
  from 0 to the last reading;
- ``h(T):GROUP:nodes=N`` — h against surface temperature, piecewise linear between N equally
  spaced temperatures over the range the readings and the initial state span (a
  :class:`fem.SurfaceTemperatureConvection` curve, held at its end values beyond it);
- ``emissivity:GROUP`` — the emissivity of the group's radiation.

Node tables are regularised by Tikhonov's method on their second differences (a penalty on
curvature, so a straight line costs nothing); :mod:`.estimate` chooses the weight.
The group's condition in the case gives the starting value, the ambient and the surroundings.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np

from ..errors import AdvisorError

QUANTITIES = ("h", "h(t)", "h(T)", "emissivity")
DEFAULT_NODES = 6
_REQUEST = re.compile(r"^\s*(h\(t\)|h\(T\)|h|emissivity)\s*:\s*([^:]+?)\s*(?::\s*(.*?)\s*)?$")
COEFFICIENT_RANGE = (1e-3, 1e3)  # bounds of h as factors of the starting value
EMISSIVITY_RANGE = (1e-3, 1.0)


@dataclass(frozen=True)
class FitRequest:
    """One ``--fit`` request: ``quantity`` of ``QUANTITIES`` on edge ``group``, with ``nodes``
    for tables (1 otherwise)."""

    quantity: str
    group: str
    nodes: int = 1


def parse_request(text: str) -> FitRequest:
    """A :class:`FitRequest` from ``"h:outside"``, ``"h(t):outside:nodes=6"``, ...

    Raises
    ------
    AdvisorError
        Naming the text and the forms that are understood.

    Examples
    --------
    >>> parse_request("h(T):outside:nodes=8")
    FitRequest(quantity='h(T)', group='outside', nodes=8)
    """
    forms = "h:GROUP, h(t):GROUP:nodes=N, h(T):GROUP:nodes=N or emissivity:GROUP"
    match = _REQUEST.match(text or "")
    if match is None:
        raise AdvisorError(f"--fit {text!r} is not understood; write {forms}", argument="fit")
    quantity, group, options = match.groups()
    table = quantity in ("h(t)", "h(T)")
    nodes = DEFAULT_NODES if table else 1
    if options:
        option = re.fullmatch(r"nodes\s*=\s*(\d+)", options)
        if option is None or not table:
            raise AdvisorError(
                f"--fit {text!r}: {options!r} is not an option of {quantity!r}; only h(t) and "
                "h(T) take nodes=N",
                argument="fit",
            )
        nodes = int(option.group(1))
        if not 2 <= nodes <= 40:
            raise AdvisorError(
                f"--fit {text!r}: nodes must be between 2 and 40, got {nodes}", argument="fit"
            )
    return FitRequest(quantity, group, nodes)


@dataclass(frozen=True)
class Block:
    """The parameters of one request and how they become the group's conditions.

    Attributes
    ----------
    request : FitRequest
    start, lower, upper : ndarray
        Starting values and bounds, in ``unit``.
    knots : ndarray
        Node times (s) for h(t), node surface temperatures (°C) for h(T), empty otherwise.
    ambient : float
        The fluid's temperature on the group (°C) for coefficients; the surroundings for
        emissivity.
    unit : str
    """

    request: FitRequest
    start: np.ndarray
    lower: np.ndarray
    upper: np.ndarray
    knots: np.ndarray
    ambient: object
    unit: str

    @property
    def size(self) -> int:
        return len(self.start)

    @property
    def regularised(self) -> bool:
        return self.size > 2

    @property
    def names(self) -> tuple[str, ...]:
        q, group = self.request.quantity, self.request.group
        if q == "h(t)":
            return tuple(f"h[{group}](t = {t:.4g} s)" for t in self.knots)
        if q == "h(T)":
            return tuple(f"h[{group}](T = {t:.4g} °C)" for t in self.knots)
        return (f"{'h' if q == 'h' else 'emissivity'}[{group}]",)

    def curvature(self) -> np.ndarray:
        """Second differences of the node values, each divided by the typical value, so the
        penalty is free of units (rows × size); empty for single values."""
        if not self.regularised:
            return np.zeros((0, self.size))
        rows = np.zeros((self.size - 2, self.size))
        for i in range(self.size - 2):
            rows[i, i : i + 3] = (1.0, -2.0, 1.0)
        return rows / float(np.mean(self.start))

    def conditions(self, values: np.ndarray, given: tuple) -> tuple:
        """The group's conditions with the fitted one(s) made from ``values``."""
        from fem import (
            Convection,
            PiecewiseLinear,
            Radiation,
            SurfaceCurve,
            SurfaceTemperatureConvection,
        )

        q = self.request.quantity
        if q == "emissivity":
            made = Radiation(float(min(values[0], 1.0)), self.ambient)
            return tuple(made if isinstance(c, Radiation) else c for c in given)
        if q == "h":
            made = Convection(float(values[0]), self.ambient)
        elif q == "h(t)":
            made = Convection(PiecewiseLinear(tuple(self.knots), tuple(values)), self.ambient)
        else:
            curve = SurfaceCurve(tuple(self.knots), tuple(float(v) for v in values))
            made = SurfaceTemperatureConvection(curve, self.ambient)
        convective = (Convection, SurfaceTemperatureConvection)
        return tuple(made if isinstance(c, convective) else c for c in given)

    def coefficient(self, values: np.ndarray, at: np.ndarray) -> np.ndarray:
        """The fitted curve at node coordinates ``at`` (time s or temperature °C)."""
        if self.knots.size == 0:
            return np.full(np.shape(at), float(values[0]))
        return np.interp(at, self.knots, values)


@dataclass(frozen=True)
class Parameters:
    """Every block of a fit, in request order; ``values`` vectors concatenate them."""

    blocks: tuple[Block, ...]

    @property
    def size(self) -> int:
        return sum(b.size for b in self.blocks)

    @property
    def names(self) -> tuple[str, ...]:
        return tuple(n for b in self.blocks for n in b.names)

    @property
    def units(self) -> tuple[str, ...]:
        return tuple(b.unit for b in self.blocks for _ in range(b.size))

    def stacked(self, field: str) -> np.ndarray:
        return np.concatenate([getattr(b, field) for b in self.blocks])

    def split(self, values: np.ndarray) -> list[np.ndarray]:
        edges = np.cumsum([0] + [b.size for b in self.blocks])
        return [
            np.asarray(values[a:b], dtype=float) for a, b in zip(edges, edges[1:], strict=False)
        ]

    def curvature(self) -> np.ndarray:
        """The block-diagonal penalty matrix of every regularised block (rows × size)."""
        rows = [np.zeros((0, self.size))]
        offset = 0
        for block in self.blocks:
            part = block.curvature()
            if part.size:
                full = np.zeros((part.shape[0], self.size))
                full[:, offset : offset + block.size] = part
                rows.append(full)
            offset += block.size
        return np.vstack(rows)

    def boundaries(self, values: np.ndarray, given: dict) -> dict:
        """``given`` boundaries with every fitted group's conditions made from ``values``."""
        result = dict(given)
        for block, part in zip(self.blocks, self.split(values), strict=True):
            group = block.request.group
            result[group] = block.conditions(part, tuple(result[group]))
        return result

    @property
    def nonlinear(self) -> bool:
        return any(b.request.quantity in ("h(T)", "emissivity") for b in self.blocks)


def build_parameters(
    requests: list[FitRequest],
    boundaries: dict,
    *,
    end_time: float,
    temperature_range: tuple[float, float],
) -> Parameters:
    """The blocks for ``requests`` against the case's ``boundaries``.

    Parameters
    ----------
    requests : list of FitRequest
    boundaries : dict of str to tuple of conditions
        The case's conditions per edge group: they give the starting values and ambients.
    end_time : float
        The last reading's time, s (the span of h(t) nodes).
    temperature_range : (float, float)
        Lowest and highest temperature of the readings and the initial state, °C (the span of
        h(T) nodes).

    Raises
    ------
    AdvisorError
        A group the case does not have, a group without the condition to fit, or a quantity
        asked twice for one group.
    """
    if not requests:
        raise AdvisorError("nothing to fit: give at least one --fit request", argument="fit")
    seen: set[tuple[str, str]] = set()
    blocks = []
    for request in requests:
        kind = "emissivity" if request.quantity == "emissivity" else "h"
        if (kind, request.group) in seen:
            raise AdvisorError(
                f"--fit asks for {kind} of edge group {request.group!r} twice", argument="fit"
            )
        seen.add((kind, request.group))
        if request.group not in boundaries:
            raise AdvisorError(
                f"--fit names edge group {request.group!r}, which the case does not have; its "
                f"groups are {sorted(boundaries)}",
                argument="fit",
            )
        blocks.append(
            _block(request, tuple(boundaries[request.group]), end_time, temperature_range)
        )
    return Parameters(tuple(blocks))


def _block(request: FitRequest, given: tuple, end_time: float, span: tuple[float, float]):
    from fem import Convection, Radiation, SurfaceTemperatureConvection

    group = request.group
    if request.quantity == "emissivity":
        radiation = [c for c in given if isinstance(c, Radiation)]
        if not radiation:
            raise AdvisorError(
                f"--fit emissivity:{group}: the case's edge group {group!r} has no radiation; "
                "give it radiation = {emissivity = ..., surroundings = ...} as a first guess",
                argument="fit",
            )
        start = float(np.clip(radiation[0].emissivity, 0.05, 0.95))
        return Block(
            request,
            np.array([start]),
            np.array([EMISSIVITY_RANGE[0]]),
            np.array([EMISSIVITY_RANGE[1]]),
            np.zeros(0),
            radiation[0].surroundings,
            "",
        )
    fluid = [c for c in given if isinstance(c, Convection | SurfaceTemperatureConvection)]
    if not fluid:
        raise AdvisorError(
            f"--fit {request.quantity}:{group}: the case's edge group {group!r} has no "
            "convection; give it convection = {coefficient = ..., ambient = ...} (a first "
            "guess of the coefficient and the fluid's temperature)",
            argument="fit",
        )
    condition = fluid[0]
    ambient = condition.ambient
    if isinstance(condition, Convection):
        guess = float(np.mean(condition.heat_transfer_coefficient.extremes(end_time)))
    else:
        guess = float(np.mean(condition.coefficient(np.linspace(*span, 9), 0.0)))
    if request.quantity == "h":
        knots = np.zeros(0)
    elif request.quantity == "h(t)":
        knots = np.linspace(0.0, end_time, request.nodes)
    else:
        knots = np.linspace(span[0], span[1], request.nodes)
    start = np.full(max(request.nodes, 1), guess)
    low, high = COEFFICIENT_RANGE
    return Block(request, start, low * start, high * start, knots, ambient, "W/(m²·K)")
