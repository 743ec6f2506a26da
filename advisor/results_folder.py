"""The results folder's layout: every file of a run, written whole or not at all.

Layout::

    summary.json                 inputs, Biot numbers, lumped errors, verdict, checks
    report.html                  the report as one self-contained page (images embedded)
    report.md                    the same report in Markdown, images by relative path
    histories.csv                every per-step history with the lumped models, units in the header
    plots/histories.png[|svg]    temperature histories with the lumped estimates, internal ΔT
                                 (every plot as PNG; SVG beside it with ``[outputs] svg``)
    plots/internal_difference.png|svg    internal ΔT over time, peak marked
    plots/lumped_error.png|svg   lumped error against the tolerance band
    plots/field_snapshots.png|svg        the field at a few output times
    plots/energy.png|svg         stored energy against heat taken in
    plots/cooling_rates.png|svg  cooling rate against temperature (when quench readings are asked)
    plots/surface_curves.png|svg the curves of surface temperature used (when a case has them)
    animation.gif                the field over time: one colour scale, and each frame's range
    animation.mp4                the same as an MP4 film (``[outputs] mp4``, the ``mp4`` extra)
    fields/legend.json           region and edge group names by id
    fields/temperature.pvd       VTK collection with the physical times
    fields/temperature_NNNN.vtu  one unstructured grid per output time, t = 0 first
    fields/temperature.xdmf      XDMF time series (with h5py, the ``xdmf`` extra) ...
    fields/temperature.h5        ... and its HDF5 data

and ``.soakwise-results``, the marker: which program and version wrote the folder, when, and
every file in it. ``force`` replaces only a folder holding this marker and nothing but the
files it lists; never a plain file, a device, a link, the current or root folder, a folder
holding the current one or the case file, or a folder holding anything else.

The folder is first written under a temporary name beside the target and renamed when
complete, so an interrupted run leaves no half-written results and an existing folder is
replaced only after the new one is whole. One run at a time writes a folder (see
:mod:`advisor.folder_lock`). The public entry is :func:`advisor.pipeline.write_results`.
"""

from __future__ import annotations

import importlib.util
import json
import shutil
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path

from .analysis.assessment import Assessment
from .errors import AdvisorError, ResultsFolderExistsError
from .field_results import FieldResults
from .folder_lock import results_lock
from .folder_room import CannotWriteError, check_can_write, error_words
from .writers.field_summary import write_field_summary_json
from .writers.histories_csv import write_histories_csv
from .writers.pictures import draw_animation, draw_pictures
from .writers.plot_list import PLOTS, in_plot_order, written_plots
from .writers.report_content import Picture, build_report
from .writers.report_html import write_html_report
from .writers.report_markdown import write_markdown_report
from .writers.side_by_side import side_by_side
from .writers.summary_json import write_summary_json
from .writers.vtk_series import write_vtk_series, write_xdmf_series

PLOT_FOLDER = "plots"
FIELD_FOLDER = "fields"
MARKER = ".soakwise-results"


def check_results_folder(folder: Path, *, force: bool, keep: tuple[Path, ...] = ()) -> None:
    """Check that the results can go to ``folder``: it does not exist, or ``force`` is set and
    it is a results folder soakwise wrote, holding nothing else.

    Parameters
    ----------
    folder : path
        The results folder.
    force : bool
        Replace an existing results folder.
    keep : tuple of paths
        Files that must survive (the case file): a folder holding one is never replaced.

    Raises
    ------
    ResultsFolderExistsError
        With the reason; nothing is changed.
    """
    folder = Path(folder)
    if not folder.exists() and not folder.is_symlink():
        return
    shown = repr(str(folder))
    if not force:
        raise ResultsFolderExistsError(
            f"results folder {shown} already exists; choose another or replace it "
            "with force=True (--force on the command line)"
        )
    reason = _not_replaceable(folder, keep)
    if reason:
        raise ResultsFolderExistsError(
            f"{shown} is not replaced: {reason}; only a results folder soakwise wrote (with "
            f"{MARKER} in it) and holding nothing else is replaced; choose another folder"
        )


