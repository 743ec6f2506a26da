"""Staged targets — "reach B by t1, then C within a further t2", a common form of cooling and
heat-treatment rules — judged on the field and on the lumped models, and the account in plain
words of how the run ended.

A stage starts when the one before it was reached (the first at t = 0) and is met when its
quantity first reaches the stage's temperature, coming from the side it stood on at the
stage's start, no later than the stage's deadline: ``by`` (a time from the start of the run)
or ``within`` (a duration from the stage's own start). Each lumped model is judged by the same
rule along its own curve, so a stage a lumped estimate passes and the field fails shows the
estimate's error where it matters.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np

from fem import Solution
from fem.events import stop_reason

from ..errors import AdvisorError
from ..time_words import duration_text
from .lumped_fits import crossing_time

PLACES = ("slowest", "mean")


@dataclass(frozen=True)
class Stage:
    """One stage of a staged target.

    Attributes
    ----------
    reach : float
        Temperature in °C the quantity must reach.
    by : float or None
        Deadline in s from the start of the run.
    within : float or None
        Deadline in s from the stage's start (when the stage before it was reached).
        Exactly one of ``by`` and ``within`` is given.
    at : str
        ``"slowest"`` (the point farthest from where the part is heading), ``"mean"`` or the
        name of a probe.
    """

    reach: float
    by: float | None = None
    within: float | None = None
    at: str = "slowest"

    def describe(self) -> str:
        """The stage in words, e.g. ``"the slowest point reaches 21 °C within 2 h"``."""
        when = (
            f"by {duration_text(self.by)}"
            if self.by is not None
            else f"within {duration_text(self.within)}"
        )
        return f"{place_words(self.at)} reaches {self.reach:g} °C {when}"


@dataclass(frozen=True)
class StageResult:
    """A stage judged on the field, and each lumped model's arrival by the same rule.

    Attributes
    ----------
    stage : Stage
    start : float or None
        When the stage began, s (None when the stage before it was never reached).
    deadline : float or None
        When it had to be met, s from the start of the run.
    reached : float or None
        When the field quantity reached the stage's temperature, s.
    passed : bool or None
        True if reached by the deadline; False if reached late or not reached when the run
        went past the deadline; None when the run ended before the deadline without reaching
        it, or the stage never began.
    margin : float or None
        deadline − reached in s (positive: time to spare; negative: late).
    lumped : dict of str to float or None
        Each lumped model's arrival at the stage's temperature along its own stages, s.
    lumped_passed : dict of str to bool or None
        Each lumped model's pass or fail by the same rule.
    """

    stage: Stage
    start: float | None
    deadline: float | None
    reached: float | None
    passed: bool | None
    margin: float | None
    lumped: dict[str, float | None] = field(default_factory=dict)
    lumped_passed: dict[str, bool | None] = field(default_factory=dict)

    @property
    def status(self) -> str:
        """``"met"``, ``"missed"``, ``"undecided"`` (the run ended first) or ``"not begun"``."""
        if self.start is None:
            return "not begun"
        if self.passed is None:
            return "undecided"
        return "met" if self.passed else "missed"


def check_stages(stages: Sequence[Stage], probes: Sequence[str] | None = None) -> None:
    """Refuse stages :func:`judge_stages` cannot judge; ``probes`` (the model's probe names)
    are checked when given. Errors carry ``argument="stages[i].<key>"``."""
    if not isinstance(stages, list | tuple):
        raise AdvisorError(f"stages must be a list of Stage, got {stages!r}", argument="stages")
    previous_by = 0.0
    for i, stage in enumerate(stages):
        key = f"stages[{i}]"
        if not isinstance(stage, Stage):
            raise AdvisorError(f"{key} must be a Stage, got {stage!r}", argument=key)
        if not isinstance(stage.reach, int | float) or not np.isfinite(stage.reach):
            raise AdvisorError(
                f"{key}.reach must be a temperature, got {stage.reach!r}", argument=f"{key}.reach"
            )
        if (stage.by is None) == (stage.within is None):
            raise AdvisorError(
                f"{key} needs exactly one deadline: 'by' (from the start of the run) or "
                f"'within' (from the end of the stage before), got by={stage.by!r}, "
                f"within={stage.within!r}",
                argument=f"{key}.by",
            )
        name, deadline = ("by", stage.by) if stage.by is not None else ("within", stage.within)
        if not isinstance(deadline, int | float) or not deadline > 0:
            raise AdvisorError(
                f"{key}.{name} must be a positive time, got {deadline!r}",
                argument=f"{key}.{name}",
            )
        if stage.by is not None and stage.by < previous_by:
            raise AdvisorError(
                f"{key}.by = {stage.by:g} s is earlier than the deadline of the stage before "
                f"({previous_by:g} s); stages are met in order",
                argument=f"{key}.by",
            )
        previous_by = stage.by if stage.by is not None else previous_by
        _check_place(stage.at, probes, f"{key}.at")
        if i and stages[i - 1].reach == stage.reach:
            raise AdvisorError(
                f"{key}.reach repeats the stage before ({stage.reach:g} °C); give each stage "
                "its own temperature",
                argument=f"{key}.reach",
            )


def _check_place(at, probes: Sequence[str] | None, key: str) -> None:
    known = (*PLACES, *(probes or ()))
    if not isinstance(at, str) or (probes is not None and at not in known):
        raise AdvisorError(
            f"{key} must be one of {list(known)}" + ("" if probes is not None else " or a probe")
            + f", got {at!r}",
            argument=key,
        )  # fmt: skip


def judge_stages(
    solution: Solution,
    stages: Sequence[Stage],
    heading_up: bool,
    curves: Mapping[str, np.ndarray],
    curve_times: np.ndarray | None = None,
) -> tuple[StageResult, ...]:
    """Judge ``stages`` in order on the field of ``solution`` and on each lumped ``curves``
    (°C at ``curve_times``, by default ``solution.times``).

    Parameters
    ----------
    solution : fem.Solution
    stages : sequence of Stage
    heading_up : bool
        True when the part heats (the slowest point is then the coldest).
    curves : mapping of str to ndarray
        Each lumped model's temperature at ``curve_times``.
    curve_times : ndarray, optional
        Times in s of ``curves`` (a denser grid reads their arrivals more closely).
    """
    times = solution.times
    field_chain = [
        _history(solution, stage.at, heading_up) for stage in stages
    ]  # each stage may watch another place
    arrivals = _chain(times, field_chain, stages)
    grid = times if curve_times is None else np.asarray(curve_times, float)
    lumped = {name: _chain(grid, [curve] * len(stages), stages) for name, curve in curves.items()}
    end = float(times[-1])
    results = []
    for i, stage in enumerate(stages):
        start, deadline, reached = arrivals[i]
        results.append(
            StageResult(
                stage,
                start,
                deadline,
                reached,
                _passed(deadline, reached, end),
                None if reached is None or deadline is None else deadline - reached,
                {name: chain[i][2] for name, chain in lumped.items()},
                {name: _passed(chain[i][1], chain[i][2], end) for name, chain in lumped.items()},
            )
        )
    return tuple(results)


def _chain(times, histories, stages) -> list[tuple[float | None, float | None, float | None]]:
    """(start, deadline, arrival) of each stage along ``histories`` (one per stage)."""
    found = []
    start: float | None = 0.0
    for stage, history in zip(stages, histories, strict=True):
        if start is None:
            found.append((None, stage.by, None))
            continue
        deadline = stage.by if stage.by is not None else start + stage.within
        reached = arrival(times, history, start, stage.reach)
        found.append((start, deadline, reached))
        start = reached
    return found


def arrival(times, history, start: float, reach: float) -> float | None:
    """First time from ``start`` s at which ``history`` (°C at ``times``) reaches ``reach`` °C
    from the side it stood on at ``start``, interpolated linearly; None if it does not."""
    times, history = np.asarray(times, float), np.asarray(history, float)
    if start > times[-1]:
        return None
    first = int(np.searchsorted(times, start, side="right"))
    at_start = float(np.interp(start, times, history))
    if at_start == reach:
        return float(start)
    kept_times = np.concatenate([[start], times[first:]])
    kept = np.concatenate([[at_start], history[first:]])
    return crossing_time(kept_times, kept, reach, at_start - reach)


def _passed(deadline: float | None, reached: float | None, end: float) -> bool | None:
    if deadline is None:
        return None
    if reached is not None:
        return bool(reached <= deadline * (1 + 1e-12))
    return False if end >= deadline else None


def _history(solution: Solution, at: str, heading_up: bool) -> np.ndarray:
    if at == "slowest":
        return solution.minimum if heading_up else solution.maximum
    if at == "mean":
        return solution.mean
    if at not in solution.probes:
        raise AdvisorError(
            f"a stage watches probe {at!r}, which the model does not have; its probes are "
            f"{sorted(solution.probes)}",
            argument="stages",
        )
    return solution.probes[at]


def place_words(at: str) -> str:
    """``"slowest"`` → ``"the slowest point"``, ``"mean"`` → ``"the mean"``, else the probe."""
    return {"slowest": "the slowest point", "mean": "the mean"}.get(at, f"probe {at!r}")


def run_ending(solution: Solution, target: float | None, slowest_time: float | None) -> str:
    """How the run ended and whether the slowest point reached ``target``, in plain words:
    ``"stopped at 5400 s: probe 'core' reached 845 °C"``, ``"end time reached (7200 s);
    target 845 °C not reached at the slowest point"``."""
    end = float(solution.times[-1])
    reason = stop_reason(solution.stop, solution.stop_time, end, said=duration_text)
    if target is None:
        return reason
    if slowest_time is None:
        return f"{reason}; target {target:g} °C not reached at the slowest point"
    return (
        f"{reason}; the slowest point reached the target {target:g} °C at "
        f"{duration_text(slowest_time)}"
    )


def ending_lines(ending: str, stages: Sequence[StageResult]) -> list[str]:
    """Lines for a terminal summary: how the run ended and each stage's result."""
    lines = [f"Run: {ending}."] if ending else []
    for i, r in enumerate(stages):
        reached = "not reached" if r.reached is None else f"reached at {duration_text(r.reached)}"
        margin = ""
        if r.margin is not None:
            late = "to spare" if r.margin >= 0 else "late"
            margin = f", {duration_text(abs(r.margin))} {late}"
        result = f"{r.status.upper()}, {reached}{margin}"
        lines.append(f"Stage {i + 1} ({r.stage.describe()}): {result}")
    return lines
