"""The run's pictures (plots, field snapshots, animation) drawn in two processes that take
the next picture in turn, so that both finish close together.

The writers load matplotlib and Pillow, so they are loaded here on first use: in a command's
warm writer process (:func:`.side_by_side.warm_writer`), never in the run's own process.
Each is looked up as this module's attribute when it is called (a test may replace one).
"""

from __future__ import annotations

import multiprocessing
import sys
from pathlib import Path
from typing import TYPE_CHECKING

from ..lazy_names import lazy_names
from .side_by_side import side_by_side

if TYPE_CHECKING:
    from ..analysis.assessment import Assessment
    from ..results_folder import Choices

__getattr__, __dir__ = lazy_names(
    __name__,
    {
        "write_animation": "advisor.writers.animation",
        "write_line_plots": "advisor.writers.plots",
        "write_process_plots": "advisor.writers.plots",
        "write_snapshots": "advisor.writers.field_plots",
    },
)


def _writer(name: str):
    """The writer ``name`` of this module as it is now (loaded on first use)."""
    return getattr(sys.modules[__name__], name)


# The pictures in the order they are handed out (about the longest first, so that the two
# processes drawing them finish close together): file stem or writer, CPU seconds measured
# on the starters (0.1–0.35 s each).
PICTURE_ORDER = (
    "animation",
    "process",
    "histories",
    "energy",
    "field_snapshots",
    "lumped_error",
    "internal_difference",
)


def draw_pictures(
    assessment: Assessment, staging: Path, plots: Path, choices: Choices, mirrors: tuple
) -> list[Path]:
    """The run's pictures: the animation in ``staging``, the plots in ``plots``, as
    ``choices`` asks (:class:`advisor.results_folder.Choices`), drawn by two processes that
    take the next picture in turn when a core is free (:func:`.side_by_side.side_by_side`);
    their paths."""
    formats = ("png", "svg") if choices.svg else ("png",)
    solution = assessment.solution
    film = staging / "animation.mp4" if choices.mp4 else None
    writers = {
        "animation": lambda: draw_animation(solution, staging / "animation.gif", film, mirrors),
        "process": lambda: _writer("write_process_plots")(assessment, plots, formats),
        "field_snapshots": lambda: _writer("write_snapshots")(
            assessment, plots / "field_snapshots", formats, mirrors
        ),
    }
    wanted = [name for name in PICTURE_ORDER if name == "animation" or choices.plots]
    if not choices.animation:
        wanted.remove("animation")

    def line_plot(stem: str):
        return lambda: _writer("write_line_plots")(assessment, plots, formats, False, (stem,))

    tasks = [writers.get(name) or line_plot(name) for name in wanted]
    if len(tasks) < 2:
        return take_turns(tasks, None)
    turn = multiprocessing.Value("i", 0)  # inherited by the process side_by_side forks
    there, here = side_by_side((take_turns, (tasks, turn)), lambda: take_turns(tasks, turn))
    return there + here


def take_turns(tasks: list, turn) -> list[Path]:
    """Run the next of ``tasks`` not yet taken until none is left (``turn``: the index of
    the next, a counter the processes share; None: every task here); the paths written."""
    if turn is None:
        return [path for task in tasks for path in task()]
    written: list[Path] = []
    while True:
        with turn.get_lock():
            index = turn.value
            turn.value = index + 1
        if index >= len(tasks):
            return written
        written += tasks[index]()


def draw_animation(solution, gif: Path, film: Path | None, mirrors: tuple) -> list[Path]:
    """The animation as GIF and, when ``film`` is given, MP4; their paths."""
    return _writer("write_animation")(solution, gif, film, mirrors=mirrors)