def _not_replaceable(folder: Path, keep: tuple[Path, ...]) -> str | None:
    """Why ``folder`` (which exists) must not be deleted, or None."""
    if folder.is_symlink():
        return "it is a symbolic link"
    if not folder.is_dir():
        return "it is not a folder (a file or a device)"
    real = folder.resolve()
    if real == Path(real.anchor) or real in (Path.cwd().resolve(), *Path.cwd().resolve().parents):
        return "it is the root folder, the current folder or one holding it"
    for path in keep:
        if Path(path).resolve().is_relative_to(real):
            return f"it holds {Path(path).name}"
    try:
        listed = set(json.loads((folder / MARKER).read_text(encoding="utf-8"))["files"])
    except (OSError, ValueError, KeyError, TypeError):
        return f"it has no readable {MARKER} (soakwise did not write it)"
    for path in folder.rglob("*"):
        name = path.relative_to(folder).as_posix()
        if path.is_symlink() or (not path.is_dir() and name not in listed):
            return f"it holds {name!r}, which soakwise did not write"
        if path.is_dir() and not any(f.startswith(name + "/") for f in listed):
            return f"it holds the folder {name!r}, which soakwise did not write"
    return None


def mp4_available() -> bool:
    """True when imageio-ffmpeg (the ``mp4`` extra) is installed, so MP4 can be written
    (asked here without loading the animation's writer, which loads matplotlib)."""
    return importlib.util.find_spec("imageio_ffmpeg") is not None


def xdmf_available() -> bool:
    """True when h5py (the ``xdmf`` extra) is installed, so an XDMF series can be written."""
    return importlib.util.find_spec("h5py") is not None


@dataclass(frozen=True)
class Choices:
    """Which files to write (see :func:`advisor.pipeline.write_results`); ``mp4`` and
    ``xdmf`` None: when their extra is installed, else skipped with a note."""

    report: bool = True
    animation: bool = True
    vtk: bool = True
    plots: bool = True
    svg: bool = False
    mp4: bool | None = False
    xdmf: bool | None = None


class WrittenFiles(list):
    """The paths written (relative to the folder), with ``notes``: one line for each
    optional output skipped because its extra is missing."""

    def __init__(self, paths=(), notes=()):
        super().__init__(paths)
        self.notes = list(notes)


def _optional(wanted: bool | None, available: bool, what: str, extra: str, notes: list) -> bool:
    if wanted is None:
        if not available:
            notes.append(
                f'{what} skipped: it needs the {extra!r} extra (pip install "soakwise[{extra}]")'
            )
        return available
    if wanted and not available:
        raise AdvisorError(
            f'{what} needs the {extra!r} extra (pip install "soakwise[{extra}]"), or turn it '
            f"off: [outputs] {extra} = false in a case file ({extra}=False in write_results, or "
            "None to write it only when the extra is there)"
        )
    return bool(wanted)


def write_folder(
    assessment: Assessment | FieldResults,
    folder: Path,
    *,
    force: bool,
    choices: Choices,
    mirrors: tuple = (),
) -> WrittenFiles:
    """Write the results folder; return the paths of its files (relative to ``folder``).

    The options are those of :func:`advisor.pipeline.write_results`, all given.
    """
    folder = Path(folder)
    check_results_folder(folder, force=force)
    check_can_write(folder)
    notes: list[str] = []
    mp4 = choices.animation and _optional(
        choices.mp4, mp4_available(), "animation.mp4", "mp4", notes
    )
    xdmf = choices.vtk and _optional(
        choices.xdmf, xdmf_available(), "fields/temperature.xdmf", "xdmf", notes
    )
    choices = Choices(
        choices.report, choices.animation, choices.vtk, choices.plots, choices.svg, mp4, xdmf
    )

    def write_into(staging: Path) -> list[Path]:
        if isinstance(assessment, FieldResults):
            return _write_field_files(
                assessment, staging, choices.animation, choices.vtk, mp4, xdmf, mirrors
            )
        return _write_files(assessment, staging, choices, mirrors)

    return WrittenFiles(staged_write(folder, force, write_into), notes)


def staged_write(folder: Path, force: bool, write_into) -> list[Path]:
    """Write a results folder whole or not at all: ``write_into(staging)`` fills a folder
    under a temporary name beside ``folder`` (under the folder's lock), which then takes the
    folder's place; a full disk or a permission taken away on the way is a
    :class:`CannotWriteError` and nothing is left. Returns what ``write_into`` returned."""
    folder = Path(folder)
    with results_lock(folder):
        check_results_folder(folder, force=force)  # as it is now that no one else writes it
        staging = Path(
            tempfile.mkdtemp(dir=folder.parent, prefix=f".{folder.name}.", suffix=".part")
        )
        try:
            files = write_into(staging)
            _put_in_place(staging, folder)
        except OSError as error:
            raise CannotWriteError(
                f"the results could not be written to {str(folder)!r} ({error_words(error)}); "
                "nothing was written"
            ) from error
        finally:
            shutil.rmtree(staging, ignore_errors=True)
    return files


