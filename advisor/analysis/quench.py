"""What quench practitioners read off a cooling history: the cooling rate against temperature,
its largest value and where it occurs, the time through a temperature range (800 → 500 °C for
many steels) and the times to given temperatures.

The rate is the slope of a quadratic fitted by least squares to each recorded point and its
neighbours (a Savitzky–Golay derivative for unevenly spaced times): exact for quadratics,
and with three neighbours a side it passes about a quarter of the noise a central difference
passes on an even grid, so the step-to-step jitter of a time scheme is not amplified.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from ..errors import AdvisorError
from .lumped import crossing_time

NEIGHBOURS = 3  # points a side in each local fit


def rate_of_change(times, history, neighbours: int = NEIGHBOURS) -> np.ndarray:
    """dT/dt in K/s at every recorded time, from local quadratic least-squares fits.

    Parameters
    ----------
    times : array_like
        Strictly increasing times in s.
    history : array_like
        Temperatures in °C at those times.
    neighbours : int
        Points each side of a point in its fit (windows are shifted inwards at the ends).

    Returns
    -------
    ndarray
        The fitted slope at each time, K/s.

    Examples
    --------
    >>> t = np.linspace(0.0, 10.0, 11)
    >>> np.allclose(rate_of_change(t, 3.0 * t**2 - t), 6.0 * t - 1.0)
    True
    """
    t = np.asarray(times, dtype=float)
    y = np.asarray(history, dtype=float)
    if t.ndim != 1 or t.shape != y.shape or len(t) < 3:
        raise AdvisorError("a rate needs at least three (time, temperature) pairs of equal length")
    if np.any(np.diff(t) <= 0):
        raise AdvisorError("times must increase strictly to take a rate of change")
    n = len(t)
    width = min(2 * neighbours + 1, n)
    first = np.clip(np.arange(n) - neighbours, 0, n - width)
    window = first[:, None] + np.arange(width)  # indices of each fit, shape (n, width)
    span = t[window[:, -1]] - t[window[:, 0]]
    s = (t[window] - t[:, None]) / span[:, None]  # scaled offsets, for conditioning
    design = np.stack([np.ones_like(s), s, s * s], axis=-1)  # (n, width, 3)
    normal = np.einsum("nwi,nwj->nij", design, design)
    right = np.einsum("nwi,nw->ni", design, y[window])
    coefficients = np.linalg.solve(normal, right[..., None])[..., 0]
    return coefficients[:, 1] / span


@dataclass(frozen=True)
class QuenchCurve:
    """The quench readings of one history.

    Attributes
    ----------
    name : str
        ``"slowest"`` or ``"probe:<name>"``.
    temperatures : ndarray
        The history, °C, at the solution's times.
    rates : ndarray
        Cooling rate −dT/dt in K/s at those times (the heating rate dT/dt when the part
        heats): positive while the part moves towards the ambient (NaN at a repeated time).
    largest_rate : float
        The largest of ``rates``, K/s.
    largest_rate_temperature, largest_rate_time : float
        The temperature (°C) and time (s) where it occurs.
    times_to : dict of float to float or None
        When the history first reaches each requested temperature, s (None if not in the run).
    range_time : float or None
        Time taken to pass from the first to the second temperature of the cooling range, s.
    """

    name: str
    temperatures: np.ndarray
    rates: np.ndarray
    largest_rate: float
    largest_rate_temperature: float
    largest_rate_time: float
    times_to: dict[float, float | None]
    range_time: float | None


@dataclass(frozen=True)
class QuenchOutputs:
    """Quench readings at the slowest point and every probe.

    Attributes
    ----------
    curves : dict of str to QuenchCurve
        Keyed ``"slowest"`` and ``"probe:<name>"``.
    times_to : tuple of float
        The requested temperatures, °C.
    cooling_range : tuple of float or None
        (from, to) in °C.
    cooling : bool
        True when the part cools (rates are cooling rates), False when it heats.
    """

    curves: dict[str, QuenchCurve]
    times_to: tuple[float, ...]
    cooling_range: tuple[float, float] | None
    cooling: bool


def time_through_range(times, history, start: float, end: float) -> float | None:
    """Time in s between the history first reaching ``start`` and first reaching ``end`` °C
    (in the direction from ``start`` to ``end``); None when either is not reached."""
    drive = start - end
    entered = crossing_time(times, history, start, drive)
    left = crossing_time(times, history, end, drive)
    if entered is None or left is None:
        return None
    return left - entered


def quench_curve(
    name: str,
    times,
    history,
    *,
    drive: float,
    times_to: Sequence[float] = (),
    cooling_range: tuple[float, float] | None = None,
) -> QuenchCurve:
    """The readings of one ``history`` (°C at ``times`` s); ``drive`` = T0 − T∞ (> 0 when
    cooling) sets which way is forward."""
    times, history = np.asarray(times, dtype=float), np.asarray(history, dtype=float)
    rates = np.full(times.shape, np.nan)
    kept = np.r_[True, np.diff(times) > 0]  # a state recorded twice at one time counts once
    rates[kept] = -np.sign(drive) * rate_of_change(times[kept], history[kept])
    i = int(np.nanargmax(rates))
    reached = {float(t): crossing_time(times, history, t, drive) for t in times_to}
    through = time_through_range(times, history, *cooling_range) if cooling_range else None
    return QuenchCurve(
        name,
        np.asarray(history, dtype=float),
        rates,
        float(rates[i]),
        float(history[i]),
        float(times[i]),
        reached,
        through,
    )


def quench_outputs(
    times,
    histories: dict[str, np.ndarray],
    *,
    drive: float,
    times_to: Sequence[float] = (),
    cooling_range: Sequence[float] | None = None,
) -> QuenchOutputs:
    """Quench readings for each named history (``"slowest"``, ``"probe:<name>"``, ...).

    Parameters
    ----------
    times : array_like
        Times in s.
    histories : dict of str to ndarray
        Temperatures in °C at ``times``.
    drive : float
        T0 − T∞ in K: > 0 when the part cools.
    times_to : sequence of float
        Temperatures in °C whose first arrival is wanted.
    cooling_range : (float, float), optional
        From and to, °C, in the direction of the process (800, 500 for a quench).
    """
    span = None
    if cooling_range is not None:
        if len(cooling_range) != 2:
            raise AdvisorError(
                f"cooling_range must be two temperatures (from, to), got {cooling_range!r}"
            )
        span = (float(cooling_range[0]), float(cooling_range[1]))
        if (span[0] - span[1]) * drive <= 0:
            way = "fall" if drive > 0 else "rise"
            raise AdvisorError(
                f"cooling_range {list(span)} degC must {way} in the direction the part moves "
                "(from the first temperature to the second)"
            )
    wanted = tuple(float(t) for t in times_to)
    curves = {
        name: quench_curve(name, times, history, drive=drive, times_to=wanted, cooling_range=span)
        for name, history in histories.items()
    }
    return QuenchOutputs(curves, wanted, span, bool(drive > 0))
