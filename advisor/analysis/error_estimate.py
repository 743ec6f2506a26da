"""A run's own estimate of the discretisation error of its key answers, from two extra solves
on a mesh twice as coarse.

Space: the run and a solve on the coarse mesh with the same time settings differ mostly by the
space error (their time errors nearly cancel), so Richardson's extrapolation with the
element's formal order p (P1: 2, P2: 3, for temperatures) gives the run's own space error,

    Q_fine − Q ≈ (Q_coarse − Q_fine) / (r^p − 1),

r the ratio of the meshes' mean element edge lengths (Celik et al., "Procedure for estimation
and reporting of uncertainty due to discretization in CFD applications", J. Fluids Eng. 130
(2008), use sqrt(area / triangles), eq. 1 — from memory; the mean edge is used here because a
triangle count misjudges a strip narrower than the coarse elements).

Time: a second coarse solve with the time resolution halved — a fixed step doubled, or an
adaptive run's tolerance multiplied by 2^(q+1), which doubles its steps for a scheme of order
q — gives Q_q − Q ≈ (Q_2q − Q_q) / (2^q − 1) (Crank–Nicolson and BDF2: q = 2; backward
Euler: q = 1); exponential steps carry their own bound (``SolverStats.error_estimate``). The
time error is measured on the coarse mesh: it depends on the step, not on the mesh.

The estimate stated is F_s·(|E_space| + |E_time|) with Roache's factor of safety F_s = 1.25
(as Celik et al. 2008 use it). Two meshes cannot show that the answers are in their
asymptotic range (three can: ``soakwise converge``); on exact solutions the estimate of the
slowest point's temperature and time to target bracketed the true error (effectivity
0.88–1.9 and 1.08 upwards), that of an early peak internal difference fell short by up to 3×
on meshes of R/10 (``tests/test_error_estimate.py``). With P2 elements the temperatures'
estimates fell well short (effectivity 0.02–0.6 on a plane wall and a cylinder at R/3 and
R/6): the maximum over the quadratic nodes overshoots early, by about the same amount on
either mesh and at either step, so neither extra solve sees it; the description says so.

Answers: the slowest point's time to target (s; its time part also holds the error of
reading the crossing off the recorded steps by linear interpolation,
|T''|·(t − t0)(t1 − t)/2/|T'|), the peak internal temperature difference (K), and the slowest
point's and each probe's temperature (K), the largest estimate over the output times after
t = 0 that the three runs share.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, replace

import numpy as np

from fem import Solution, ThermalModel, solve
from fem.scales import default_tolerance

from ..errors import AdvisorError
from ..time_words import duration_text
from .lumped_fits import crossing_time

SAFETY_FACTOR = 1.25  # Roache's factor of safety, as in Celik et al. (2008), from memory
SPACE_ORDERS = {1: 2, 2: 3}  # formal order of nodal temperatures for P1 and P2 elements
TIME_ORDERS = {"crank-nicolson": 2, "bdf2": 2, "backward-euler": 1}
COARSENING = 2.0  # the coarse mesh's requested element size against the run's
P2_CAVEAT = (
    "; with P2 elements it falls short: their early overshoot near the surface is seen by "
    "neither extra solve (on exact solutions the temperatures' estimates were 0.02–0.6 of the "
    "true error), so check P2 runs with a finer mesh or P1"
)


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
        The space and time parts, signed (fine − exact, estimated), in the answer's unit.
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
class ErrorEstimate:
    """The run's own error estimate.

    Attributes
    ----------
    answers : dict of str to AnswerError
    space_order, time_order : int
        The formal orders used (p of the elements, q of the scheme; 0 for exponential steps).
    size_ratio : float
        r, the coarse mesh's representative element size over the run's.
    method : str
        How it was found, in words.
    warnings : tuple of str
        Answers whose estimate exceeds the advisor's tolerance.
    seconds : float
        Wall-clock time of the two extra solves, s.
    """

    answers: dict[str, AnswerError]
    space_order: int
    time_order: int
    size_ratio: float
    method: str
    warnings: tuple[str, ...]
    seconds: float = 0.0

    def text(self, name: str) -> str:
        """``"± 12.3 s"`` for the answer ``name`` (empty when it has none)."""
        found = self.answers.get(name)
        return "" if found is None else f"± {found.estimate:.3g} {found.unit}"


def estimate_errors(
    solution: Solution,
    coarse_model: ThermalModel,
    *,
    run_options: Mapping | None = None,
    end_time: float | None = None,
    target: float | None = None,
    tolerance: float = 0.05,
    heading: float | None = None,
) -> ErrorEstimate:
    """Estimate the discretisation error of a run's key answers by two solves of
    ``coarse_model`` (the same problem on a mesh about twice as coarse).

    Parameters
    ----------
    solution : fem.Solution
        The run.
    coarse_model : fem.ThermalModel
        The same part, materials, conditions and probes on a coarser mesh.
    run_options : mapping, optional
        The keyword arguments the run was solved with (:func:`fem.solve`).
    end_time : float, optional
        The run's requested end, s (default: its last time).
    target : float, optional
        The target temperature, °C, for the time to target.
    tolerance : float
        The advisor's tolerance as a fraction (of the field's time; of the driving
        difference).
    heading : float, optional
        Where the part is heading, °C (the lumped equilibrium): the driving difference the
        tolerance is a fraction of. Default: the final mean.

    Returns
    -------
    ErrorEstimate
    """
    started = _now()
    fine_model = solution.model
    options = dict(run_options or {})
    end = float(solution.times[-1]) if end_time is None else float(end_time)
    _check_models(fine_model, coarse_model)
    ratio = _edge_length(coarse_model) / _edge_length(fine_model)
    if not ratio > 1.05:
        raise AdvisorError(
            f"the coarse mesh has {coarse_model.section.mesh.t.shape[1]} triangles, not fewer "
            f"than the run's {fine_model.section.mesh.t.shape[1]}: no space error can be "
            "estimated from it"
        )
    p = SPACE_ORDERS[fine_model.element_order]
    coarse = solve(coarse_model, end, **options)
    q, coarser_options, bound = _coarser_in_time(solution, fine_model, options)
    coarser = solve(coarse_model, end, **coarser_options) if coarser_options else None
    heading = float(solution.mean[-1]) if heading is None else float(heading)
    drive = float(solution.mean[0]) - heading
    runs = (solution, coarse, coarser)
    answers = _answers(runs, target, drive, p, ratio, q, bound, tolerance)
    warnings = tuple(
        f"the estimated discretisation error of {_words(a.name)} (± {a.estimate:.3g} {a.unit})"
        f" exceeds the advisor's tolerance ({a.allowed:.3g} {a.unit}): refine the mesh"
        + (" or tighten the time tolerance" if abs(a.time) > abs(a.space) else "")
        for a in answers.values()
        if a.exceeds
    )
    method = (
        f"two extra solves on a mesh {ratio:.3g} times coarser; space: Richardson with the "
        f"P{fine_model.element_order} elements' order {p}; time: "
        + (
            f"the coarse solve again at half the time resolution, order {q}"
            if coarser is not None
            else "the exponential steps' own bound"
        )
        + f"; factor of safety {SAFETY_FACTOR:g}"
        + (P2_CAVEAT if fine_model.element_order == 2 else "")
    )
    return ErrorEstimate(answers, p, q, ratio, method, warnings, _now() - started)


def _coarser_in_time(solution: Solution, model: ThermalModel, options: dict):
    """(order, the options of a run at half the time resolution or None, a time-error
    bound in K for methods that carry their own)."""
    method = solution.stats.method
    if method not in TIME_ORDERS:  # exponential steps: exact in time to their own bound
        return 0, None, float(solution.stats.error_estimate)
    q = TIME_ORDERS[method]
    coarser = dict(options)
    if solution.stats.adaptive:
        given = options.get("tolerance")
        if given is None:
            given = default_tolerance(model, method)
        coarser["tolerance"] = given * 2 ** (q + 1)
    else:
        coarser["time_step"] = 2 * options.get("time_step", solution.stats.time_step)
    return q, coarser, 0.0


def _answers(runs, target, drive, p, ratio, q, bound, tolerance) -> dict[str, AnswerError]:
    fine, coarse, coarser = runs
    heating = drive < 0
    found: dict[str, AnswerError] = {}
    span = abs(drive)

    def add(name, values, unit, allowed):
        value, space, time = _split(values, p, ratio, q)
        if unit == "K" and coarser is None:
            time = bound
        estimate = SAFETY_FACTOR * (abs(space) + abs(time))
        found[name] = AnswerError(name, value, unit, space, time, estimate, allowed)

    if target is not None:
        times = [None if r is None else _time_to(r, target, drive, heating) for r in runs]
        if all(t is not None for t, r in zip(times, runs, strict=True) if r is not None):
            add("time_to_target", times, "s", tolerance * times[0])
            reading = _reading_error(fine.times, _slowest(fine, heating), times[0])
            found["time_to_target"] = _with_reading(found["time_to_target"], reading)
    peaks = [None if r is None else float(r.internal_difference.max()) for r in runs]
    add("peak_difference", peaks, "K", tolerance * span)
    shared = _shared_outputs(runs)
    histories = {"slowest": [None if r is None else _slowest(r, heating) for r in runs]}
    for name in fine.probes:
        histories[f"probe:{name}"] = [None if r is None else r.probes[name] for r in runs]
    for name, series in histories.items():
        at = [None if h is None else _at(r, h, shared) for r, h in zip(runs, series, strict=True)]
        value, space, time = _split(at, p, ratio, q)
        if coarser is None:
            time = np.full_like(space, bound)
        total = SAFETY_FACTOR * (np.abs(space) + np.abs(time))
        i = int(np.argmax(total))
        found[name] = AnswerError(
            name, float(value[i]), "K", float(space[i]), float(time[i]), float(total[i]),
            tolerance * span,
        )  # fmt: skip
    return found


def coarse_model_of(case) -> ThermalModel:
    """The model of ``case`` (an :class:`advisor.casefile.Case`) on a mesh of twice the
    element size (local refinements keep their sizes)."""
    if case.imported is not None or case.section is None:
        raise AdvisorError(
            "error_estimate needs a section soakwise meshes: an imported mesh cannot be "
            "meshed twice as coarse; set [advisor] error_estimate = false"
        )
    options = dict(case.mesh_options)
    options["size"] = COARSENING * options["size"]
    return replace(case, mesh_options=options).model()


def with_error_estimate(assessment, coarse_model: ThermalModel, run_options, end_time: float):
    """``assessment`` with its ``error_estimate`` from two solves of ``coarse_model``."""
    estimate = estimate_errors(
        assessment.solution,
        coarse_model,
        run_options=run_options,
        end_time=end_time,
        target=assessment.target,
        tolerance=assessment.verdict.tolerance,
        heading=assessment.lumped.equilibrium,
    )
    return replace(assessment, error_estimate=estimate)


def estimate_lines(estimate: ErrorEstimate | None) -> list[str]:
    """Lines for a terminal summary: each answer with its ±, and any warning."""
    if estimate is None:
        return []
    lines = []
    for a in estimate.answers.values():
        if a.name == "time_to_target":
            lines.append(
                f"Discretisation error: {_words(a.name)} {duration_text(a.value)} ± "
                f"{duration_text(a.estimate)}"
            )
        elif a.name == "peak_difference":
            lines.append(
                f"Discretisation error: {_words(a.name)} {a.value:.4g} K ± {a.estimate:.3g} K"
            )
        else:
            lines.append(f"Discretisation error: {_words(a.name)} ± {a.estimate:.3g} K at most")
    return lines + [f"warning: {w}" for w in estimate.warnings]


def _reading_error(times, history, crossing: float) -> float:
    """The error of reading a crossing time off a history by linear interpolation between
    the recorded steps t0 < t < t1: the interpolant misses T by T''·(t − t0)·(t1 − t)/2, which
    moves the crossing by that over the slope |T'|, s."""
    i = int(np.clip(np.searchsorted(times, crossing), 2, len(times) - 1))
    t, value = times[i - 2 : i + 1], history[i - 2 : i + 1]
    slopes = np.diff(value) / np.diff(t)
    curvature = 2 * (slopes[1] - slopes[0]) / (t[2] - t[0])
    within = (crossing - t[1]) * (t[2] - crossing) if t[1] <= crossing <= t[2] else 0.0
    return float(abs(curvature) * within / 2 / max(abs(slopes[1]), 1e-300))


