"""``soakwise run CASE``: solve a case file and write its results folder."""

from __future__ import annotations

import argparse
from pathlib import Path

from ..time_words import duration_text
from .common import (
    EXIT_OK,
    Interrupted,
    SolvePosition,
    log,
    progress_display,
    rearm_terminate,
    refuse_existing,
    report_run,
)

SUMMARY = "solve a case file and write its results folder"
DESCRIPTION = (
    "Read CASE (a TOML case file), check it, mesh and solve it, judge the lumped "
    "estimate and write the results folder."
)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("case", type=Path, metavar="CASE", help="case file (.toml)")
    parser.add_argument(
        "--out",
        type=Path,
        metavar="DIR",
        help="results folder (default: the case file's name without .toml)",
    )
    parser.add_argument(
        "--force",
        action="store_true",
        help="replace the results folder (only one soakwise wrote, holding nothing else)",
    )
    parser.add_argument(
        "--resume",
        action="store_true",
        help="continue an interrupted run from its checkpoint (.DIR.checkpoint.npz beside DIR; "
        "[run] checkpoint_every sets how often one is kept)",
    )


def execute(args: argparse.Namespace) -> int:
    from ..writers.side_by_side import load_plotting, warm_writer

    # matplotlib and the fonts load on the other core while the case is read and solved
    with warm_writer(load_plotting):
        return _run(args)


def _run(args: argparse.Namespace) -> int:
    from ..casefile.case import load_case
    from ..field_results import FieldResults
    from ..folder_lock import results_lock
    from ..folder_room import check_can_write, check_room
    from ..pipeline import run_case, write_results
    from ..results_folder import check_results_folder

    case = load_case(args.case)  # every check that needs no mesh, before anything is written
    out = results_folder(args.case, args.out)
    refuse_existing(out, args.force)
    check_results_folder(out, force=args.force, keep=(args.case,))
    check_can_write(out)  # a folder that cannot be written is found before the solve

    def room(model) -> None:  # after meshing: is there room for the results?
        check_room(out, model, case.end_time, case.run_options, case.outputs)

    saving = Saving(args.case, out, case)
    position = SolvePosition(progress_display())
    try:
        with results_lock(out):  # held through the solve: a second run into out is refused
            resume = saving.resume_state(args.resume)
            log.info(f"Meshing and solving {case.title!r} ...")
            results = run_case(
                case,
                progress=position,
                checkpoint=saving.checkpointer,
                resume=resume,
                before_solve=room,
                field_alone=True,
            )
            position.solved = True
            rearm_terminate()
            check_results_folder(out, force=args.force, keep=(args.case,))
            files = write_results(results, out, force=args.force)
    except KeyboardInterrupt as stop:
        position.close()
        interrupted = Interrupted(position.where())
        interrupted.outcome = saving.kept() or "nothing written"
        raise interrupted from stop
    except OSError:
        raise  # disk full or no permission: the checkpoint stays for --resume
    except Exception:
        if saving.started:
            saving.remove()  # the run itself failed: resuming would fail again
        raise
    saving.remove()
    if isinstance(results, FieldResults):
        report_field(results, out, files)
        return EXIT_OK
    from ..analysis.error_estimate import estimate_lines
    from ..analysis.stages import ending_lines

    assessment = results.assessment
    more = ending_lines(assessment.ending, assessment.stages)
    more += estimate_lines(assessment.error_estimate)
    report_run(assessment, out, files, tuple(more))
    return EXIT_OK


def report_field(results, folder: Path, files: list[Path]) -> None:
    """Log a run no lumped model applies to: the reason, the field's extremes, the files."""
    from ..caution import CAUTION

    solution = results.solution
    log.info(f"No lumped model applies: {results.reason}.")
    log.info(
        f"At t = {duration_text(solution.times[-1])} the field runs from "
        f"{solution.minimum[-1]:.4g} to {solution.maximum[-1]:.4g} °C (mean "
        f"{solution.mean[-1]:.4g} °C)"
    )
    for warning in solution.checks.warnings:
        log.warning(f"check: {warning}")
    log.info(
        f"Wrote {len(files)} files to {folder}/: the field in histories.csv, animation.gif "
        "and fields/"
    )
    log.info(f"Caution: {CAUTION}")


class Saving:
    """The checkpoint of a run into ``out``: where it is kept, the callback that keeps it, and
    the state to resume from."""

    def __init__(self, case_path: Path, out: Path, case) -> None:
        from ..checkpoint import Checkpointer, case_fingerprint, checkpoint_path

        self.path = checkpoint_path(out)
        self.fingerprint = case_fingerprint(case_path.read_bytes())
        every = case.checkpoint_every
        self.checkpointer = (
            None
            if every is None
            else Checkpointer(self.path, self.fingerprint, every, case.end_time)
        )
        self.resumed_at: float | None = None
        self.started = False  # past the checks of a checkpoint already there

    def resume_state(self, resume: bool) -> dict | None:
        """The state to continue from with ``--resume``; without it, a checkpoint left by an
        interrupted run is not silently replaced."""
        from ..checkpoint import read_checkpoint, remove_unfinished
        from ..errors import AdvisorError

        remove_unfinished(self.path)  # held by the results folder's lock: no one writes it
        if not resume:
            if self.path.is_file():
                raise AdvisorError(
                    f"an interrupted run left the checkpoint {str(self.path)!r}: continue it "
                    "with --resume, or delete it to run from the start"
                )
            self.started = True
            return None
        state, self.resumed_at = read_checkpoint(self.path, self.fingerprint)
        self.started = True
        log.info(f"Resuming from t = {duration_text(self.resumed_at)} ({self.path})")
        return state

    def kept(self) -> str | None:
        """What an interrupted run leaves to resume from, in words, or None."""
        saved = self.checkpointer.saved_time if self.checkpointer is not None else None
        saved = saved if saved is not None else self.resumed_at
        if saved is None or not self.path.is_file():
            return None
        return (
            f"checkpoint of t = {duration_text(saved)} kept in {self.path} (resume with --resume)"
        )

    def remove(self) -> None:
        from ..checkpoint import remove_checkpoint

        remove_checkpoint(self.path)


def results_folder(case_path: Path, out: Path | None) -> Path:
    """``out``, or the case file's name without .toml (never the case file itself)."""
    folder = out or case_path.with_suffix("")
    if folder.resolve() == case_path.resolve():
        folder = case_path.parent / f"{case_path.stem}-results"
    return folder
