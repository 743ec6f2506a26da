"""The integral of a property table, ∫ value dT (the Kirchhoff transform of k(T), the sensible
enthalpy of c(T)), at many temperatures at once: a nonlinear residual takes it at every node
or quadrature point, once or twice an iteration."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

if TYPE_CHECKING:
    from .materials import PropertyTable


# Tables of at most this many points are integrated as a sum of ramps (see
# :func:`clamped_integral`): a few passes over the points instead of a binary search and three
# gathers, 4x faster on the 57k quadrature points of a 10k-node freezing residual.
RAMP_POINTS = 8
# ... unless the ramps' terms exceed the integral's scale this many times (a steep segment
# among long ones): their sum would then lose that many ulps to cancellation.
RAMP_CANCELLATION = 1e3


def table_arrays(table: PropertyTable):
    """The table as arrays with the running integral and the slopes at its points, and its
    ramps (or None), kept on the table (a nonlinear step integrates it a few times per
    iteration)."""
    arrays = table.__dict__.get("_arrays")
    if arrays is None:
        tt = np.asarray(table.temperatures)
        vv = np.asarray(table.values)
        cumulative = np.concatenate([[0.0], np.cumsum(0.5 * (vv[1:] + vv[:-1]) * np.diff(tt))])
        slopes = np.append(np.diff(vv) / np.diff(tt), 0.0)  # the last: beyond the table
        arrays = (tt, vv, cumulative, slopes, {}, _ramps(tt, vv, slopes))
        object.__setattr__(table, "_arrays", arrays)
    return arrays


def _ramps(tt: np.ndarray, vv: np.ndarray, slopes: np.ndarray):
    """(temperature t_k, slope change Δm_k) of each point where the clamped table's slope
    changes, for few-point tables whose ramps do not cancel (else None)."""
    if tt.size > RAMP_POINTS:
        return None
    changes = np.diff(np.concatenate([[0.0], slopes]))  # slope 0 below and beyond the table
    span = float(tt[-1] - tt[0])
    if float(np.abs(changes).sum()) * span**2 / 2 > RAMP_CANCELLATION * float(vv.min()) * span:
        return None
    return tuple((float(t), float(m)) for t, m in zip(tt, changes, strict=True) if m != 0.0)


def clamped_integral(table: PropertyTable, t: np.ndarray) -> np.ndarray:
    """∫ from the first table temperature to t of the clamped piecewise-linear table: inside
    it exact, beyond its ends the end value times the distance. (Minimum and maximum rather
    than np.clip and np.interp: on the few hundred points of a small model a call's overhead
    is most of its cost.) A table of few points is the sum of ramps

        v_0·(t − t_0) + Σ_k Δm_k·max(t − t_k, 0)²/2,

    Δm_k the change of slope at t_k (the slope is 0 below and beyond the table): the same
    piecewise quadratic, without a search."""
    tt, vv, cumulative, slopes, _, ramps = table_arrays(table)
    if ramps is not None and np.ndim(t) > 0:
        total = t - float(tt[0])  # Python floats: a NumPy scalar times an array took 10x
        total *= float(vv[0])
        for knot, change in ramps:
            part = t - knot  # in place from here: each pass over the points counts
            np.maximum(part, 0.0, out=part)
            part *= part
            part *= 0.5 * change
            total += part
        return total
    i = np.searchsorted(tt, t, side="right") - 1
    i = np.minimum(np.maximum(i, 0), len(tt) - 2)
    inside = np.minimum(np.maximum(t, tt[0]), tt[-1]) - tt[i]
    below = np.minimum(t - tt[0], 0.0)
    above = np.maximum(t - tt[-1], 0.0)
    beyond = vv[0] * below + vv[-1] * above
    return cumulative[i] + inside * (vv[i] + 0.5 * slopes[i] * inside) + beyond


def segment_slope(t, temperatures: np.ndarray, slopes: np.ndarray) -> np.ndarray:
    """The slope at ``t`` of a piecewise-linear table of ``temperatures`` whose segments have
    ``slopes`` (one fewer): the right-hand one at a table point, 0 beyond the ends."""
    i = np.clip(np.searchsorted(temperatures, t, side="right") - 1, 0, len(slopes) - 1)
    inside = (t >= temperatures[0]) & (t <= temperatures[-1])
    return np.where(inside, slopes[i], 0.0)


def reference_integral(table: PropertyTable, reference: float) -> float:
    """:func:`clamped_integral` at one reference temperature, remembered on the table."""
    known = table_arrays(table)[4]
    if reference not in known:
        known[reference] = float(clamped_integral(table, np.asarray([float(reference)]))[0])
    return known[reference]
