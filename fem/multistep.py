"""The multistep formulas as steppers, and their march from event to event.

Crank–Nicolson starts with backward-Euler half-steps (Rannacher's start-up: they damp the fast
modes a sudden plunge excites and use the same matrix M + ½·Δt·A as Crank–Nicolson); BDF2
starts with backward-Euler steps; backward Euler needs no start. Every schedule breakpoint
restarts the scheme as at t = 0, so BDF2 does not difference across a jump and Crank–Nicolson
does not ring after it. Each step is solved by :class:`fem.linear_step.LinearStep` or, for
nonlinear models, :class:`fem.newton.NewtonStep`.
"""

from __future__ import annotations

import math
from typing import ClassVar

import numpy as np

from .errors import ModelError, SolverError
from .events import Events, StopWatch
from .integrators import StepFormula, StepResult, bdf2_formula, predict, theta_formula
from .linear_step import LinearStep
from .newton import NewtonStep, NewtonStepError
from .step_control import StepControl
from .stepper import March, RunContext, Stepper


class FormulaStepper(Stepper):
    """A method that steps by one multistep formula."""

    resumable = True

    half_step_startup: ClassVar[bool] = False  # start-up steps taken as two half-steps
    max_step_ratio: ClassVar[float] = math.inf  # largest step over the previous one

    def formula(self, startup: bool, ratio: float | None) -> StepFormula:
        """The formula of a step ``ratio`` times the previous one (None after a restart)."""
        return theta_formula(1.0)

    def march(self, run: RunContext) -> March:
        return _FormulaMarch(self, run).march()


class CrankNicolson(FormulaStepper):
    name = "crank-nicolson"
    title = "Crank-Nicolson"
    default_startup_steps = 2
    half_step_startup = True
    rings_without_startup = True

    def formula(self, startup: bool, ratio: float | None) -> StepFormula:
        return theta_formula(1.0 if startup else 0.5)


class BackwardEuler(FormulaStepper):
    name = "backward-euler"
    title = "Backward Euler"


class BDF2(FormulaStepper):
    name = "bdf2"
    title = "BDF2"
    min_startup_steps = 1
    max_step_ratio = 2.0  # BDF2 is zero-stable for ratios below 1 + √2

    def formula(self, startup: bool, ratio: float | None) -> StepFormula:
        return theta_formula(1.0) if startup else bdf2_formula(ratio)


# What a march and its step control carry from step to step (besides the last states).
_MARCH_STATE = (
    "time",
    "absorbed",
    "last_increment",
    "steps",
    "startup_done",
    "smallest",
    "largest",
    "previous_step",
)
_CONTROL_STATE = (
    "step",
    "ladder_base",
    "rejected",
    "retried",
    "subdivided",
    "subdivision_end",
    "retrying",
    "anchor",
)


