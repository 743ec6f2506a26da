"""Two writers at once: the matplotlib plots in a forked process while the pixel pictures
and field files are written here (the solve is over, so they share the cores)."""

from __future__ import annotations

import multiprocessing
import os
import sys

from ..errors import AdvisorError


def side_by_side(first, second) -> tuple:
    """``first()`` in a forked process while ``second()`` runs here; their results.

    The writers are independent and the solve is over, so the matplotlib plots (``first``)
    and the pixel pictures and field files (``second``) share the cores. Where processes
    cannot be forked safely (other than on Linux) or no core is free (a load average, this
    run's own included, above the cores less half a core: a second process then only takes
    turns with this one, measured 10–15 % slower at a load of 8 on two cores), one runs after
    the other. An error in either is raised here.
    """
    cores = os.cpu_count() or 1
    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float(cores)
    # fork only on Linux: macOS system libraries are not safe to use in a forked child
    if not sys.platform.startswith("linux") or load > cores - 0.5:
        return first(), second()
    receiver, sender = multiprocessing.get_context("fork").Pipe(duplex=False)
    child = multiprocessing.get_context("fork").Process(
        target=_send_result, args=(first, sender), daemon=True
    )
    child.start()
    sender.close()
    try:
        here = second()
        try:
            kind, value = receiver.recv()
        except EOFError:
            child.join()
            raise AdvisorError(
                f"the plot writer stopped without an answer (exit code {child.exitcode})"
            ) from None
        child.join()
    finally:
        if child.is_alive():
            child.terminate()
            child.join()
        receiver.close()
    if kind == "error":
        raise value
    return value, here


def _send_result(task, sender) -> None:
    """Run ``task`` in the forked process; send ("done", result) or ("error", exception)."""
    try:
        sender.send(("done", task()))
    except BaseException as error:  # noqa: BLE001 - every failure goes back to the parent
        try:
            sender.send(("error", error))
        except Exception:  # noqa: BLE001 - an exception that does not pickle
            sender.send(("error", AdvisorError(f"the plot writer failed: {error!r}")))
    finally:
        sender.close()
