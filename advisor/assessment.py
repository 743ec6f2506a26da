"""Compare a finite-element field with the lumped estimate and say whether the latter holds."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fem import Solution

from .biot import COMMON_LIMIT, BiotNumber, biot_numbers
from .errors import AdvisorError
from .lumped import LumpedModel

QUANTITIES = ("slowest", "mean")


@dataclass(frozen=True)
class LumpedError:
    """The largest gap between the lumped estimate and one field quantity.

    Attributes
    ----------
    quantity : str
        ``"mean"`` or ``"slowest"`` (the point farthest from the ambient).
    largest : float
        Largest |lumped − field| over the run in K.
    fraction : float
        ``largest`` divided by the initial driving difference |T0 − T∞|.
    time : float
        When it occurs, s.
    lumped_ahead : bool
        True when, at that time, the lumped estimate is closer to the ambient than the field:
        it has heated or cooled the part faster than it really goes.
    """

    quantity: str
    largest: float
    fraction: float
    time: float
    lumped_ahead: bool


@dataclass(frozen=True)
class Verdict:
    """Whether the lumped estimate is adequate for the chosen quantity, with reasons."""

    adequate: bool
    quantity: str
    tolerance: float
    reasons: tuple[str, ...]


@dataclass(frozen=True)
class Assessment:
    """The advisor's answers for one solution.

    Attributes
    ----------
    solution : fem.Solution
    biot : tuple of BiotNumber
    lumped : LumpedModel
    lumped_temperature : ndarray
        Lumped estimate in °C at ``solution.times``.
    errors : dict of str to LumpedError
        Against the field mean and against the slowest point.
    peak_internal_difference : float
        Largest max − min temperature in the section over the run, K.
    peak_internal_difference_time : float
        When it occurs, s.
    target : float or None
        Target temperature in °C.
    time_to_target : dict of str to float or None
        When each of ``lumped``, ``mean``, ``slowest`` and every probe reaches the target, s;
        ``None`` where it is not reached within the run.
    verdict : Verdict
    """

    solution: Solution
    biot: tuple[BiotNumber, ...]
    lumped: LumpedModel
    lumped_temperature: np.ndarray
    errors: dict[str, LumpedError]
    peak_internal_difference: float
    peak_internal_difference_time: float
    target: float | None
    time_to_target: dict[str, float | None]
    verdict: Verdict

    @property
    def heating(self) -> bool:
        """True when the part warms up towards the ambient."""
        return self.lumped.ambient > self.lumped.initial_temperature

    @property
    def slowest(self) -> np.ndarray:
        """Temperature history of the point farthest from the ambient, °C."""
        return self.solution.minimum if self.heating else self.solution.maximum


def assess(
    solution: Solution,
    *,
    target: float | None = None,
    tolerance: float = 0.05,
    quantity: str = "slowest",
) -> Assessment:
    """Judge the lumped estimate against the field of ``solution``.

    Parameters
    ----------
    solution : fem.Solution
        A finished run.
    target : float, optional
        Temperature in °C the part must reach; strictly between the initial temperature and
        the ambient.
    tolerance : float
        Largest acceptable lumped error as a fraction of the initial driving difference
        |T0 − T∞|; in (0, 1).
    quantity : str
        What the verdict is about: ``"slowest"`` (the point farthest from the ambient, the one
        that decides when a part is through) or ``"mean"`` (the stored heat).

    Returns
    -------
    Assessment

    Examples
    --------
    >>> from geometries import Rectangle
    >>> from fem import Convection, Material, ThermalModel, solve
    >>> air = Convection(heat_transfer_coefficient=20.0, ambient=25.0)
    >>> model = ThermalModel(Rectangle(0.02, 0.01).mesh(size=0.002),
    ...     Material(200.0, 2700.0, 900.0),
    ...     boundaries={s: air for s in ("left", "right", "top", "bottom")},
    ...     initial_temperature=180.0)
    >>> result = assess(solve(model, end_time=3600.0), target=50.0)
    >>> result.verdict.adequate
    True
    """
    lumped = LumpedModel.of(solution.model)
    drive = lumped.initial_temperature - lumped.ambient
    _check_arguments(lumped, drive, target, tolerance, quantity)

    times = solution.times
    lumped_temperature = lumped.temperature(times)
    slowest = solution.minimum if drive < 0 else solution.maximum
    errors = {
        "mean": _largest_error("mean", solution.mean, lumped_temperature, times, drive),
        "slowest": _largest_error("slowest", slowest, lumped_temperature, times, drive),
    }
    spread = solution.internal_difference
    peak = int(np.argmax(spread))

    time_to_target: dict[str, float | None] = {}
    if target is not None:
        time_to_target["lumped"] = lumped.time_to(target)
        time_to_target["mean"] = _crossing_time(times, solution.mean, target, drive)
        time_to_target["slowest"] = _crossing_time(times, slowest, target, drive)
        for name, history in solution.probes.items():
            time_to_target[f"probe:{name}"] = _crossing_time(times, history, target, drive)

    biot = biot_numbers(solution.model)
    verdict = _verdict(errors[quantity], biot[0], tolerance, target, time_to_target, quantity)
    return Assessment(
        solution=solution,
        biot=biot,
        lumped=lumped,
        lumped_temperature=lumped_temperature,
        errors=errors,
        peak_internal_difference=float(spread[peak]),
        peak_internal_difference_time=float(times[peak]),
        target=target,
        time_to_target=time_to_target,
        verdict=verdict,
    )


def _check_arguments(lumped, drive, target, tolerance, quantity) -> None:
    if quantity not in QUANTITIES:
        raise AdvisorError(f"quantity must be one of {QUANTITIES}, got {quantity!r}")
    if not (isinstance(tolerance, int | float) and 0 < tolerance < 1):
        raise AdvisorError(f"tolerance must be a fraction in (0, 1), got {tolerance!r}")
    if drive == 0:
        raise AdvisorError(
            f"the initial temperature equals the ambient ({lumped.ambient} degC): "
            "nothing heats or cools, so there is nothing to assess"
        )
    if target is not None:
        low, high = sorted((lumped.initial_temperature, lumped.ambient))
        if not (isinstance(target, int | float) and low < target < high):
            raise AdvisorError(
                f"target must be a temperature strictly between the initial temperature and "
                f"the ambient, ({low}, {high}) degC, got {target!r}"
            )


def _largest_error(quantity, field, lumped, times, drive) -> LumpedError:
    gap = lumped - field
    i = int(np.argmax(np.abs(gap)))
    # Lumped is "ahead" when it is nearer the ambient: below the field when cooling (drive > 0).
    ahead = bool(gap[i] * drive < 0)
    return LumpedError(
        quantity, float(abs(gap[i])), float(abs(gap[i]) / abs(drive)), float(times[i]), ahead
    )


def _crossing_time(times, history, target, drive) -> float | None:
    """First time the history reaches ``target``, interpolated linearly within the step."""
    remaining = (history - target) * np.sign(drive)  # > 0 until the target is reached
    reached = np.flatnonzero(remaining <= 0)
    if len(reached) == 0:
        return None
    i = int(reached[0])
    if i == 0:
        return float(times[0])
    r0, r1 = remaining[i - 1], remaining[i]
    return float(times[i - 1] + (times[i] - times[i - 1]) * r0 / (r0 - r1))


def _verdict(error, bi, tolerance, target, time_to_target, quantity) -> Verdict:
    subject = "the field mean" if quantity == "mean" else "the slowest point"
    adequate = error.fraction <= tolerance
    reasons = [
        f"largest lumped error against {subject}: {error.largest:.3g} K, "
        f"{100 * error.fraction:.2f} % of the initial temperature difference "
        f"(at t = {error.time:.4g} s); the tolerance is {100 * tolerance:.3g} %",
        "the lumped estimate runs ahead of "
        + subject
        + " (it reaches the ambient sooner than the part does)"
        if error.lumped_ahead
        else "the lumped estimate lags behind "
        + subject
        + " (the part gets there sooner than it says)",
        f"Biot number (V/A_s) = {bi.value:.3g}: "
        + ("below" if bi.value < COMMON_LIMIT else "at or above")
        + f" the common-practice limit of {COMMON_LIMIT}",
    ]
    if target is not None:
        lumped_time, field_time = time_to_target["lumped"], time_to_target[quantity]
        if field_time is None:
            reasons.append(f"{subject} does not reach the target within the run")
        elif lumped_time is not None and field_time > 0:
            change = 100 * (lumped_time - field_time) / field_time
            reasons.append(
                f"the lumped estimate reaches {target:g} degC at {lumped_time:.4g} s, "
                f"{abs(change):.1f} % {'earlier' if change < 0 else 'later'} than {subject} "
                f"({field_time:.4g} s)"
            )
    return Verdict(adequate, quantity, tolerance, tuple(reasons))
