"""The key answers' error estimates from a run and its two coarser solves (Richardson in
space and in time); the method and its sources are described in
:mod:`advisor.analysis.error_estimate`.

Every part is read where the runs hold recorded values — at output times, on which every
run's steps land — so that the differences between the runs are their discretisation errors
and not the errors of interpolating between steps. What the run itself reads between steps
(the crossing of the target, the peak of the internal difference) carries its own term, found
from the run's history.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fem import Solution

from .lumped_fits import crossing_time

# Roache's factor of safety ("Quantification of uncertainty in computational fluid dynamics",
# Annu. Rev. Fluid Mech. 29 (1997) 123–160, from memory: 1.25 with three grids, 3 with two),
# 1.25 as Celik et al. (2008) use it: with each part measured (the time part including the
# start-up steps), the estimates of tests/test_error_estimate.py were 0.75–4.2 times the true
# error (but one, of a true error near zero); 3 would have put them at up to 10 times it.
SAFETY_FACTOR = 1.25


@dataclass(frozen=True)
class AnswerError:
    """The estimated discretisation error of one answer.

    Attributes
    ----------
    name : str
        ``"time_to_target"``, ``"peak_difference"``, ``"slowest"`` or ``"probe:<name>"``.
    value : float
        The run's answer (s for the time, K for the difference; for temperatures the largest
        estimate's time's value, °C).
    unit : str
        ``"s"`` or ``"K"``.
    space, time : float
        The space and time parts in the answer's unit: signed (fine − exact, estimated) for
        the time to target and the temperatures; magnitudes (≥ 0) for the peak difference.
    estimate : float
        F_s·(|space| + |time|), the ± stated beside the answer.
    allowed : float
        The advisor's tolerance in the same unit (of the field's time, or of the driving
        difference).
    """

    name: str
    value: float
    unit: str
    space: float
    time: float
    estimate: float
    allowed: float

    @property
    def exceeds(self) -> bool:
        """Whether the estimate is above the advisor's tolerance."""
        return self.estimate > self.allowed


@dataclass(frozen=True)
class Runs:
    """The run and its two extra solves, with what Richardson's extrapolation needs.

    Attributes
    ----------
    fine, coarse : fem.Solution
        The run, and the same problem on the coarse mesh with the run's time settings.
    coarser : fem.Solution or None
        The coarse mesh at half the time resolution (None for exponential steps).

    ratio : float
        r, the coarse mesh's element size over the run's.
    space_order, time_order : int
        p of the elements' temperatures, q of the step formula.
    bound : float
        The exponential steps' own bound on their time error, K (used when ``coarser`` is
        None).
    """

    fine: Solution
    coarse: Solution
    coarser: Solution | None
    ratio: float
    space_order: int
    time_order: int
    bound: float = 0.0


def answer_errors(
    runs: Runs, target: float | None, drive: float, tolerance: float
) -> dict[str, AnswerError]:
    """The error estimates of the time to ``target`` (°C), the peak internal difference, the
    slowest point's and each probe's temperature; ``drive`` = T0 − T∞ (K) gives the
    direction and the span the ``tolerance`` (a fraction) is of."""
    fine = runs.fine
    heating = drive < 0
    allowed = tolerance * abs(drive)
    found: dict[str, AnswerError] = {}
    if target is not None:
        crossing = _time_to_target(runs, target, drive, heating, tolerance)
        if crossing is not None:
            found["time_to_target"] = crossing
    found["peak_difference"] = _peak_difference(runs, allowed)
    histories = {"slowest": lambda r: _slowest(r, heating)}
    for name in fine.probes:
        histories[f"probe:{name}"] = lambda r, name=name: r.probes[name]
    shared = _shared_outputs(runs)
    for name, pick in histories.items():
        space, time = _parts(runs, pick, shared)
        total = SAFETY_FACTOR * (np.abs(space) + np.abs(time))
        i = int(np.argmax(total))
        value = float(_at(fine, pick(fine), shared[i : i + 1])[0])
        found[name] = AnswerError(
            name, value, "K", float(space[i]), float(time[i]), float(total[i]), allowed
        )
    return found


def _parts(runs: Runs, pick, times: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The signed space and time parts of the history ``pick(run)`` at output ``times``.

    Space: (Q_coarse − Q_fine)/(r^p − 1). Time: (Q_coarser − Q_coarse)/(2^q − 1) at the
    coarser solve's output times (every second one of the run's), taken linearly to
    ``times``; for exponential steps their own bound."""
    fine, coarse, coarser = runs.fine, runs.coarse, runs.coarser
    here = _at(fine, pick(fine), times)
    space = (_at(coarse, pick(coarse), times) - here) / (runs.ratio**runs.space_order - 1.0)
    if coarser is None:
        return space, np.full_like(space, runs.bound)
    last = min(float(coarse.times[-1]), float(coarser.times[-1])) * (1 + 1e-12)
    sparse = coarser.output_times[(coarser.output_times > 0) & (coarser.output_times <= last)]
    if len(sparse) == 0:
        sparse = times[-1:]
    doubled = _at(coarser, pick(coarser), sparse) - _at(coarse, pick(coarse), sparse)
    time = np.interp(times, sparse, doubled / (2.0**runs.time_order - 1.0))
    return space, time


def _time_to_target(runs, target, drive, heating, tolerance) -> AnswerError | None:
    """The slowest point's time to target: the parts of its temperature at the crossing
    (taken linearly between the output times either side) over the history's slope there,
    and in the time part also the error of reading the crossing between the run's steps."""
    fine = runs.fine
    history = _slowest(fine, heating)
    crossing = crossing_time(fine.times, history, target, drive)
    shared = _shared_outputs(runs)
    if crossing is None or crossing > shared[-1] or crossing <= 0.0:
        return None
    k = int(np.clip(np.searchsorted(shared, crossing), 1, len(shared) - 1))
    either = shared[k - 1 : k + 1] if len(shared) > 1 else shared
    space, time = _parts(runs, lambda r: _slowest(r, heating), either)
    recorded = _at(fine, history, either)
    slope = _slope(fine.times, history, crossing)
    if len(either) == 2 and recorded[1] != recorded[0]:
        slope = (recorded[1] - recorded[0]) / (either[1] - either[0])
    # A history too high by E reaches a falling target E/|T'| later: Δt = −E/T'.
    space_s = -float(np.interp(crossing, either, space)) / slope
    time_s = -float(np.interp(crossing, either, time)) / slope
    time_s += _reading_error(fine.times, history, crossing)
    estimate = SAFETY_FACTOR * (abs(space_s) + abs(time_s))
    return AnswerError(
        "time_to_target", crossing, "s", space_s, time_s, estimate, tolerance * crossing
    )


