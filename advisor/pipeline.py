"""From a case to its results, and from results to a results folder.

:func:`run_case` is pure: it meshes, checks the advisor's request, solves and assesses, and
returns :class:`Results` in memory. It writes no file and prints nothing, so sweeps on worker
processes, fit loops and notebooks can call it; its results pickle. :func:`run_model` is the
same pipeline for a model built in Python. :func:`write_results` turns results into the
results folder (see :mod:`advisor.results_folder` for the layout).
"""

from __future__ import annotations

import time
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import TYPE_CHECKING

from fem import ConductionSystem, Solution, ThermalModel, solve

from .analysis.assessment import Assessment, assess, check_request
from .analysis.error_estimate import coarse_model_of, with_error_estimate
from .field_results import FieldResults, no_lumped_reason

if TYPE_CHECKING:
    from .casefile.case import Case

Progress = Callable[[float, float, int], None]
"""The solver's progress callback: ``progress(time, end_time, steps)``, times in s."""


@dataclass(frozen=True)
class Results:
    """What one run produced, in memory.

    Attributes
    ----------
    assessment : Assessment
        The advisor's answers; it carries the :class:`fem.Solution` and its model.
    title : str
        The case's title (empty for a model built in Python without one).
    outputs : mapping of str to bool
        The case's choice of optional outputs (``report``, ``animation``, ``vtk``);
        :func:`write_results` follows it unless told otherwise.
    wall_seconds : float
        Wall-clock time of the run (meshing, solve and assessment), s.
    mirrors : tuple of advisor.whole_part.Mirror
        The lines the modelled piece is mirrored across to make the whole part (pictures
        show the whole part; see :mod:`advisor.whole_part`).
    """

    assessment: Assessment
    title: str = ""
    outputs: Mapping[str, bool] = field(default_factory=dict)
    wall_seconds: float = 0.0
    mirrors: tuple = ()

    @property
    def solution(self) -> Solution:
        """The field solution (the assessment's)."""
        return self.assessment.solution


def run_case(
    case: Case,
    *,
    progress: Progress | None = None,
    system_for: Callable[[ThermalModel], ConductionSystem] | None = None,
    checkpoint: Callable | None = None,
    resume: dict | None = None,
    before_solve: Callable[[ThermalModel], None] | None = None,
    field_alone: bool = False,
) -> Results | FieldResults:
    """Mesh, solve and assess a case file's problem; write nothing.

    Parameters
    ----------
    case : advisor.casefile.Case
        A loaded case (:func:`advisor.casefile.load_case`).
    progress : callable, optional
        Passed to :func:`fem.solve`: called as ``progress(time, end_time, steps)``.
    system_for : callable, optional
        Gives the case's model an assembled system (a study's cache of systems that differ
        only in coefficients); by default the run assembles its own.

    Returns
    -------
    Results

    Raises
    ------
    AdvisorError
        If the advisor's request (target, tolerance, quantity) cannot be met by this model;
        raised after meshing, before the solve.

    Examples
    --------
    >>> from advisor.casefile import load_case
    >>> from advisor.casefile.starters import starter_text
    >>> import tempfile
    >>> path = Path(tempfile.mkdtemp()) / "quench-bar.toml"
    >>> _ = path.write_text(starter_text("quench-bar"), encoding="utf-8")
    >>> case = load_case(path, {"section.mesh_size": "5 mm", "run.end_time": "1 min"})
    >>> results = run_case(case)
    >>> results.title == case.title, float(results.solution.times[-1])
    (True, 60.0)
    """
    started = time.perf_counter()
    model = case.model()
    mirrors = case.whole_part(model.section)
    advisor_options = dict(case.advisor_options)
    coarse = coarse_model_of(case) if advisor_options.pop("error_estimate", False) else None
    if before_solve is not None:
        before_solve(model)
    results = run_model(
        model,
        case.end_time,
        title=case.title,
        run_options=case.run_options,
        advisor_options=advisor_options,
        outputs=case.outputs,
        progress=progress,
        system=None if system_for is None else system_for(model),
        checkpoint=checkpoint,
        resume=resume,
        field_alone=field_alone,
    )
    if coarse is not None:  # two solves on a mesh twice as coarse
        assessment = with_error_estimate(
            results.assessment, coarse, case.run_options, case.end_time
        )
        results = replace(results, assessment=assessment)
    return replace(results, wall_seconds=time.perf_counter() - started, mirrors=mirrors)