def _with_reading(answer: AnswerError, reading: float) -> AnswerError:
    """``answer`` with the crossing's reading error added to its time part."""
    time = answer.time + np.copysign(reading, answer.time)
    estimate = SAFETY_FACTOR * (abs(answer.space) + abs(time))
    return AnswerError(
        answer.name, answer.value, answer.unit, answer.space, time, estimate, answer.allowed
    )


def _split(values, p, ratio, q):
    """(fine value, space error, time error) from the fine, coarse and coarser values."""
    fine, coarse, coarser = (None if v is None else np.asarray(v, float) for v in values)
    space = (coarse - fine) / (ratio**p - 1.0)  # Q_h − Q = (Q_rh − Q_h)/(r^p − 1)
    time = (coarser - coarse) / (2.0**q - 1.0) if coarser is not None else 0.0 * fine
    if fine.ndim == 0:
        return float(fine), float(space), float(time)
    return fine, space, time


def _time_to(run: Solution, target: float, drive: float, heating: bool) -> float | None:
    return crossing_time(run.times, _slowest(run, heating), target, drive)


def _slowest(run: Solution, heating: bool) -> np.ndarray:
    return run.minimum if heating else run.maximum


def _shared_outputs(runs) -> np.ndarray:
    """The output times every run reached (a stop condition may end one earlier)."""
    present = [r for r in runs if r is not None]
    last = min(float(r.times[-1]) for r in present)
    outputs = present[0].output_times[1:]  # t = 0 is the initial state in every run
    return outputs[outputs <= last * (1 + 1e-12)]


