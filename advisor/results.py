"""The results folder: every file of a run, written whole or not at all.

Layout::

    summary.json            inputs, Biot numbers, lumped errors, verdict, checks
    histories.png           temperature histories and internal ΔT
    fields/temperature.pvd  VTK collection with the physical times
    fields/temperature_NNNN.vtu  one unstructured grid per output time

The folder is first written under a temporary name beside the target and renamed when
complete, so an interrupted run leaves no half-written results and an existing folder is
replaced only after the new one is whole.
"""

from __future__ import annotations

import shutil
import tempfile
from pathlib import Path

from .assessment import Assessment
from .errors import ResultsFolderExistsError
from .writers.plots import write_history_plot
from .writers.summary_json import write_summary_json
from .writers.vtk_series import write_vtk_series


def check_results_folder(folder: Path, *, force: bool) -> None:
    """Raise :class:`ResultsFolderExistsError` if ``folder`` exists and ``force`` is false."""
    if Path(folder).exists() and not force:
        raise ResultsFolderExistsError(
            f"results folder {str(folder)!r} already exists; choose another or replace it "
            "with force=True (--force on the command line)"
        )


def write_results(assessment: Assessment, folder: Path, *, force: bool = False) -> list[Path]:
    """Write the results folder; return the paths of its files (relative to ``folder``).

    Raises
    ------
    ResultsFolderExistsError
        If ``folder`` exists and ``force`` is false; nothing is written.
    """
    folder = Path(folder)
    check_results_folder(folder, force=force)
    folder.parent.mkdir(parents=True, exist_ok=True)
    staging = Path(tempfile.mkdtemp(dir=folder.parent, prefix=f".{folder.name}.", suffix=".part"))
    try:
        write_history_plot(assessment, staging / "histories.png")
        vtk = write_vtk_series(assessment.solution, staging / "fields")
        files = [Path("summary.json"), Path("histories.png")]
        files += [p.relative_to(staging) for p in vtk]
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