def run_model(
    model: ThermalModel,
    end_time: float,
    *,
    title: str = "",
    run_options: Mapping | None = None,
    advisor_options: Mapping | None = None,
    outputs: Mapping[str, bool] | None = None,
    progress: Progress | None = None,
    system: ConductionSystem | None = None,
    mirrors: tuple = (),
    checkpoint: Callable | None = None,
    resume: dict | None = None,
    field_alone: bool = False,
) -> Results | FieldResults:
    """Check the advisor's request, solve and assess a model built in Python; write nothing.

    Parameters
    ----------
    model : fem.ThermalModel
    end_time : float
        End of the run, s.
    title : str
        A name for the run.
    run_options : mapping, optional
        Keyword arguments of :func:`fem.solve` (method, time_step, output_interval, ...).
    advisor_options : mapping, optional
        Keyword arguments of :func:`advisor.assess` (target, tolerance, quantity).
    outputs : mapping of str to bool, optional
        The optional outputs to write by default (the keys of ``[outputs]``: ``report``,
        ``animation``, ``vtk``, ``plots``, ``svg``, ``mp4``, ``xdmf``).
    progress : callable, optional
        Passed to :func:`fem.solve`.
    system : fem.ConductionSystem, optional
        An assembled system whose matrices serve ``model`` (see
        :meth:`fem.ConductionSystem.for_model`); the run then assembles nothing.
    mirrors : tuple of advisor.whole_part.Mirror
        Lines the section is mirrored across in pictures of the whole part.
    checkpoint, resume : optional
        Passed to :func:`fem.solve`: the state offered after each step, and one to continue.
    field_alone : bool
        When no lumped model applies (fixed temperatures or fluxes only), solve anyway and
        return :class:`FieldResults`; otherwise that is an :class:`AdvisorError`.

    Returns
    -------
    Results or FieldResults
        ``wall_seconds`` covers the solve and the assessment. A model no lumped model applies
        to (fixed temperatures or fluxes only) gives :class:`FieldResults`: the field and the
        reason, without an assessment.
    """
    started = time.perf_counter()
    advisor_options = dict(advisor_options or {})
    reason = no_lumped_reason(model) if field_alone else None
    if reason is not None:  # fixed temperatures or fluxes only: the field alone
        solution = solve(
            model if system is None else system.for_model(model),
            end_time,
            progress=progress,
            checkpoint=checkpoint,
            resume=resume,
            **dict(run_options or {}),
        )
        wall = time.perf_counter() - started
        return FieldResults(solution, reason, title, dict(outputs or {}), wall)
    check_request(model, end_time=end_time, **advisor_options)  # fails before the solve
    system = None if system is None else system.for_model(model)
    solution = solve(
        model if system is None else system,
        end_time,
        progress=progress,
        checkpoint=checkpoint,
        resume=resume,
        **dict(run_options or {}),
    )
    assessment = assess(solution, system=system, end_time=end_time, **advisor_options)
    wall = time.perf_counter() - started
    return Results(assessment, title, dict(outputs or {}), wall, tuple(mirrors))


def write_results(
    results: Results | FieldResults | Assessment,
    folder: Path,
    *,
    force: bool = False,
    report: bool | None = None,
    animation: bool | None = None,
    vtk: bool | None = None,
    mp4: bool | None = None,
    xdmf: bool | None = None,
    plots: bool | None = None,
    svg: bool | None = None,
) -> list[Path]:
    """Write the results folder; return the paths of its files (relative to ``folder``).

    The folder is written whole under a temporary name beside it, then renamed, so an
    interrupted run leaves no half-written results. The list returned has a ``notes``
    attribute: one line for each optional output skipped because its extra is missing.

    Parameters
    ----------
    results : Results or Assessment
        What to write; an :class:`Assessment` alone is written with the defaults below.
    folder : path
        The results folder.
    force : bool
        Replace ``folder`` if it exists.
    report : bool or None
        Write report.html and report.md. None: as the case's ``[outputs]`` say, else True.
    animation : bool or None
        Write animation.gif (and animation.mp4, see ``mp4``). None: as the case says, else
        True.
    vtk : bool or None
        Write the field files under fields/ (VTK series, legend, XDMF). None: as the case
        says, else True.
    mp4 : bool or None
        Write animation.mp4 (with imageio-ffmpeg, the ``mp4`` extra). None: as the case
        says (skipped with a note when the extra is missing), else not; True always (an
        error if the extra is missing); False never.
    xdmf : bool or None
        Write fields/temperature.xdmf and .h5 (with h5py, the ``xdmf`` extra). None: as the
        case says, else when h5py is installed (skipped with a note when it is not); True
        always (an error if it is missing); False never.
    plots : bool or None
        Write the plots under plots/. None: as the case says, else True.
    svg : bool or None
        Write each plot as SVG beside its PNG. None: as the case says, else False.

    Raises
    ------
    ResultsFolderExistsError
        If ``folder`` exists and ``force`` is false; nothing is written.
    AdvisorError
        If ``mp4`` or ``xdmf`` is True and its extra is missing; nothing is written.

    Examples
    --------
    >>> import tempfile
    >>> from geometries import Rectangle
    >>> from fem import Convection, Material, ThermalModel, solve
    >>> from advisor import assess
    >>> air = Convection(heat_transfer_coefficient=20.0, ambient=25.0)
    >>> model = ThermalModel(Rectangle(0.02, 0.01).mesh(size=0.004),
    ...     Material(200.0, 2700.0, 900.0),
    ...     boundaries={side: air for side in ("left", "right", "top", "bottom")},
    ...     initial_temperature=180.0)
    >>> assessment = assess(solve(model, end_time=1800.0, time_step=60.0))
    >>> folder = Path(tempfile.mkdtemp()) / "plate"
    >>> files = write_results(assessment, folder, animation=False, report=False, vtk=False)
    >>> [f.as_posix() for f in files][:3]
    ['summary.json', 'histories.csv', 'plots/histories.png']
    """
    from .results_folder import Choices, write_folder  # matplotlib and Pillow only here

    if isinstance(results, Results):
        assessment, chosen, mirrors = results.assessment, results.outputs, results.mirrors
    elif isinstance(results, FieldResults):
        assessment, chosen, mirrors = results, results.outputs, results.mirrors
    else:
        assessment, chosen, mirrors = results, {}, ()

    def wanted(name: str, given: bool | None, default: bool) -> bool:
        return bool(chosen.get(name, default)) if given is None else given

    def optional(name: str, given: bool | None, default: bool) -> bool | None:
        """True/False as given; None (when available) where the case or default asks."""
        if given is not None:
            return given
        return None if chosen.get(name, default) else False

    choices = Choices(
        report=wanted("report", report, True),
        animation=wanted("animation", animation, True),
        vtk=wanted("vtk", vtk, True),
        plots=wanted("plots", plots, True),
        svg=wanted("svg", svg, False),
        mp4=optional("mp4", mp4, False),
        xdmf=optional("xdmf", xdmf, True),
    )
    return write_folder(assessment, Path(folder), force=force, choices=choices, mirrors=mirrors)
