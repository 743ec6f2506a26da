"""The one check of a run's arguments, and the frozen controls it produces.

:func:`check_run_options` checks everything that needs no mesh, so a caller without a model
yet (a case file) applies the very rules :func:`fem.solve` applies; :func:`check_arguments`
adds what the model decides (the stop quantity's probes, the method's needs, the default
tolerance and step). Every error names the offending argument in ``ModelError.argument``.
"""

from __future__ import annotations

import math
import numbers
from collections.abc import Iterable
from dataclasses import dataclass

from .errors import ModelError, shown
from .events import StopWhen
from .methods import METHODS, stepper_for
from .model import ThermalModel
from .scales import default_tolerance, surface_diffusion_time
from .stepper import RunControls

DEFAULT_METHOD = "crank-nicolson"
DEFAULT_NEWTON_TOLERANCE = 1e-6  # K
DEFAULT_NEWTON_ITERATIONS = 30
DEFAULT_OUTPUTS = 50
DEFAULT_RELATIVE_TOLERANCE = 1e-4  # local error, as a fraction of the temperature range
# (backward Euler's default is tighter: fem.scales.default_tolerance)
# The default smallest adaptive step: 1e-9 of the run, and no more than this fraction of the
# surface elements' diffusion time (below it nothing the mesh resolves changes).
MIN_STEP_OF_DIFFUSION_TIME = 1e-6
STOP_QUANTITIES = ("mean", "minimum", "maximum")


@dataclass(frozen=True)
class RunOptions:
    """A run's options checked without a model; ``None`` where the model decides."""

    end_time: float
    method: str
    adaptive: bool
    time_step: float | None
    tolerance: float | None
    min_step: float
    max_step: float
    output_times: tuple[float, ...]
    outputs_explicit: bool
    startup_steps: int
    stop: StopWhen | None
    newton_tolerance: float
    max_newton_iterations: int


def check_run_options(
    end_time: float,
    *,
    probes: Iterable[str] = (),
    method: str = DEFAULT_METHOD,
    time_step: float | None = None,
    adaptive: bool | None = None,
    tolerance: float | None = None,
    min_step: float | None = None,
    max_step: float | None = None,
    output_interval: float | None = None,
    output_times: Iterable[float] | None = None,
    startup_steps: int | None = None,
    stop: StopWhen | None = None,
    newton_tolerance: float = DEFAULT_NEWTON_TOLERANCE,
    max_newton_iterations: int = DEFAULT_NEWTON_ITERATIONS,
) -> RunOptions:
    """Check the options of :func:`fem.solve` that need no mesh.

    Parameters
    ----------
    end_time : float
        Duration in s.
    probes : iterable of str
        Names of the model's probes (valid stop quantities besides mean, minimum, maximum).
    method, time_step, adaptive, tolerance, min_step, max_step, output_interval, output_times,
    startup_steps, stop, newton_tolerance, max_newton_iterations
        As for :func:`fem.solve` (s, K).

    Returns
    -------
    RunOptions

    Raises
    ------
    ModelError
        With ``argument`` the name of the offending option (``"stop.quantity"`` for a stop
        quantity that is not a probe).
    """
    if not _positive(end_time):
        raise ModelError(
            f"end_time must be a finite time > 0 s, got {shown(end_time, 's')}",
            argument="end_time",
        )
    end = float(end_time)
    if method not in METHODS:
        raise ModelError(
            f"method must be one of {list(METHODS)}, got {method!r}", argument="method"
        )
    stepper = stepper_for(method)
    if time_step is not None and (not _positive(time_step) or time_step > end):
        raise ModelError(
            f"time_step must be a time in (0, end_time = {end_time:g}] s, "
            f"got {shown(time_step, 's')}",
            argument="time_step",
        )
    adaptive = time_step is None if adaptive is None else bool(adaptive)
    _check_counts(end, None if adaptive else time_step, max_step, output_interval, output_times)
    startup = _startup_steps(stepper, startup_steps)
    times = _outputs(end, output_interval, output_times)
    if tolerance is not None and not _positive(tolerance):
        raise ModelError(
            f"tolerance must be a temperature difference > 0 K, got {shown(tolerance, 'K')}",
            argument="tolerance",
        )
    smallest, largest = _step_bounds(end, min_step, max_step)
    _check_stop(stop, probes)
    _check_newton(newton_tolerance, max_newton_iterations)
    return RunOptions(
        end_time=end,
        method=method,
        adaptive=adaptive and stepper.adapts,  # exact in time: there is no step to adapt
        time_step=None if time_step is None else float(time_step),
        tolerance=None if tolerance is None else float(tolerance),
        min_step=smallest,
        max_step=largest,
        output_times=times,
        outputs_explicit=output_times is not None,
        startup_steps=startup,
        stop=stop,
        newton_tolerance=float(newton_tolerance),
        max_newton_iterations=max_newton_iterations,
    )