def _write_files(
    assessment: Assessment, staging: Path, choices: Choices, mirrors: tuple
) -> list[Path]:
    """Write every file into ``staging``; return their paths relative to it, summary first.

    The pictures (plots and animation, matplotlib and Pillow) are drawn in other processes
    while the histories and field files are written here
    (:func:`.writers.side_by_side.side_by_side`); the report, which embeds the pictures,
    comes after both."""
    plots = staging / PLOT_FOLDER

    def the_rest() -> list[Path]:
        return _histories_and_fields(assessment, staging, choices.vtk, choices.xdmf)

    if choices.plots or choices.animation:
        drawing = (assessment, staging, plots, choices, mirrors)
        pictures, rest = side_by_side((draw_pictures, drawing), the_rest)
    else:
        pictures, rest = [], the_rest()
    written = (
        rest[:1]
        + in_plot_order([p for p in pictures if p.parent == plots])
        + [p for p in pictures if p.parent != plots]
        + rest[1:]
    )

    files = [Path("summary.json")]
    if choices.report:
        files += [Path("report.html"), Path("report.md")]
    files += [p.relative_to(staging) for p in written] + [Path(MARKER)]
    names = [f.as_posix() for f in files]
    if choices.report:
        pictures = _pictures(choices.animation, written_plots(names, PLOT_FOLDER))
        content = build_report(assessment, pictures, names)
        write_html_report(content, staging / "report.html")
        write_markdown_report(content, staging / "report.md")
    write_summary_json(assessment, staging / "summary.json", names)
    _write_marker(staging / MARKER, names)
    return files


def _write_field_files(
    results: FieldResults,
    staging: Path,
    animation: bool,
    vtk: bool,
    mp4: bool,
    xdmf: bool,
    mirrors: tuple = (),
) -> list[Path]:
    """The files of a run no lumped model applies to: summary, histories, animation, fields
    (no report or plots: they compare the lumped estimate with the field)."""

    def the_rest() -> list[Path]:
        return _histories_and_fields(results, staging, vtk, xdmf)

    if animation:  # Pillow and matplotlib in the other process, as for a full run
        gif, film = staging / "animation.gif", staging / "animation.mp4" if mp4 else None
        task = (draw_animation, (results.solution, gif, film, mirrors))
        pictures, rest = side_by_side(task, the_rest)
    else:
        pictures, rest = [], the_rest()
    written = rest[:1] + pictures + rest[1:]
    files = [Path("summary.json")] + [p.relative_to(staging) for p in written] + [Path(MARKER)]
    names = [f.as_posix() for f in files]
    write_field_summary_json(results, staging / "summary.json", names)
    _write_marker(staging / MARKER, names)
    return files


def _histories_and_fields(results, staging: Path, vtk: bool, xdmf: bool) -> list[Path]:
    """histories.csv and, when asked, the field series (VTK, XDMF) of ``results`` (an
    assessment or field results) in ``staging``; their paths, histories first."""
    written = [staging / "histories.csv"]
    write_histories_csv(results, written[0])
    if vtk:
        written += write_vtk_series(results.solution, staging / FIELD_FOLDER)
        if xdmf:
            written += write_xdmf_series(results.solution, staging / FIELD_FOLDER)
    return written


def _write_marker(path: Path, names: list[str]) -> None:
    """The marker that lets ``force`` know soakwise wrote the folder, and every file in it."""
    from importlib.metadata import PackageNotFoundError, version

    try:
        written_by = f"soakwise {version('soakwise')}"
    except PackageNotFoundError:
        written_by = "soakwise"
    stamp = time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime())
    text = json.dumps({"written_by": written_by, "time": stamp, "files": names}, indent=1)
    path.write_text(text + "\n", encoding="utf-8")


def _pictures(animation: bool, stems: set[str]) -> list[Picture]:
    """The report's pictures: the plots written (``stems``), and the animation."""
    pictures = [
        Picture(f"{PLOT_FOLDER}/{stem}.png", title, caption)
        for stem, (title, caption) in PLOTS.items()
        if stem in stems
    ]
    if animation:
        pictures.append(
            Picture(
                "animation.gif",
                "The field over the run",
                "Left, every output time on one colour scale; right, each frame spread over its "
                "own range, so the internal difference stays visible. Hottest (▲) and "
                "coldest (▼) points marked; the stamp gives each frame's extremes.",
            )
        )
    return pictures


def _put_in_place(staging: Path, folder: Path) -> None:
    """Rename the complete ``staging`` folder to ``folder``, retiring an existing one first."""
    if folder.exists():
        retired = folder.with_name(f".{folder.name}.old")
        shutil.rmtree(retired, ignore_errors=True)
        folder.rename(retired)
        staging.rename(folder)
        shutil.rmtree(retired, ignore_errors=True)
    else:
        staging.rename(folder)
