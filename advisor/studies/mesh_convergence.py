"""The same case on several meshes, and the mesh to use.

:func:`run_grids` runs a case file once per mesh size through :func:`advisor.pipeline.run_case`
(serially, in this process); :func:`mesh_recommendation` judges the slowest point's time to
target and the peak internal temperature difference by the grid convergence index of
:mod:`advisor.studies.convergence` and names the coarsest mesh every answer accepts.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from ..errors import AdvisorError
from .convergence import SAFETY_FACTOR, GridConvergence, grid_convergence_series

SMALLEST_RATIO = 1.3  # Celik et al. (2008): refinement ratios above 1.3 are desirable
MESH_KEY = "section.mesh_size"
ANSWERS = {"time_to_target_slowest_s": "s", "peak_difference_K": "K"}
# An observed order above this (P2's field order is 3) means the meshes differ by less than
# other errors do (common practice: such an order is not trusted as the mesh's).
HIGHEST_PLAUSIBLE_ORDER = 3.5


@dataclass(frozen=True)
class GridRun:
    """One run of the case on one mesh.

    Attributes
    ----------
    mesh_size : float
        The requested largest element edge, m.
    representative_size : float
        h = sqrt(section area / triangles), m (Celik et al. 2008, eq. 1).
    triangles, unknowns : int
    time_step : float
        The run's last full time step, s.
    answers : dict of str to float
        ``time_to_target_slowest_s`` (NaN when there is no target or it is not reached) and
        ``peak_difference_K``.
    wall_seconds : float
    """

    mesh_size: float
    representative_size: float
    triangles: int
    unknowns: int
    time_step: float
    answers: dict[str, float]
    wall_seconds: float


def mesh_sizes(finest: float, ratio: float, count: int) -> list[float]:
    """``count`` mesh sizes from ``finest`` (m), each ``ratio`` times the one before."""
    if not (ratio > 1 and math.isfinite(ratio)):
        raise AdvisorError(f"the refinement ratio must be above 1; got {ratio!r}")
    if count < 3:
        raise AdvisorError(f"grid convergence needs three or more meshes; got {count}")
    if not finest > 0:
        raise AdvisorError(f"the finest mesh size must be positive; got {finest!r}")
    return [finest * ratio**k for k in range(count)]


def run_grids(
    case_path,
    sizes: Sequence[float],
    *,
    overrides: dict | None = None,
    step_ratio: float | None = None,
    progress=None,
) -> list[GridRun]:
    """Run the case file at ``case_path`` once per mesh size (m), serially; write nothing.

    Parameters
    ----------
    case_path : path
        A case file whose section is meshed from shapes.
    sizes : sequence of float
        Mesh sizes (``section.mesh_size``), m.
    overrides : dict, optional
        Further key-path overrides for every run.
    step_ratio : float, optional
        Also coarsen the time stepping with the mesh: a fixed ``time_step`` is multiplied by
        (size/finest size), an adaptive step's ``tolerance`` by its square (second-order
        schemes in space and time), so both errors shrink together.
    progress : callable, optional
        Called as ``progress(index, size)`` before each run.
    """
    from ..casefile.case import load_case
    from ..pipeline import run_case

    base = load_case(case_path, overrides)
    finest = min(sizes)
    runs = []
    for index, size in enumerate(sizes):
        changes = dict(overrides or {})
        changes[MESH_KEY] = f"{size!r} m"
        if step_ratio is not None:
            changes.update(_step_overrides(base.run_options, size / finest))
        if progress is not None:
            progress(index, size)
        results = run_case(load_case(case_path, changes))
        runs.append(_grid_run(size, results))
    return runs


def _step_overrides(run_options: dict, scale: float) -> dict:
    if run_options.get("time_step") is not None:
        return {"run.time_step": f"{run_options['time_step'] * scale!r} s"}
    if run_options.get("tolerance") is not None:
        return {"run.tolerance": f"{run_options['tolerance'] * scale**2!r} K"}
    return {}


def _grid_run(size: float, results) -> GridRun:
    solution = results.assessment.solution
    section = solution.model.section
    triangles = int(section.mesh.t.shape[1])
    reached = results.assessment.time_to_target.get("slowest")
    answers = {
        "time_to_target_slowest_s": math.nan if reached is None else float(reached),
        "peak_difference_K": float(results.assessment.peak_internal_difference),
    }
    return GridRun(
        size,
        math.sqrt(section.facts.area / triangles),
        triangles,
        int(solution.stats.unknowns),
        float(solution.stats.time_step),
        answers,
        float(results.wall_seconds),
    )


def _why_none(answer: str, found: Sequence[GridConvergence], threshold: float) -> str:
    finest = found[0]
    if finest.behaviour in ("oscillatory", "diverging"):
        return (
            f"{answer} converges {'with oscillation' if finest.oscillatory else 'erratically'} "
            f"(the change grows or changes sign with refinement): the meshes are not yet in "
            f"the asymptotic range"
        )
    return (
        f"the GCI of {answer} is {100 * finest.gci_fine:.3g} % on the finest mesh, above "
        f"{100 * threshold:.3g} %"
    )


def mesh_recommendation(
    runs: Sequence[GridRun], threshold: float = 0.01
) -> tuple[dict[str, list[GridConvergence]], GridRun | None, str]:
    """The index of each answer over the runs and the coarsest mesh all answers accept.

    Returns
    -------
    series : dict of str to list of GridConvergence
        Per answer, consecutive triples finest first (answers without values left out).
    chosen : GridRun or None
        The coarsest run that is the fine grid of an accepted triple for every answer.
    text : str
        The recommendation in words.
    """
    series: dict[str, list[GridConvergence]] = {}
    notes = []
    for answer in ANSWERS:
        values = [run.answers[answer] for run in runs]
        if not all(math.isfinite(v) for v in values):
            notes.append(f"{answer} is missing on some meshes (no target, or not reached)")
            continue
        try:
            series[answer] = grid_convergence_series(
                [run.representative_size for run in runs], values
            )
        except AdvisorError as error:
            notes.append(f"{answer}: {error}")
    sizes = sorted(run.representative_size for run in runs)
    closest = min(b / a for a, b in zip(sizes[:-1], sizes[1:], strict=True))
    if closest < SMALLEST_RATIO:
        text = (
            f"Cannot judge the mesh: two meshes differ by a size ratio of only {closest:.3g} "
            f"(above {SMALLEST_RATIO} is needed); the geometry may be setting the element "
            "size. Start from a smaller mesh size or use a larger ratio."
        )
        return series, None, text
    errors = _estimated_errors(runs, series, notes)
    good = [i for i, error in enumerate(errors) if error is not None and error <= threshold]
    if not good and errors and errors[0] is not None:
        finest = min(range(len(runs)), key=lambda i: runs[i].representative_size)
        notes.append(
            f"the finest mesh's estimated error is {100 * errors[finest]:.3g} %, above "
            f"{100 * threshold:.3g} %"
        )
    chosen = max((runs[i] for i in good), key=lambda r: r.representative_size, default=None)
    if chosen is not None and len(errors) == len(runs) and series:
        text = (
            f"Use a mesh size of {1000 * chosen.mesh_size:.3g} mm ({chosen.triangles} "
            f"triangles): its estimated error (1.25 × its distance from the extrapolated "
            f"value) is below {100 * threshold:.3g} % for {', '.join(series)}."
        )
    else:
        chosen = None
        text = "Refine further: " + "; ".join(notes or ["no answer could be judged"]) + "."
    if chosen is not None and notes:
        text += " Note: " + "; ".join(notes) + "."
    return series, chosen, text


def _estimated_errors(runs, series, notes) -> list[float | None]:
    """Each run's largest estimated relative error over the answers: the safety factor times
    its distance from the finest triple's extrapolated value (for the finest mesh this is
    Celik's GCI_fine). None for every run when an answer does not converge monotonically."""
    largest = [0.0] * len(runs)
    for answer, found in series.items():
        finest = found[0]
        if finest.behaviour not in ("monotone", "converged"):
            notes.append(_why_none(answer, found, 1.0))
            return [None] * len(runs)
        if finest.order > HIGHEST_PLAUSIBLE_ORDER:
            notes.append(
                f"{answer} converges at an observed order of {finest.order:.3g}, above the "
                "elements' formal order: the meshes differ by less than other errors (the "
                "time step, the interpolated crossing), so the mesh error is small but not "
                "measured"
            )
        scale = abs(finest.extrapolated) or 1.0
        for i, run in enumerate(runs):
            error = SAFETY_FACTOR * abs(run.answers[answer] - finest.extrapolated) / scale
            largest[i] = max(largest[i], error)
    return largest
