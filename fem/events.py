"""The times a run must land on (schedule breakpoints, output times, the end) and the stop
condition's crossing."""

from __future__ import annotations

from collections.abc import Callable, Iterable
from dataclasses import dataclass

import numpy as np

from .model import ThermalModel

EVENT_TOLERANCE = 1e-9  # a step ends on an event when within this fraction of max(step, 1 s)


@dataclass(frozen=True)
class StopWhen:
    """End the run when a quantity reaches a target.

    Parameters
    ----------
    quantity : str
        ``"mean"``, ``"minimum"``, ``"maximum"`` or the name of a probe.
    target : float
        Temperature in °C; the run stops at the first step that reaches or crosses it, and
        the crossing time is interpolated within that step.
    """

    quantity: str
    target: float


def merged_breakpoints(model: ThermalModel, end: float) -> tuple[float, ...]:
    """The model's breakpoints in (0, end), sorted, without round-off twins.

    Round-off (k·period against end_time) must not make sliver steps: points closer than
    1e-9·end_time to the end or to the previous point are one point.
    """
    merged: list[float] = []
    for point in sorted(model.breakpoints(end)):
        if end - point > 1e-9 * end and (not merged or point - merged[-1] > 1e-9 * end):
            merged.append(point)
    return tuple(merged)


class Events:
    """The breakpoints, output times and end time, in order."""

    def __init__(self, breakpoints: Iterable[float], outputs: Iterable[float], end: float):
        self.breakpoints = tuple(breakpoints)
        self.outputs = tuple(outputs)
        self._times = sorted(set(self.outputs) | set(self.breakpoints) | {end})
        self._next = 0

    def next_after(self, time: float) -> float:
        """The first event after ``time`` (times only increase)."""
        while self._times[self._next] <= time * (1 + 1e-12):
            self._next += 1
        return self._times[self._next]

    def is_output(self, time: float, step: float) -> bool:
        """Whether a step of ``step`` s ending at ``time`` landed on an output time."""
        return near(time, self.outputs, step)

    def is_breakpoint(self, time: float, step: float) -> bool:
        """Whether a step of ``step`` s ending at ``time`` landed on a breakpoint."""
        return near(time, self.breakpoints, step)


def near(time: float, points: tuple[float, ...], step: float) -> bool:
    """Whether a step of ``step`` s ending at ``time`` landed on one of ``points``."""
    return any(abs(time - p) <= EVENT_TOLERANCE * max(step, 1.0) for p in points)


class StopWatch:
    """Watches a stop quantity step by step for the crossing of its target."""

    def __init__(self, stop: StopWhen, quantity: Callable[[np.ndarray, str], float], field):
        self.stop = stop
        self._quantity = quantity
        self.value = quantity(field, stop.quantity)
        self.side = np.sign(self.value - stop.target)

    def crossed(self, field: np.ndarray, time: float, step: float) -> float | None:
        """The crossing time within the step that ended at ``time`` with ``field``,
        interpolated linearly, or None when the target was not reached."""
        before, after = self.value, self._quantity(field, self.stop.quantity)
        self.value = after
        if np.sign(after - self.stop.target) == self.side:
            return None
        fraction = 1.0 if after == before else (self.stop.target - before) / (after - before)
        return float(time - step + step * min(max(fraction, 0.0), 1.0))

    def is_across(self, field: np.ndarray) -> bool:
        """Whether ``field`` lies on the far side of the target."""
        return np.sign(self._quantity(field, self.stop.quantity) - self.stop.target) != self.side


STOP_QUANTITIES = {
    "mean": "the mean temperature",
    "minimum": "the lowest temperature",
    "maximum": "the highest temperature",
}


def stop_reason(
    stop: StopWhen | None,
    stop_time: float | None,
    end_time: float,
    said: Callable[[float], str] = lambda seconds: f"{seconds:.6g} s",
) -> str:
    """Why the run ended, in plain words: the stop condition met (and when) or the end time
    reached (and, with a stop condition, that it was not met).

    Parameters
    ----------
    stop : StopWhen or None
        The run's stop condition.
    stop_time : float or None
        When it was met, s (None if it was not, or there was none).
    end_time : float
        The requested end time, s.
    said : callable, optional
        How a time in s is written (the advisor writes durations for a person).

    Examples
    --------
    >>> stop_reason(StopWhen("core", 845.0), 5400.0, 7200.0)
    "stopped at 5400 s: probe 'core' reached 845 °C"
    >>> stop_reason(None, None, 7200.0)
    'end time reached (7200 s)'
    """
    if stop is None:
        return f"end time reached ({said(end_time)})"
    what = STOP_QUANTITIES.get(stop.quantity, f"probe {stop.quantity!r}")
    if stop_time is not None:
        return f"stopped at {said(stop_time)}: {what} reached {stop.target:g} °C"
    return (
        f"end time reached ({said(end_time)}); the stop condition ({what} reaching "
        f"{stop.target:g} °C) was not met"
    )


def reached(histories: dict, stop: StopWhen) -> bool:
    """Whether the recorded stop quantity ever crossed its target."""
    values = histories["probes"].get(stop.quantity, histories.get(stop.quantity))
    values = np.asarray(values)
    return bool(np.any(np.sign(values - stop.target) != np.sign(values[0] - stop.target)))
