"""A whole fit from a case and a measured file: read, check, mesh once, fit, compare with the
lumped hand method, and make the case-file text of the result. Writes nothing."""

from __future__ import annotations

import time
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from .estimate import FitResult, check_uncertainty, fit
from .fragment import boundary_fragment, spliced_case, uncertainty_comment
from .lumped_fit import LumpedReading, lumped_readings
from .measured import MeasuredCurves, check_positions, read_measured
from .parameters import FitRequest, Parameters, build_parameters, parse_request
from .problem import FitProblem


@dataclass(frozen=True)
class FitOutcome:
    """What ``fit`` produced, in memory.

    Attributes
    ----------
    title : str
        The case's title.
    measured : MeasuredCurves
    parameters : Parameters
    result : FitResult
    lumped : list of LumpedReading
    solution : fem.Solution
        The run with the fitted values (histories every step).
    fragment : str
        ``[boundaries.<group>]`` tables with the fitted conditions.
    fitted_case : str or None
        The case's text with those tables in place (None when the case's text could not be
        cut line by line; ``note`` says why).
    note : str
    wall_seconds : float
    """

    title: str
    measured: MeasuredCurves
    parameters: Parameters
    result: FitResult
    lumped: list[LumpedReading]
    solution: object
    fragment: str
    fitted_case: str | None
    note: str
    wall_seconds: float


def prepare(
    case,
    measured_path: str | Path,
    requests: Sequence[str],
    *,
    units: Mapping[str, str] | None = None,
    mapping: Mapping[str, str] | None = None,
    uncertainty: float | None = None,
) -> tuple[list[FitRequest], MeasuredCurves]:
    """Parse the requests and read the measured file against the case: every check that
    needs no mesh (the CLI calls this before it touches the results folder).

    Raises
    ------
    AdvisorError
        A request that is not understood, a table without an uncertainty, or a measured
        file that cannot be taken (:class:`~.measured.MeasuredFileError`, naming file, line
        and column).
    """
    parsed = [parse_request(text) for text in requests]
    check_uncertainty(uncertainty, tables=any(r.nodes > 2 for r in parsed))
    count = sum(r.nodes for r in parsed)
    measured = read_measured(
        measured_path, case.probes, units=units, mapping=mapping, parameters=count
    )
    return parsed, measured


def fit_case(
    case,
    requests: list[FitRequest],
    measured: MeasuredCurves,
    *,
    uncertainty: float | None = None,
    progress: Callable[[int], None] | None = None,
) -> FitOutcome:
    """Mesh the case once, fit the requested coefficients to ``measured`` and compare with
    the lumped reading of each curve.

    Parameters
    ----------
    case : advisor.casefile.Case
    requests : list of FitRequest
    measured : MeasuredCurves
    uncertainty : float, optional
        The thermocouples' random error, K (needed for tables of nodes).
    progress : callable, optional
        ``progress(trials)`` after every transient solve.

    Returns
    -------
    FitOutcome
    """
    started = time.perf_counter()
    model = case.model()
    check_positions(measured, model.section)
    readings = measured.stacked()
    initial = model.initial_temperature
    if isinstance(initial, Mapping):
        initial = list(initial.values())
    start_values = np.atleast_1d(np.asarray(initial, dtype=float))
    span = (
        float(min(readings.min(), start_values.min())),
        float(max(readings.max(), start_values.max())),
    )
    end_time = float(measured.times[-1])
    parameters = build_parameters(
        requests, dict(model.boundaries), end_time=end_time, temperature_range=span
    )
    problem = FitProblem(
        model,
        parameters,
        measured,
        time_step=case.run_options.get("time_step"),
        method=_fixed_step_method(case.run_options.get("method")),
        progress=progress,
    )
    result = fit(problem, uncertainty=uncertainty)
    lumped = lumped_readings(problem, result.values)
    fitted = parameters.boundaries(result.values, problem.given)
    groups = list(dict.fromkeys(b.request.group for b in parameters.blocks))
    heading = (
        f"Fitted by soakwise fit to {measured.path.name} ({result.verdict.rating}).\n"
        + uncertainty_comment(
            result.names, result.values, result.band, result.units, result.standard_errors
        )
    )
    fragment = boundary_fragment(fitted, groups, heading)
    fitted_case, note = None, ""
    try:
        text = Path(case.path).read_text(encoding="utf-8")
        fitted_case = spliced_case(text, fragment, groups)
    except (OSError, ValueError) as error:
        note = str(error)
    return FitOutcome(
        case.title,
        measured,
        parameters,
        result,
        lumped,
        problem.solution(result.values),
        fragment,
        fitted_case,
        note,
        time.perf_counter() - started,
    )


def _fixed_step_method(method: str | None) -> str:
    """The case's scheme unless it is one that needs no fixed step (exponential steps choose
    their own records): then Crank–Nicolson."""
    return method if method in ("crank-nicolson", "bdf2", "backward-euler") else "crank-nicolson"
