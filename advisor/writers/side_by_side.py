"""Two writers at once: the pictures (matplotlib and Pillow) in a forked process while the
histories and field files are written here (the solve is over, so they share the cores).

A command can start that process before it reads the case (:func:`warm_writer`): it loads
matplotlib, Pillow, the picture writers and the fonts on the second core while this process
reads, meshes and solves, and draws the pictures when handed them, so neither those imports
nor a fork after the solve lie on the run's path, and this process never loads matplotlib.
"""

from __future__ import annotations

import contextlib
import multiprocessing
import os
import signal
import sys
import threading
from collections.abc import Callable, Iterator

from ..errors import AdvisorError

_warm: WarmWriter | None = None  # the process :func:`warm_writer` started, while it lasts


def cores_free() -> bool:
    """True when a second process can run beside this one: on Linux (macOS system libraries
    are not safe to use in a forked child) with two cores or more, and either a load average
    below the cores less half a core (above it a second process only takes turns with this
    one, measured 10–15 % slower at a load of 8 on two cores) or no other process running
    now (the load average still counts the runs just before this one)."""
    cores = os.cpu_count() or 1
    if not sys.platform.startswith("linux") or cores < 2:
        return False
    return os.getloadavg()[0] <= cores - 0.5 or _others_running() < cores - 1


def _others_running() -> int:
    """Processes running or ready to run now besides this one (from /proc/loadavg)."""
    try:
        with open("/proc/loadavg", encoding="ascii") as status:
            running = int(status.read().split()[3].split("/")[0])
    except (OSError, ValueError, IndexError):
        return os.cpu_count() or 1
    return running - 1


def side_by_side(first: tuple[Callable, tuple], second: Callable[[], object]) -> tuple:
    """``function(*arguments)`` of ``first`` in another process while ``second()`` runs here;
    their results.

    The writers are independent and the solve is over, so the matplotlib plots (``first``)
    and the pixel pictures and field files (``second``) share the cores: in the process
    :func:`warm_writer` started when there is one, else in a process forked now when a core is
    free (:func:`cores_free`), else one after the other here. An error in either is raised
    here.
    """
    function, arguments = first
    if _warm is not None and _warm.alive():
        return _warm.run(function, arguments, second)
    if not cores_free():
        return function(*arguments), second()
    writer = WarmWriter(task=first)  # the task goes with the fork: nothing to pickle
    try:
        return writer.run(function, arguments, second)
    finally:
        writer.close()


@contextlib.contextmanager
def warm_writer(warm: Callable[[], None]) -> Iterator[WarmWriter | None]:
    """Within the block, :func:`side_by_side` hands its first writer to a process forked
    now that runs ``warm()`` (imports, fonts) first; None and no process when no core is free.
    The process ends with the block whatever happens."""
    global _warm
    if _warm is not None or not cores_free():
        yield None
        return
    _warm = WarmWriter(warm=warm)
    try:
        yield _warm
    finally:
        _warm.close()
        _warm = None


class WarmWriter:
    """A forked process that runs ``warm()`` and then one task: ``task`` (function,
    arguments) given now, or the one :meth:`run` sends it."""

    def __init__(
        self, *, warm: Callable[[], None] | None = None, task: tuple | None = None
    ) -> None:
        context = multiprocessing.get_context("fork")
        self._connection, there = context.Pipe(duplex=True)
        # not a daemon: a daemon may not fork, and the pictures fork the line plots off;
        # close() ends the process whatever happens
        self._process = context.Process(
            target=_serve, args=(warm, task, there, self._connection), daemon=False
        )
        self._process.start()
        there.close()
        self._used = False
        self._given = task is not None

    def alive(self) -> bool:
        return not self._used and self._process.is_alive()

    def run(self, function: Callable, arguments: tuple, here: Callable[[], object]) -> tuple:
        """``function(*arguments)`` there while ``here()`` runs here; both results. A
        process that can no longer be handed the task (it ended) leaves it to run here."""
        self._used = True
        refused: list[BaseException] = []

        def send() -> None:  # in a thread: the process may still be loading
            try:
                self._connection.send((function, arguments))
            except Exception as error:  # noqa: BLE001 - gone, or a task that does not pickle
                refused.append(error)

        sender = None
        if not self._given:  # else the process has it already and is drawing
            sender = threading.Thread(target=send, daemon=True)
            sender.start()
        try:
            mine = here()
        except BaseException:
            # The other process writes into the same folder, which the caller removes on
            # this error: let it finish first, or it would write into a folder being removed.
            self._settle(sender, refused)
            raise
        if sender is not None:
            sender.join()
        if refused:
            return function(*arguments), mine
        return self._answer(), mine

    def _settle(self, sender: threading.Thread | None, refused: list) -> None:
        """Wait for the task's end (its result or error dropped) after an error here."""
        if sender is not None:
            sender.join()
        if refused:
            return
        try:
            self._connection.recv()
        except (EOFError, OSError):
            pass

    def _answer(self):
        """The task's result from the process, or its error raised here."""
        try:
            kind, value = self._connection.recv()
        except EOFError:
            self._process.join()
            raise AdvisorError(
                "the picture writer stopped without an answer "
                f"(exit code {self._process.exitcode})"
            ) from None
        if kind == "error":
            raise value
        return value

    def close(self) -> None:
        """End the process (at once if it is still waiting or drawing) and free the pipe."""
        self._connection.close()  # a process waiting for a task sees the end and leaves
        if self._used:  # it has answered, or failed: it is ending
            self._process.join(timeout=1.0)
        if self._process.is_alive():  # still loading, or never handed a task
            self._process.terminate()
            self._process.join()


def _serve(warm, task, connection, theirs) -> None:
    """The forked process: ``warm()``, then ``task`` or the one from ``connection``; send
    back ("done", result) or ("error", exception)."""
    global _warm
    _warm = None  # the parent's, not this process's: a task here forks afresh
    theirs.close()
    signal.signal(signal.SIGINT, signal.SIG_IGN)  # Ctrl-C is the command's to handle
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    if warm is not None:
        with contextlib.suppress(Exception):  # a failing import fails again in the task
            warm()
    try:
        function, arguments = task or connection.recv()
    except (EOFError, OSError):  # the command ended or needs no plots
        return
    try:
        connection.send(("done", function(*arguments)))
    except BaseException as error:  # noqa: BLE001 - every failure goes back to the parent
        try:
            connection.send(("error", error))
        except Exception:  # noqa: BLE001 - an exception that does not pickle
            connection.send(("error", AdvisorError(f"the picture writer failed: {error!r}")))
    finally:
        connection.close()


def load_plotting() -> None:
    """What a warm writer loads before it is handed the pictures: matplotlib, Pillow, the
    picture writers and what unpickling an assessment needs, and the fonts (a small figure
    with text saved as PNG in memory)."""
    import io

    from .. import results_folder  # noqa: F401 - loaded now, unpickled with the pictures' task
    from . import pictures
    from .plot_style import new_figure

    for name in ("write_line_plots", "write_snapshots", "write_animation"):
        getattr(pictures, name)  # loaded now, used when handed the pictures

    figure = new_figure(2.0, 1.5)
    axes = figure.subplots()
    axes.plot([0.0, 1.0], [0.0, 1.0], label="ΔT (°C)")
    axes.legend(fontsize=8)
    axes.set_title("τ", fontsize=10, loc="left")
    figure.savefig(io.BytesIO(), format="png", bbox_inches="tight")