def _peak_difference(runs: Runs, allowed: float) -> AnswerError:
    """The peak internal difference T_max − T_min. Space: the magnitudes of the parts of T_max
    and of T_min added (their errors may have opposite signs on one mesh and the same on the
    other, so the difference's own Richardson estimate can miss), the larger of their values
    at the output times either side of the run's peak. Time: Richardson on the coarse and
    coarser solves' peaks themselves, which holds the error of sampling the peak at the steps
    (for exponential steps their bound and that sampling error, from the run's history)."""
    fine = runs.fine
    i = int(np.argmax(fine.internal_difference))
    peak_time = float(fine.times[i])
    shared = _shared_outputs(runs)
    k = int(np.searchsorted(shared, peak_time))
    either = shared[max(k - 1, 0) : k + 1]
    space = 0.0
    for pick in (lambda r: r.maximum, lambda r: r.minimum):
        s, _ = _parts(runs, pick, either)
        space += float(np.max(np.abs(s)))
    if runs.coarser is None:
        time = runs.bound + _sampling_error(fine.times, fine.internal_difference, i)
    else:
        peaks = [float(r.internal_difference.max()) for r in (runs.coarse, runs.coarser)]
        time = abs(peaks[1] - peaks[0]) / (2.0**runs.time_order - 1.0)
    estimate = SAFETY_FACTOR * (space + time)
    value = float(fine.internal_difference[i])
    return AnswerError("peak_difference", value, "K", space, time, estimate, allowed)


def _reading_error(times, history, crossing: float) -> float:
    """The signed error of reading a crossing time off a history by linear interpolation
    between the recorded steps t0 < t < t1, s: the chord misses T by T''·(t − t0)(t1 − t)/2,
    which moves the crossing by −that/T'."""
    times, history = np.asarray(times), np.asarray(history)
    if len(times) < 3:
        return 0.0
    i = int(np.clip(np.searchsorted(times, crossing), 2, len(times) - 1))
    t, value = times[i - 2 : i + 1], history[i - 2 : i + 1]
    slopes = np.diff(value) / np.diff(t)
    curvature = 2 * (slopes[1] - slopes[0]) / (t[2] - t[0])
    within = (crossing - t[1]) * (t[2] - crossing) if t[1] <= crossing <= t[2] else 0.0
    slope = slopes[1] if slopes[1] != 0 else 1e-300
    return float(-curvature * within / 2 / slope)


def _sampling_error(times, history, i: int) -> float:
    """How far the largest value of ``history`` between the steps may lie above its largest
    recorded value (index ``i``): the top of the parabola through the three steps around it,
    K (0 when the parabola does not peak between them)."""
    if len(times) < 3:
        return 0.0
    j = int(np.clip(i, 1, len(times) - 2))
    t, value = np.asarray(times[j - 1 : j + 2]), np.asarray(history[j - 1 : j + 2])
    curvature, slope, constant = np.polyfit(t - t[1], value, 2)
    if not curvature < 0:
        return 0.0
    top = -slope / (2 * curvature)
    if not t[0] - t[1] <= top <= t[2] - t[1]:
        return 0.0
    return float(max(constant - slope**2 / (4 * curvature) - value.max(), 0.0))


def _slope(times, history, at: float) -> float:
    """dT/dt of ``history`` in the step holding ``at``, K/s."""
    i = int(np.clip(np.searchsorted(times, at), 1, len(times) - 1))
    slope = float((history[i] - history[i - 1]) / (times[i] - times[i - 1]))
    return slope if slope != 0.0 else 1e-300  # a crossing has a slope; guard a flat step


def _slowest(run: Solution, heating: bool) -> np.ndarray:
    return run.minimum if heating else run.maximum


def _shared_outputs(runs: Runs) -> np.ndarray:
    """The run's output times after t = 0 that every solve reached (a stop condition may
    end one earlier)."""
    present = [r for r in (runs.fine, runs.coarse, runs.coarser) if r is not None]
    last = min(float(r.times[-1]) for r in present)
    outputs = runs.fine.output_times[1:]  # t = 0 is the initial state in every run
    outputs = outputs[outputs <= last * (1 + 1e-12)]
    return outputs if len(outputs) else np.array([last])


def _at(run: Solution, history: np.ndarray, times: np.ndarray) -> np.ndarray:
    """``history`` at ``times`` (steps land on output times, so these are recorded values)."""
    return np.interp(times, run.times, history)


__all__ = ["SAFETY_FACTOR", "AnswerError", "Runs", "answer_errors"]
