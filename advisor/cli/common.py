"""What the commands share: exit codes, the help's closing text, logging to the terminal, the
progress display and the report of a finished run.

Only the standard library is imported here, so that every command starts quickly; a command
imports what it needs when it runs.
"""

from __future__ import annotations

import logging
import signal
import sys
import warnings
from pathlib import Path

from ..caution import CAUTION
from ..time_words import duration_text

EXIT_OK, EXIT_FAILED, EXIT_USAGE, EXIT_INTERRUPTED = 0, 1, 2, 130
EPILOG = (
    f"Caution: {CAUTION}\n\nExit status: 0 done, 1 the run failed, 2 bad command line "
    "or input (nothing is written), 130 interrupted (Ctrl-C or SIGTERM)."
)

log = logging.getLogger("soakwise")


def configure_logging(level: int) -> None:
    """Our messages to stderr at ``level``; other libraries' chatter only when verbose."""
    warnings.showwarning = _show_warning
    handler = logging.StreamHandler(sys.stderr)
    handler.setFormatter(logging.Formatter("%(message)s"))
    log.handlers[:] = [handler]
    log.setLevel(level)
    log.propagate = False
    logging.getLogger().setLevel(logging.WARNING if level > logging.DEBUG else logging.INFO)


def _show_warning(message, category, filename, lineno, file=None, line=None) -> None:
    """Library warnings (a property table left, ...) as one plain line each."""
    log.warning(f"warning: {message}")


def progress_display():
    """A progress line for the solve when messages are shown (None without tqdm)."""
    try:
        from .progress import RunProgress
    except ImportError:
        return None
    return RunProgress() if log.isEnabledFor(logging.INFO) else None


def report_run(assessment, folder: Path, files: list[Path], more: tuple[str, ...] = ()) -> None:
    """Log the solver's figures, the Biot numbers, the verdict, ``more`` lines (how the run
    ended, its error estimate) and where the files went."""
    solution = assessment.solution
    stats = solution.stats
    log.debug(
        f"{stats.unknowns} unknowns, {stats.steps} steps ({stats.rejected_steps} rejected), "
        f"{stats.factorisations} factorisations, {stats.solves} solves, "
        f"{stats.newton_iterations} Newton iterations, "
        f"stepping {stats.stepping_seconds:.2f} s"
    )
    for line in biot_lines(assessment.biot):
        log.info(line)
    log.info(
        f"Peak internal temperature difference: {assessment.peak_internal_difference:.3g} K "
        f"at {duration_text(assessment.peak_internal_difference_time)}"
    )
    verdict = assessment.verdict
    log.info(f"Classical lumped estimate {verdict.rating.upper()} for {verdict.subject}:")
    for reason in verdict.reasons:
        log.info(f"  - {reason}")
    log.info(f"Direction: {verdict.direction}.")
    log.info(f"Advice: {verdict.advice}")
    for warning in solution.checks.warnings:
        log.warning(f"check: {warning}")
    for note in solution.checks.notes:
        log.info(f"note: {note}")
    for line in more:
        log.info(line)
    for note in getattr(files, "notes", ()):  # an optional output skipped for its extra
        log.info(f"note: {note}")
    log.info(closing_line(folder, files))
    log.info(f"Caution: {CAUTION}")


def closing_line(folder: Path, files: list[Path]) -> str:
    """Where the files went and what to open, naming only what was written."""
    names = {Path(f).as_posix() for f in files}
    tops = {n.split("/", 1)[0] for n in names}
    pages = [n for n in ("report.html", "animation.gif") if n in names]
    if not pages:
        pages = [n for n in ("plots/", "summary.json") if n.rstrip("/") in tops]
    words = [f"open {' or '.join(pages)}"] if pages else []
    if any(n.startswith("fields/") and n.endswith((".vtu", ".pvd", ".xdmf")) for n in names):
        words.append("fields/ opens in a VTK viewer")
    return f"Wrote {len(files)} files to {folder}/" + (": " + "; ".join(words) if words else "")


def refuse_existing(folder: Path, force: bool) -> None:
    """Refuse an existing results folder unless ``--force`` was given, in the command line's
    words (the library's own check then decides whether it may be replaced)."""
    if not force and (folder.exists() or folder.is_symlink()):
        from ..errors import AdvisorError

        raise AdvisorError(
            f"results folder {str(folder)!r} already exists; choose another with --out DIR "
            "or replace it with --force"
        )


def biot_lines(biot) -> list[str]:
    """One line per Biot number: its length scale in words and mm, the value, and how it
    varies across regions and over the run."""
    from ..analysis.verdict import BIOT_NAMES, biot_spread_words

    return [
        f"Biot number ({BIOT_NAMES.get(bi.name, bi.name)} = {1000 * bi.length:.3g} mm): "
        f"{bi.value:.3g}{biot_spread_words(bi)}"
        for bi in biot
    ]


class Interrupted(KeyboardInterrupt):
    """Ctrl-C or SIGTERM, raised where the program was so that every cleanup runs;
    ``where`` says how far it got (" at t = 12 s of 600 s")."""

    def __init__(self, where: str = "") -> None:
        super().__init__(where)
        self.where = where


def on_terminate(signum, frame) -> None:
    """SIGTERM's handler: stop like Ctrl-C (Python's default ends without any cleanup)."""
    raise Interrupted()


def rearm_terminate() -> None:
    """Put :func:`on_terminate` back at the operating system's level where the command line
    set it: gmsh resets SIGTERM to its default when it starts, behind Python's back."""
    if signal.getsignal(signal.SIGTERM) is on_terminate:
        signal.signal(signal.SIGTERM, on_terminate)


class SolvePosition:
    """The solver's ``progress`` callback that remembers how far the solve got, passing each
    call on to the progress line (``display``, or None)."""

    def __init__(self, display=None) -> None:
        self.display = display
        self.time: float | None = None
        self.end_time: float | None = None
        self.solved = False

    def __call__(self, time: float, end_time: float, steps: int) -> None:
        if self.time is None:  # the first call, after meshing
            rearm_terminate()
        self.time, self.end_time = float(time), float(end_time)
        if self.display is not None:
            self.display(time, end_time, steps)

    def close(self) -> None:
        if self.display is not None:
            self.display.close()

    def where(self) -> str:
        """ " at t = 12.5 s of 600 s", or where the run was before or after the solve."""
        if self.solved:
            return " while writing the results"
        if self.time is None:
            return " before the solve"
        return f" at t = {duration_text(self.time)} of {duration_text(self.end_time)}"