def _at(run: Solution, history: np.ndarray, times: np.ndarray) -> np.ndarray:
    """``history`` at ``times`` (steps land on output times, so these are recorded values)."""
    return np.interp(times, run.times, history)


def _edge_length(model: ThermalModel) -> float:
    """The mean length of the mesh's element edges, m: the size the elements resolve (a
    triangle count misjudges a strip narrower than the coarse elements)."""
    mesh = model.section.mesh
    ends = mesh.p[:, mesh.facets]
    return float(np.linalg.norm(ends[:, 0] - ends[:, 1], axis=0).mean())


def _check_models(fine: ThermalModel, coarse: ThermalModel) -> None:
    if not isinstance(coarse, ThermalModel):
        raise AdvisorError(f"coarse_model must be a ThermalModel, got {coarse!r}")
    if set(coarse.probes) != set(fine.probes) or coarse.element_order != fine.element_order:
        raise AdvisorError(
            "the coarse model must have the run's probes and element order: got probes "
            f"{sorted(coarse.probes)} and P{coarse.element_order} against "
            f"{sorted(fine.probes)} and P{fine.element_order}"
        )


def _words(name: str) -> str:
    words = {
        "time_to_target": "the slowest point's time to target",
        "peak_difference": "the peak internal temperature difference",
        "slowest": "the slowest point's temperature",
    }
    return words.get(name, f"the temperature at probe {name.partition(':')[2]!r}")


def _now() -> float:
    import time

    return time.perf_counter()


__all__ = [
    "AnswerError",
    "ErrorEstimate",
    "coarse_model_of",
    "estimate_errors",
    "estimate_lines",
    "with_error_estimate",
]