class _FormulaMarch:
    """One run of a formula stepper: steps to every event, restarts at breakpoints, stops."""

    def __init__(self, stepper: FormulaStepper, run: RunContext):
        controls = run.controls
        self.stepper, self.run, self.controls = stepper, run, controls
        self.linear = run.system.model.is_linear
        self.solver = LinearStep(run) if self.linear else NewtonStep(run)
        self.events = Events(run.breakpoints, controls.output_times, controls.end_time)
        self.control = StepControl(controls)
        self.watch = (
            None if controls.stop is None else StopWatch(controls.stop, run.quantity, run.initial)
        )
        self.history: list[tuple[float, np.ndarray]] = [(0.0, run.initial)]  # newest last
        self.time = 0.0
        self.absorbed = 0.0
        self.last_increment = 0.0
        self.steps = self.startup_done = 0
        self.smallest, self.largest = math.inf, 0.0
        self.previous_step: float | None = None
        self.stop_time: float | None = None
        if run.resume is not None:
            self.restore(run.resume["march"])

    def state(self) -> dict:
        """The march's state after a step: with :meth:`restore` it continues exactly."""
        return {
            "method": self.stepper.name,
            "history_times": np.array([t for t, _ in self.history]),
            "history_fields": np.array([u for _, u in self.history]),
            **{name: getattr(self, name) for name in _MARCH_STATE},
            "watch": None if self.watch is None else [self.watch.value, float(self.watch.side)],
            "control": {name: getattr(self.control, name) for name in _CONTROL_STATE},
        }

    def restore(self, state: dict) -> None:
        """Continue from a :meth:`state` of a run of the same method and system."""
        fields = np.asarray(state["history_fields"])
        if state["method"] != self.stepper.name or fields.shape[1:] != self.run.initial.shape:
            raise ModelError(
                f"the state to resume is of a {state['method']} run with "
                f"{fields.shape[-1]} unknowns; this run is {self.stepper.name} with "
                f"{self.run.initial.size}: resume only the run that was stopped",
                argument="resume",
            )
        times = state["history_times"]
        self.history = [(float(t), u.copy()) for t, u in zip(times, fields, strict=True)]
        for name in _MARCH_STATE:
            setattr(self, name, state[name])
        if self.watch is not None and state["watch"] is not None:
            self.watch.value, self.watch.side = state["watch"]
        for name in _CONTROL_STATE:
            setattr(self.control, name, state["control"][name])

    def march(self) -> March:
        controls = self.controls
        while self.time < controls.end_time * (1 - 1e-12):
            startup = self.startup_done < controls.startup_steps
            h, t1 = self.control.propose(
                self.time,
                self.events.next_after(self.time),
                self.previous_step,
                startup,
                self.stepper.max_step_ratio,
            )
            try:
                formula, result = self._take(h, t1, startup)
            except NewtonStepError as failure:
                self._retry(failure, h, t1)
                continue
            if controls.adaptive and not startup and len(self.history) >= 3:
                past = [state for _, state in reversed(self.history)]
                times = (t1, *[t for t, _ in reversed(self.history)])
                free = self.run.system.free_dofs
                if not self.control.judge(formula, h, times, result.field, past, free):
                    continue
            self.control.accepted(t1)
            if self._accept(formula, h, t1, result, startup):
                break
            self.run.offer_checkpoint(self.time, self.steps, self.state)
        return self._outcome()

    def _take(self, h: float, t1: float, startup: bool) -> tuple[StepFormula, StepResult]:
        """Solve one step of ``h`` s from the current time to ``t1``."""
        t = self.time
        past = [state for _, state in reversed(self.history)]
        guess = past[0]
        if not self.linear and len(self.history) >= 3:
            times = (t1, *[tt for tt, _ in reversed(self.history)])
            guess = predict(times, past)  # Newton starts from the trend
        ratio = None if self.previous_step is None else h / self.previous_step
        formula = self.stepper.formula(startup, ratio)
        if startup and self.stepper.half_step_startup:
            half = self.solver.solve(formula, h / 2, t, t + h / 2, past[:1], past[0])
            result = self.solver.solve(formula, h / 2, t + h / 2, t1, [half.field], half.field)
            self._record(t + h / 2, formula, half)  # recorded once both halves converged
            self.steps += 1
            return formula, result
        return formula, self.solver.solve(formula, h, t, t1, past[: formula.history], guess)

    def _retry(self, failure: NewtonStepError, h: float, t1: float) -> None:
        """Newton's method failed on the step of ``h`` s to ``t1``: halve it, or raise at the
        step's floor, naming what to change."""
        if self.control.retry(h, t1):
            return
        controls = self.controls
        floor = self.control.floor()
        end = self.control.subdivision_end or t1  # a fixed step: the one that was subdivided
        bound = "min_step" if controls.adaptive else "time_step (substeps go down to 1/4096 of it)"
        raise SolverError(
            f"Newton's method did not converge on the step to t = {end:.6g} s even with the step "
            f"cut to {h:.3g} s (from t = {self.time:.6g} s; the floor is {floor:.3g} s): the "
            f"last change was {failure.change:.3g} K and the residual {failure.residual:.3g} W "
            f"({failure.how}). Raise max_newton_iterations (now "
            f"{controls.max_newton_iterations}) or newton_tolerance (now "
            f"{controls.newton_tolerance:.3g} K) in [run], or lower {bound}; a very narrow "
            "freezing range or a jump in a property table may also need smoothing"
        )

    def _record(self, time: float, formula: StepFormula, result: StepResult) -> None:
        """Record a state, with the stored-energy increment the scheme's heat balance gives.

        One-step formulas store what came in. BDF2 balances a0·E_n+1 + a1·E_n + a2·E_n−1 =
        h·Q_n+1 (a0 + a1 + a2 = 0), so the store grows by (h·Q_n+1 + a2·ΔE_n) / a0.
        """
        increment = result.heat
        if formula.history == 2:
            increment = (result.heat + formula.a[2] * self.last_increment) / formula.a[0]
        self.last_increment = increment
        self.absorbed += increment
        self.run.recorder.record(
            time, result.field, result.stored, self.absorbed, result.reactions
        )

    def _accept(
        self, formula: StepFormula, h: float, t1: float, result: StepResult, startup: bool
    ) -> bool:
        """Take the step; True when the stop condition was met in it."""
        u1 = result.field
        self._record(t1, formula, result)
        self.steps += 1
        self.startup_done += startup
        self.smallest, self.largest = min(self.smallest, h), max(self.largest, h)
        self.previous_step = h
        self.history = [*self.history, (t1, u1)][-3:]
        self.time = t1
        output = self.events.is_output(t1, h)
        if output:
            self.run.recorder.store_field(t1, u1)
        restart = self.events.is_breakpoint(t1, h)
        if restart or output:
            self.control.anchor = t1
        if restart:
            # A schedule jumps or kinks here: start again as at t = 0.
            self.history = [(t1, u1)]
            self.startup_done = 0
            self.previous_step = None
        self.run.report(t1, self.steps)
        if self.watch is not None:
            self.stop_time = self.watch.crossed(u1, t1, h)
            if self.stop_time is not None:
                if not output:
                    self.run.recorder.store_field(t1, u1)
                return True
        return False

    def _outcome(self) -> March:
        controls = self.controls
        taken = min(self.startup_done, controls.startup_steps)
        return March(
            steps=self.steps,
            rejected_steps=self.control.rejected,
            startup_steps=2 * taken if self.stepper.half_step_startup else taken,
            time_step=float(
                self.previous_step if controls.adaptive and self.previous_step else controls.step
            ),
            smallest_step=float(self.smallest if self.steps else controls.step),
            largest_step=float(self.largest if self.steps else controls.step),
            final_state=self.history[-1][1].copy(),
            stop_time=self.stop_time,
            recent_startup_steps=self.startup_done,
            retried_steps=self.control.retried,
            subdivided_steps=self.control.subdivided,
        )
