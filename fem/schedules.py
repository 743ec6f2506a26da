"""Values that change with time: coefficients, ambients, fluxes, sources.

Anywhere the model takes a quantity that may vary in time it accepts a plain number (constant)
or one of these schedules. Each reports its breakpoints (where the value or its slope jumps), so
the time stepper never steps over one.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from .errors import ModelError


@dataclass(frozen=True)
class Constant:
    """A value that does not change."""

    value: float

    def __post_init__(self) -> None:
        if not (isinstance(self.value, int | float | np.number) and math.isfinite(self.value)):
            raise ModelError(f"a constant schedule needs a finite number, got {self.value!r}")
        object.__setattr__(self, "value", float(self.value))

    def __call__(self, time: float) -> float:
        return self.value

    def breakpoints(self, end_time: float) -> tuple[float, ...]:
        return ()

    def extremes(self, end_time: float) -> tuple[float, float]:
        return (self.value, self.value)

    def bounds(self) -> tuple[float, float]:
        """Smallest and largest value over all time."""
        return (self.value, self.value)

    @property
    def is_constant(self) -> bool:
        return True

    @property
    def is_stepwise(self) -> bool:
        """True when the value changes only by jumps at the breakpoints."""
        return True


def _table(times, values, what: str) -> tuple[np.ndarray, np.ndarray]:
    t = np.asarray(times, dtype=float)
    v = np.asarray(values, dtype=float)
    if t.ndim != 1 or t.shape != v.shape or len(t) < 1:
        raise ModelError(
            f"{what} needs equal-length lists of times and values, got "
            f"{len(np.atleast_1d(t))} times and {len(np.atleast_1d(v))} values"
        )
    if not (np.all(np.isfinite(t)) and np.all(np.isfinite(v))):
        raise ModelError(f"{what} times and values must be finite")
    if np.any(np.diff(t) <= 0):
        raise ModelError(f"{what} times must increase strictly, got {t.tolist()}")
    if t[0] < 0:
        raise ModelError(f"{what} times must be >= 0 s, got {t[0]}")
    return t, v


@dataclass(frozen=True)
class _TimeTable:
    """(time, value) pairs: what piecewise-linear and stepped schedules share."""

    times: tuple[float, ...]
    values: tuple[float, ...]

    def __post_init__(self) -> None:
        t, v = _table(self.times, self.values, type(self).__name__)
        object.__setattr__(self, "times", tuple(t.tolist()))
        object.__setattr__(self, "values", tuple(v.tolist()))

    def breakpoints(self, end_time: float) -> tuple[float, ...]:
        return tuple(t for t in self.times if 0 < t < end_time)

    def bounds(self) -> tuple[float, float]:
        """Smallest and largest value over all time."""
        return (min(self.values), max(self.values))

    @property
    def is_constant(self) -> bool:
        return len(set(self.values)) == 1

    @property
    def is_stepwise(self) -> bool:
        """True when the value changes only by jumps at the breakpoints."""
        return self.is_constant


@dataclass(frozen=True)
class PiecewiseLinear(_TimeTable):
    """Linear between (time, value) points; held at the first and last value outside them.

    Parameters
    ----------
    times : sequence of float
        Strictly increasing times in s, >= 0.
    values : sequence of float
        Values at those times, in the unit of the quantity scheduled.
    """

    def __call__(self, time: float) -> float:
        return float(np.interp(time, self.times, self.values))

    def extremes(self, end_time: float) -> tuple[float, float]:
        inside = [self(t) for t in (0.0, end_time, *self.breakpoints(end_time))]
        return (min(inside), max(inside))


@dataclass(frozen=True)
class Steps(_TimeTable):
    """Piecewise constant: ``values[i]`` from ``times[i]`` until ``times[i + 1]``; before the
    first time the first value holds.

    Parameters
    ----------
    times : sequence of float
        Strictly increasing switching times in s, >= 0.
    values : sequence of float
        The value that starts at each time.
    """

    def __call__(self, time: float) -> float:
        i = int(np.searchsorted(self.times, time, side="right")) - 1
        return self.values[max(i, 0)]

    def extremes(self, end_time: float) -> tuple[float, float]:
        inside = [self(t) for t in (0.0, *self.breakpoints(end_time))]
        return (min(inside), max(inside))

    @property
    def is_stepwise(self) -> bool:
        """True when the value changes only by jumps at the breakpoints."""
        return True


@dataclass(frozen=True)
class Periodic:
    """A schedule repeated every ``period`` s: the value at t is ``schedule(t mod period)``.

    Parameters
    ----------
    schedule : PiecewiseLinear or Steps
        One period, defined on [0, period].
    period : float
        Repeat time in s; > 0.
    """

    schedule: PiecewiseLinear | Steps
    period: float

    def __post_init__(self) -> None:
        if not isinstance(self.schedule, PiecewiseLinear | Steps):
            raise ModelError(
                f"Periodic repeats a PiecewiseLinear or Steps schedule, got {self.schedule!r}"
            )
        if not (
            isinstance(self.period, int | float) and math.isfinite(self.period) and self.period > 0
        ):
            raise ModelError(f"Periodic period must be a time > 0 s, got {self.period!r}")

    def __call__(self, time: float) -> float:
        # The phase within the period, robust to the round-off of k·period + s at a
        # breakpoint (which must give the value that starts there, as Steps does).
        cycles = math.floor(time / self.period + 1e-12)
        phase = max(time - cycles * self.period, 0.0)
        for t in self.schedule.times:
            if abs(phase - t) <= 1e-12 * self.period:
                phase = t
        return self.schedule(phase)

    def breakpoints(self, end_time: float) -> tuple[float, ...]:
        inner = [t for t in self.schedule.times if 0 <= t < self.period] + [0.0]
        points = set()
        for k in range(int(end_time // self.period) + 1):
            points.update(k * self.period + t for t in inner)
        return tuple(sorted(t for t in points if 0 < t < end_time))

    def extremes(self, end_time: float) -> tuple[float, float]:
        return self.schedule.extremes(min(end_time, self.period))

    def bounds(self) -> tuple[float, float]:
        """Smallest and largest value over all time."""
        return self.schedule.bounds()

    @property
    def is_constant(self) -> bool:
        return self.schedule.is_constant

    @property
    def is_stepwise(self) -> bool:
        """True when the value changes only by jumps at the breakpoints."""
        return self.schedule.is_stepwise


@dataclass(frozen=True)
class Sinusoid:
    """mean + amplitude·sin(2π·t/period + phase): a daily or process cycle."""

    mean: float
    amplitude: float
    period: float
    phase: float = 0.0

    def __post_init__(self) -> None:
        for name in ("mean", "amplitude", "phase"):
            value = getattr(self, name)
            if not (
                isinstance(value, int | float | np.number)
                and not isinstance(value, bool)
                and math.isfinite(value)
            ):
                raise ModelError(f"Sinusoid {name} must be a finite number, got {value!r}")
        if not (
            isinstance(self.period, int | float | np.number)
            and math.isfinite(self.period)
            and self.period > 0
        ):
            raise ModelError(f"Sinusoid period must be a time > 0 s, got {self.period!r}")

    def __call__(self, time: float) -> float:
        return self.mean + self.amplitude * math.sin(2 * math.pi * time / self.period + self.phase)

    def breakpoints(self, end_time: float) -> tuple[float, ...]:
        return ()

    def extremes(self, end_time: float) -> tuple[float, float]:
        return self.bounds()

    def bounds(self) -> tuple[float, float]:
        """Smallest and largest value over all time."""
        a = abs(self.amplitude)
        return (self.mean - a, self.mean + a)

    @property
    def is_constant(self) -> bool:
        return self.amplitude == 0

    @property
    def is_stepwise(self) -> bool:
        """True when the value changes only by jumps at the breakpoints."""
        return self.is_constant


Schedule = Constant | PiecewiseLinear | Steps | Periodic | Sinusoid


def as_schedule(value, what: str) -> Schedule:
    """A schedule from a number or a schedule; a clear error for anything else."""
    if isinstance(value, Constant | PiecewiseLinear | Steps | Periodic | Sinusoid):
        return value
    if isinstance(value, int | float | np.number) and not isinstance(value, bool):
        if not math.isfinite(value):
            raise ModelError(f"{what} must be finite, got {value!r}")
        return Constant(float(value))
    raise ModelError(
        f"{what} must be a number or a schedule (PiecewiseLinear, Steps, "
        f"Periodic, Sinusoid), got {value!r}"
    )


def schedule_text(value, unit: str, end_time: float) -> str:
    """A number or schedule in words for a report: ``"400 W/(m²·K)"``, or its kind and range
    over [0, ``end_time``] s."""
    if isinstance(value, Constant):
        return f"{value.value:.4g} {unit}"
    if isinstance(value, int | float):
        return f"{value:.4g} {unit}"
    low, high = value.extremes(end_time)
    return f"{type(value).__name__} schedule, {low:.4g} to {high:.4g} {unit}"


def schedule_data(value):
    """A number or schedule as plain data for JSON: a constant stays a number, a schedule
    becomes its kind and parameters."""
    if isinstance(value, Constant):
        return value.value
    if dataclasses.is_dataclass(value):
        data = {"schedule": type(value).__name__}
        for field in dataclasses.fields(value):
            data[field.name] = schedule_data(getattr(value, field.name))
        return data
    return value
