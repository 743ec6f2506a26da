"""Compare a finite-element field with the lumped family and say whether, by how much and in
which direction the lumped estimate is wrong — and what to use instead.

What it finds is in :mod:`advisor.analysis.assessment_results`, the checks of a request in
:mod:`advisor.analysis.assessment_checks`; this module re-exports both."""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from fem import ConductionSystem, Solution

from .assessment_checks import check_arguments, check_options, check_request
from .assessment_results import Assessment, LumpedError
from .biot import biot_numbers
from .freezing import FreezingProduct
from .lumped import (
    LumpedModel,
    correction,
    correction_factor,
    crossing_time,
    fit_exponential,
    fit_two_node,
)
from .modes import slowest_mode
from .process_readings import check_outputs, freezing_comparison, freezing_product
from .quench import quench_outputs
from .stages import Stage, check_stages, judge_stages, run_ending
from .verdict import QUANTITIES, RATINGS, SUBJECTS, Verdict, judge

__all__ = [
    "QUANTITIES",
    "RATINGS",
    "SUBJECTS",
    "Assessment",
    "LumpedError",
    "Verdict",
    "assess",
    "check_options",
    "check_request",
    "correction",
]


def assess(
    solution: Solution,
    *,
    target: float | None = None,
    tolerance: float = 0.05,
    quantity: str = "slowest",
    system: ConductionSystem | None = None,
    cooling_rates: bool = False,
    times_to: Sequence[float] = (),
    cooling_range: Sequence[float] | None = None,
    freezing: FreezingProduct | None = None,
    freeze_to: float | None = None,
    process: str | None = None,
    end_time: float | None = None,
    stages: Sequence[Stage] = (),
) -> Assessment:
    """Judge the lumped family against the field of ``solution``.

    Parameters
    ----------
    solution : fem.Solution
        A finished run.
    target : float, optional
        Temperature in °C the part must reach; strictly between the initial temperature and
        where the part is heading at the end of the run (a furnace ramp's final temperature,
        not its first).
    tolerance : float
        Largest acceptable error as a fraction: of the driving difference |T0 − T∞| for
        temperatures and ΔT (T∞ where the conditions at the end of the run drive the part),
        of the field's time for time to target; in (0, 1).
    quantity : str
        What the verdict is about: ``"slowest"`` (the point farthest from the ambient, the one
        that decides when a part is through), ``"mean"`` (the stored heat),
        ``"peak_difference"`` (the internal ΔT, distortion and cracking) or
        ``"time_to_target"`` (needs ``target``).
    system : fem.ConductionSystem, optional
        The run's assembled system, so the slowest mode does not assemble again.
    cooling_rates : bool
        Also read the quench outputs (:class:`QuenchOutputs` in ``Assessment.quench``):
        cooling rate against temperature and its largest value at the slowest point and the
        probes. Implied by ``times_to`` or ``cooling_range``.
    times_to : sequence of float
        Temperatures in °C whose first arrival at the slowest point and the probes is wanted.
    cooling_range : (float, float), optional
        From and to in °C (for example 800, 500 for a steel): the time to pass through it.
    freezing : FreezingProduct, optional
        The product's properties for Plank's equation and Pham's method; the comparison goes
        in ``Assessment.freezing``. Needs ``freeze_to``. Without it, ``freeze_to`` takes them
        from the model's material with latent heat (:meth:`FreezingProduct.of_material`).
    freeze_to : float, optional
        The temperature in °C the slowest point must pass through to count as frozen.
    process : str, optional
        The kind of process the verdict's words are chosen for: ``"heat-treatment"``,
        ``"food"``, ``"electronics"`` or ``"general"``; inferred from the model when None.
    end_time : float, optional
        The run's requested end in s, whose conditions say where the part is heading (default:
        the last recorded time; give it when a stop condition may end the run early).
    stages : sequence of Stage
        A staged target ("reach B by t1, then C within a further t2"), judged stage by stage
        on the field and the lumped models (``Assessment.stages``).

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
    >>> result.verdict.rating
    'adequate'
    """
    model = solution.model
    times = solution.times
    horizon = float(times[-1]) if end_time is None else float(end_time)
    lumped = LumpedModel.of(model, horizon=horizon)
    drive = lumped.initial_temperature - lumped.equilibrium  # > 0 cooling, < 0 heating
    check_arguments(lumped, drive, target, tolerance, quantity)
    check_outputs(drive, cooling_range, freezing, freeze_to)
    check_stages(stages, tuple(model.probes))
    biot = biot_numbers(
        model,
        end_time=float(times[-1]),
        temperature_range=(float(solution.minimum.min()), float(solution.maximum.max())),
    )
    found = correction_factor(model, biot)
    family = _lumped_family(solution, lumped, found.scale, drive)
    curves = family["model_temperatures"]
    reaching = _times_to_target(solution, lumped, family, target, drive)
    spread = solution.internal_difference
    peak = int(np.argmax(spread))
    findings = dict(
        solution=solution,
        biot=biot,
        lumped=lumped,
        correction_shape=found.shape,
        correction_note=found.note,
        correction_length=found.length,
        mode=slowest_mode(model, system),
        lumped_temperature=curves["classical"],
        errors=_errors(solution, family, drive),
        peak_internal_difference=float(spread[peak]),
        peak_internal_difference_time=float(times[peak]),
        energy_error=_energy_error(solution, lumped, curves["classical"], drive),
        target=target,
        time_to_target=reaching,
        **family,
    )
    findings["stages"] = _stages(solution, stages, drive < 0, lumped, family)
    findings["ending"] = run_ending(solution, target, reaching.get("slowest"))
    verdict = judge(findings, quantity, tolerance, drive, process)
    slowest = solution.minimum if drive < 0 else solution.maximum
    quench = None
    if cooling_rates or times_to or cooling_range is not None:
        histories = {"slowest": slowest} | {f"probe:{n}": h for n, h in solution.probes.items()}
        quench = quench_outputs(
            times, histories, drive=drive, times_to=times_to, cooling_range=cooling_range
        )
    frozen = None
    product = freezing_product(model, lumped, freezing, freeze_to)
    if product is not None:
        frozen = freezing_comparison(solution, lumped, biot, product, freeze_to, slowest)
    return Assessment(**findings, verdict=verdict, quench=quench, freezing=frozen)