def check_arguments(model: ThermalModel, end_time: float, **options) -> RunControls:
    """Check :func:`fem.solve`'s arguments for ``model`` and settle the defaults that depend
    on it: the tolerance (a fraction of the temperature span) and the step."""
    checked = check_run_options(end_time, probes=tuple(model.probes), **options)
    stepper = stepper_for(checked.method)
    stepper.check_model(model)
    min_step = checked.min_step
    if options.get("min_step") is None:
        # The model's own time scale bounds the smallest step, not only the run's length: a
        # ten-year run must still resolve the first seconds after a plunge.
        min_step = min(min_step, MIN_STEP_OF_DIFFUSION_TIME * surface_diffusion_time(model))
    tolerance = checked.tolerance
    if tolerance is None:
        tolerance = default_tolerance(model, checked.method)
    end = checked.end_time
    if checked.time_step is not None:
        step = checked.time_step
    elif checked.adaptive:
        step = min(surface_diffusion_time(model), end / 100)
    else:
        step = end / stepper.default_steps
    if not checked.adaptive and not checked.outputs_explicit:
        # the largest step not above the request that fits every output interval
        times = checked.output_times
        interval = times[1] - times[0] if len(times) > 1 else end
        step = interval / math.ceil(interval / step - 1e-9)
    step = float(min(max(step, min_step), checked.max_step))
    return RunControls(
        end_time=end,
        method=checked.method,
        adaptive=checked.adaptive,
        step=step,
        tolerance=float(tolerance),
        min_step=float(min_step),
        max_step=checked.max_step,
        output_times=checked.output_times,
        startup_steps=checked.startup_steps,
        stop=checked.stop,
        newton_tolerance=checked.newton_tolerance,
        max_newton_iterations=checked.max_newton_iterations,
    )


def _startup_steps(stepper, startup_steps) -> int:
    if startup_steps is None:
        return stepper.default_startup_steps
    if (
        not isinstance(startup_steps, numbers.Integral)
        or isinstance(startup_steps, bool)
        or startup_steps < 0
    ):
        raise ModelError(
            f"startup_steps must be a whole number >= 0, got {startup_steps!r}",
            argument="startup_steps",
        )
    if startup_steps < stepper.min_startup_steps:
        raise ModelError(
            f"{stepper.title} needs at least one backward-Euler start-up step",
            argument="startup_steps",
        )
    return int(startup_steps)


def _outputs(end: float, interval, explicit) -> tuple[float, ...]:
    if explicit is not None:
        values = sorted({float(t) for t in explicit})
        if not values or values[0] <= 0 or values[-1] > end * (1 + 1e-12):
            raise ModelError(
                f"output_times must lie in (0, end_time = {end}] s, got {list(explicit)!r}",
                argument="output_times",
            )
        return tuple(values)
    if interval is None:
        interval = end / DEFAULT_OUTPUTS
    if not _positive(interval) or interval > end:
        raise ModelError(
            f"output_interval must be a time in (0, end_time = {end:g}] s, "
            f"got {shown(interval, 's')}",
            argument="output_interval",
        )
    count = math.ceil(end / float(interval) - 1e-9)
    return tuple(end * k / count for k in range(1, count + 1))


def _step_bounds(end: float, min_step, max_step) -> tuple[float, float]:
    min_step = 1e-9 * end if min_step is None else min_step
    max_step = end if max_step is None else max_step
    for name, value in (("min_step", min_step), ("max_step", max_step)):
        if not _positive(value) or value > end:
            raise ModelError(
                f"{name} must be a time in (0, end_time] s, got {shown(value, 's')}", argument=name
            )
    if min_step > max_step:
        raise ModelError(
            f"min_step {min_step} s is above max_step {max_step} s", argument="min_step"
        )
    return float(min_step), float(max_step)


def _check_stop(stop, probes: Iterable[str]) -> None:
    if stop is None:
        return
    if not isinstance(stop, StopWhen):
        raise ModelError(f"stop must be a StopWhen, got {stop!r}", argument="stop")
    names = (*STOP_QUANTITIES, *probes)
    if stop.quantity not in names:
        raise ModelError(
            f"stop quantity must be one of {list(names)}, got {stop.quantity!r}",
            argument="stop.quantity",
        )


def _check_newton(tolerance, iterations) -> None:
    if not _positive(tolerance):
        raise ModelError(
            f"newton_tolerance must be > 0 K, got {shown(tolerance, 'K')}",
            argument="newton_tolerance",
        )
    if not isinstance(iterations, int) or iterations < 1:
        raise ModelError(
            f"max_newton_iterations must be a whole number >= 1, got {iterations!r}",
            argument="max_newton_iterations",
        )


def _positive(value) -> bool:
    return (
        isinstance(value, numbers.Real)
        and not isinstance(value, bool)
        and math.isfinite(value)
        and value > 0
    )


MAX_STEPS = 10_000_000  # a run's histories keep about 0.5 kB a step
MAX_OUTPUTS = 100_000  # each output keeps the field: 8 bytes a node


def _check_counts(end: float, time_step, max_step, output_interval, output_times) -> None:
    """Refuse, before anything is built, a run whose fixed step (or largest step) or output
    interval asks for more than :data:`MAX_STEPS` steps or :data:`MAX_OUTPUTS` outputs: the
    run would fill the memory long before it ended."""
    counts = []
    for name, value in (("time_step", time_step), ("max_step", max_step)):
        if _positive(value):
            counts.append((name, end / float(value), MAX_STEPS, "steps"))
    if output_interval is not None and _positive(output_interval):
        counts.append(("output_interval", end / float(output_interval), MAX_OUTPUTS, "outputs"))
    elif hasattr(output_times, "__len__"):  # an iterator is left for _outputs to read
        counts.append(("output_times", len(output_times), MAX_OUTPUTS, "outputs"))
    for name, count, limit, what in counts:
        if count > limit:
            memory = 500 * count if what == "steps" else 8 * count
            each = "of histories" if what == "steps" else "for each node of the mesh"
            advice = "give fewer" if name == "output_times" else f"make {name} larger"
            raise ModelError(
                f"{name} asks for about {count:.3g} {what} over end_time = {end:g} s "
                f"(about {memory / 1e9:.3g} GB {each}); at most {limit:,} are allowed: "
                f"{advice}",
                argument=name,
            )
