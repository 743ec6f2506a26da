"""The results folder: every file of a run, written whole or not at all.

Layout::

    summary.json                 inputs, Biot numbers, lumped errors, verdict, checks
    report.html                  the report as one self-contained page (images embedded)
    report.md                    the same report in Markdown, images by relative path
    histories.csv                every per-step history with the lumped models, units in the header
    plots/histories.png|svg      temperature histories with the lumped estimates, internal ΔT
    plots/internal_difference.png|svg    internal ΔT over time, peak marked
    plots/lumped_error.png|svg   lumped error against the tolerance band
    plots/field_snapshots.png|svg        the field at a few output times
    plots/energy.png|svg         stored energy against heat taken in
    animation.gif                the field over time on one colour scale
    animation.mp4                the same as an MP4 film (with imageio-ffmpeg, the ``mp4`` extra)
    fields/legend.json           region and edge group names by id
    fields/temperature.pvd       VTK collection with the physical times
    fields/temperature_NNNN.vtu  one unstructured grid per output time, t = 0 first
    fields/temperature.xdmf      XDMF time series (with h5py, the ``xdmf`` extra) ...
    fields/temperature.h5        ... and its HDF5 data

The folder is first written under a temporary name beside the target and renamed when
complete, so an interrupted run leaves no half-written results and an existing folder is
replaced only after the new one is whole.
"""

from __future__ import annotations

import importlib.util
import shutil
import tempfile
from pathlib import Path

from .analysis.assessment import Assessment
from .errors import AdvisorError, ResultsFolderExistsError
from .writers.animation import mp4_available, write_animation
from .writers.histories_csv import write_histories_csv
from .writers.plots import PLOTS, write_plots
from .writers.report_content import Picture, build_report
from .writers.report_html import write_html_report
from .writers.report_markdown import write_markdown_report
from .writers.summary_json import write_summary_json
from .writers.vtk_series import write_vtk_series, write_xdmf_series

PLOT_FOLDER = "plots"
FIELD_FOLDER = "fields"


def check_results_folder(folder: Path, *, force: bool) -> None:
    """Raise :class:`ResultsFolderExistsError` if ``folder`` exists and ``force`` is false."""
    if Path(folder).exists() and not force:
        raise ResultsFolderExistsError(
            f"results folder {str(folder)!r} already exists; choose another or replace it "
            "with force=True (--force on the command line)"
        )


def xdmf_available() -> bool:
    """True when h5py (the ``xdmf`` extra) is installed, so an XDMF series can be written."""
    return importlib.util.find_spec("h5py") is not None


def _optional(wanted: bool | None, available: bool, what: str, extra: str) -> bool:
    if wanted is None:
        return available
    if wanted and not available:
        raise AdvisorError(
            f'{what} needs the {extra!r} extra (pip install "soakwise[{extra}]"); '
            f"pass {what}=None to write it only when available, or False to skip it"
        )
    return bool(wanted)


def write_results(
    assessment: Assessment,
    folder: Path,
    *,
    force: bool = False,
    report: bool = True,
    animation: bool = True,
    vtk: bool = True,
    mp4: bool | None = None,
    xdmf: bool | None = None,
) -> list[Path]:
    """Write the results folder; return the paths of its files (relative to ``folder``).

    Parameters
    ----------
    assessment : Assessment
    folder : path
        The results folder; written under a temporary name beside it, then renamed.
    force : bool
        Replace ``folder`` if it exists.
    report : bool
        Write report.html and report.md.
    animation : bool
        Write animation.gif (and animation.mp4, see ``mp4``).
    vtk : bool
        Write the field files under fields/ (VTK series, legend, XDMF).
    mp4 : bool or None
        Write animation.mp4: None when imageio-ffmpeg is installed, True always (an error if
        it is not), False never.
    xdmf : bool or None
        Write fields/temperature.xdmf and .h5: None when h5py is installed, True always, False
        never.

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
    folder = Path(folder)
    check_results_folder(folder, force=force)
    mp4 = animation and _optional(mp4, mp4_available(), "mp4", "mp4")
    xdmf = vtk and _optional(xdmf, xdmf_available(), "xdmf", "xdmf")
    folder.parent.mkdir(parents=True, exist_ok=True)
    staging = Path(tempfile.mkdtemp(dir=folder.parent, prefix=f".{folder.name}.", suffix=".part"))
    try:
        written: list[Path] = []
        write_histories_csv(assessment, staging / "histories.csv")
        written.append(staging / "histories.csv")
        plots = write_plots(assessment, staging / PLOT_FOLDER)
        written += plots
        if animation:
            written += write_animation(
                assessment.solution,
                staging / "animation.gif",
                staging / "animation.mp4" if mp4 else None,
            )
        if vtk:
            written += write_vtk_series(assessment.solution, staging / FIELD_FOLDER)
            if xdmf:
                written += write_xdmf_series(assessment.solution, staging / FIELD_FOLDER)

        files = [Path("summary.json")]
        if report:
            files += [Path("report.html"), Path("report.md")]
        files += [p.relative_to(staging) for p in written]
        if report:
            pictures = [
                Picture(f"{PLOT_FOLDER}/{stem}.png", title, caption)
                for stem, (title, caption) in PLOTS.items()
            ]
            if animation:
                pictures.append(
                    Picture(
                        "animation.gif",
                        "The field over the run",
                        "Every output time on one colour scale, hottest and coldest points "
                        "marked.",
                    )
                )
            content = build_report(assessment, pictures, [f.as_posix() for f in files])
            write_html_report(content, staging / "report.html")
            write_markdown_report(content, staging / "report.md")
        write_summary_json(assessment, staging / "summary.json", [f.as_posix() for f in files])
        if folder.exists():
            retired = folder.with_name(f".{folder.name}.old")
            shutil.rmtree(retired, ignore_errors=True)
            folder.rename(retired)
            staging.rename(folder)
            shutil.rmtree(retired, ignore_errors=True)
        else:
            staging.rename(folder)
    finally:
        shutil.rmtree(staging, ignore_errors=True)
    return files