def _stages(solution: Solution, stages, heading_up: bool, lumped, family) -> tuple:
    """The stages judged on the field and on the classical and corrected models, whose
    curves are read on a grid of 4000 intervals besides the run's times."""
    if not stages:
        return ()
    grid = np.union1d(solution.times, np.linspace(0.0, float(solution.times[-1]), 4001))
    curves = {"classical": lumped.temperature(grid)}
    curves["corrected"] = family["corrected"].temperature(grid)
    return judge_stages(solution, stages, heading_up, curves, grid)


def _energy_error(solution: Solution, lumped: LumpedModel, curve, drive: float) -> float:
    """Largest |lumped − field stored energy| as a fraction of a full approach's exchange."""
    gap = np.abs(lumped.stored_energy(curve) - solution.stored_energy).max()
    full_approach = abs(float(lumped.stored_energy(np.array([lumped.equilibrium]))[0]))
    return float(gap / full_approach)  # latent heat included; C·|T0 − T_eq| for constant c


def _lumped_family(solution: Solution, lumped: LumpedModel, scale: float, drive: float) -> dict:
    """The corrected, fitted and two-node models and every model's curve at the run's
    times."""
    times = solution.times
    corrected = LumpedModel.of(
        solution.model, scale=scale, name="corrected", horizon=lumped.horizon
    )
    slowest = solution.minimum if drive < 0 else solution.maximum
    fitted = (
        fit_exponential(times, solution.mean, lumped.ambient, lumped.initial_temperature)
        if lumped.closed_form
        else None
    )
    two_node = fit_two_node(times, solution.mean, slowest, lumped)
    curves = {"classical": lumped.temperature(times), "corrected": corrected.temperature(times)}
    if fitted is not None:
        curves["fitted exponential"] = fitted.temperature(times)
    if two_node is not None:
        curves["two-node"] = two_node.temperature(times)
    return dict(corrected=corrected, fitted=fitted, two_node=two_node, model_temperatures=curves)


def _errors(solution: Solution, family: dict, drive: float) -> dict[str, LumpedError]:
    """Every model's largest gap to the field quantities it stands for."""
    times, curves = solution.times, family["model_temperatures"]
    fields = {
        "mean": solution.mean,
        "slowest": solution.minimum if drive < 0 else solution.maximum,
        "hottest": solution.maximum,
        "coldest": solution.minimum,
    }
    fields.update({f"probe:{n}": h for n, h in solution.probes.items()})
    errors = {
        f"classical vs {q}": _largest_error(q, "classical", h, curves["classical"], times, drive)
        for q, h in fields.items()
    }
    for name in ("corrected", "fitted exponential", "two-node"):
        if name not in curves:
            continue
        for q in ("mean", "slowest"):
            reference = curves[name]
            if name == "two-node" and q == "slowest":
                reference = family["two_node"].states(times)[0]
            errors[f"{name} vs {q}"] = _largest_error(q, name, fields[q], reference, times, drive)
    return errors


def _times_to_target(
    solution: Solution, lumped: LumpedModel, family: dict, target: float | None, drive: float
) -> dict[str, float | None]:
    """When each model and field quantity reaches ``target``, s (empty without a target)."""
    if target is None:
        return {}
    times = solution.times
    end = float(times[-1])
    fitted, two_node = family["fitted"], family["two_node"]
    found: dict[str, float | None] = {
        "classical": lumped.time_to(target, end),
        "corrected": family["corrected"].time_to(target, end),
    }
    if fitted is not None:
        found["fitted exponential"] = fitted.time_to(target)
    if two_node is not None:
        found["two-node (core)"] = two_node.time_to(target, end)
    slowest = solution.minimum if drive < 0 else solution.maximum
    found["mean"] = crossing_time(times, solution.mean, target, drive)
    found["slowest"] = crossing_time(times, slowest, target, drive)
    for name, history in solution.probes.items():
        found[f"probe:{name}"] = crossing_time(times, history, target, drive)
    return found


def _largest_error(quantity, model, field_history, lumped, times, drive) -> LumpedError:
    gap = np.asarray(lumped) - np.asarray(field_history)
    i = int(np.argmax(np.abs(gap)))
    ahead = bool(gap[i] * drive < 0)  # nearer the ambient: below the field when cooling
    return LumpedError(
        quantity,
        model,
        float(abs(gap[i])),
        float(abs(gap[i]) / abs(drive)),
        float(times[i]),
        ahead,
    )
