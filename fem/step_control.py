"""Choosing the next step of a multistep formula: fixed, or controlled by the local error.

Adaptive steps take values initial·2^k (a ladder), so that few factorisations are made; with
equal output intervals the ladder is based on the interval and a step grows only where it
stays aligned, so every output time is met without a one-off step (and a one-off
factorisation). No step crosses an event; after a rejection the step is not stretched to
one.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

import numpy as np

from .errors import SolverError
from .integrators import StepFormula, local_error

if TYPE_CHECKING:
    from .stepper import RunControls

LADDER = 2.0  # adaptive steps take values initial_step · 2^k, so few factorisations are made
SUBDIVISIONS = 12  # a fixed step whose Newton iterations fail is halved at most this often


class StepControl:
    """The step size of a run and its adaptation (controls in s and K)."""

    def __init__(self, controls: RunControls):
        self.controls = controls
        self.step = controls.step
        self.ladder_base = controls.step
        self.rejected = 0
        self.retried = 0  # steps retried smaller because Newton's method failed
        self.subdivided = 0  # fixed steps taken as smaller substeps
        self.subdivision_end: float | None = None  # fixed steps: end of the step subdivided
        self.retrying = False  # no stretching to the next event until a step succeeds
        self.anchor = 0.0  # the last event passed: steps are aligned from here
        intervals = np.diff((0.0, *controls.output_times))
        self.dyadic = controls.adaptive and bool(np.allclose(intervals, intervals[0], rtol=1e-9))
        if self.dyadic:
            self.ladder_base = float(intervals[0])
            self.step = self._on_ladder(self.step)

    def propose(
        self, time: float, event: float, previous: float | None, startup: bool, max_ratio: float
    ) -> tuple[float, float]:
        """The next step and where it ends: on the next ``event`` when it is near, s."""
        controls = self.controls
        gap = event - time
        h = self.step
        if previous is not None and not startup:
            h = min(h, max_ratio * previous)
        if abs(gap - h) <= 1e-9 * h:
            return h, event  # the step lands on the event: snap away the round-off
        stretch = controls.adaptive and not startup and not self.retrying
        if gap < h or (stretch and gap <= 1.5 * h and gap <= controls.max_step):
            return gap, event
        return h, time + h

    def judge(
        self,
        formula: StepFormula,
        step: float,
        times: tuple[float, ...],
        field: np.ndarray,
        past: list[np.ndarray],
        free: np.ndarray,
    ) -> bool:
        """Accept the step that gave ``field`` at times[0] from ``past`` (at times[1:]) or
        reject it; either way set the next step from the local error."""
        controls = self.controls
        error = float(np.abs(local_error(formula, times, field, past)[free]).max(initial=0.0))
        factor = 0.9 * (controls.tolerance / max(error, 1e-300)) ** (1 / (formula.order + 1))
        if error > controls.tolerance and step > controls.min_step * (1 + 1e-9):
            self.rejected += 1
            self.retrying = True
            self.step = self._on_ladder(max(step * max(factor, 0.2), controls.min_step))
            return False
        if error > controls.tolerance:
            raise SolverError(
                f"the local error {error:.3g} K at t = {times[0]:.6g} s exceeds the tolerance "
                f"{controls.tolerance:.3g} K at the smallest step {controls.min_step:.3g} s"
            )
        proposal = min(max(step * min(factor, 2.0), controls.min_step), controls.max_step)
        if step < self.step * (1 - 1e-9):  # shortened to meet an event: keep the step earned
            proposal = self.step if factor >= 1 else min(self.step, proposal)
        proposal = self._on_ladder(proposal)
        if (
            self.dyadic
            and proposal > step * (1 + 1e-9)
            and not _aligned(times[0] - self.anchor, proposal)
        ):
            proposal = self._on_ladder(step)  # grow where it stays aligned
        self.step = proposal
        return True

    def accepted(self, time: float) -> None:
        """A step was taken, ending at ``time`` s: fixed steps return to the requested size
        once the subdivided step is complete."""
        self.retrying = False
        if self.controls.adaptive:
            return
        end = self.subdivision_end
        if end is not None and time < end - 1e-9 * self.controls.step:
            return  # substeps continue to the end of the step that failed
        self.subdivision_end = None
        self.step = self.controls.step

    def floor(self) -> float:
        """The smallest step a failed Newton iteration may be retried with, s."""
        if self.controls.adaptive:
            return self.controls.min_step
        return max(self.controls.min_step, self.controls.step / 2**SUBDIVISIONS)

    def retry(self, step: float, end: float) -> bool:
        """Newton's method failed on a step of ``step`` s ending at ``end`` s: halve it. False
        when the half would fall below :meth:`floor`."""
        half = step / 2
        if half < self.floor() * (1 - 1e-9):
            return False
        self.retried += 1
        self.retrying = True
        if self.controls.adaptive:
            self.step = self._on_ladder(half)
            return True
        if self.subdivision_end is None:
            self.subdivided += 1
            self.subdivision_end = end
        self.step = half
        return True

    def _on_ladder(self, step: float) -> float:
        base = self.ladder_base
        return base * LADDER ** math.floor(math.log(step / base, LADDER) + 1e-9)


def _aligned(time: float, step: float) -> bool:
    """True when ``time`` is a whole number of ``step``s from 0."""
    cycles = time / step
    return abs(cycles - round(cycles)) <= 1e-6
