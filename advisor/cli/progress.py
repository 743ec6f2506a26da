"""A progress line for long runs, driven by the solver's ``progress`` callback.

``fem.solve(..., progress=RunProgress())`` shows how far the simulated time has got, the steps
taken and tqdm's estimate of the wall-clock time left (from the rate at which simulated time
has advanced so far). It stays silent when its stream is not a terminal, so logs and CI output
carry no progress bars.
"""

from __future__ import annotations

import sys
from typing import TextIO

from tqdm import tqdm

from ..time_words import duration_text

# The simulated time goes in the postfix, as a person reads it ("1 h 5 min of 4 h"); tqdm
# puts ", " before a postfix, so the first word after the bar is our own.
BAR_FORMAT = (
    "{desc} {percentage:3.0f}%|{bar}| simulated{postfix} "
    "[{elapsed} elapsed, about {remaining} left]"
)


class RunProgress:
    """Callable ``progress(time, end_time, steps)`` for :func:`fem.solve`.

    Parameters
    ----------
    stream : file-like, optional
        Where to draw; standard error by default.
    enabled : bool, optional
        Force the line on or off; by default it is shown only when ``stream`` is a terminal.
    description : str
        Text in front of the bar.

    Examples
    --------
    >>> import io
    >>> progress = RunProgress(io.StringIO())   # not a terminal: quiet
    >>> progress(30.0, 600.0, 30); progress(600.0, 600.0, 600)
    >>> progress.steps, progress.enabled
    (600, False)
    """

    def __init__(
        self,
        stream: TextIO | None = None,
        *,
        enabled: bool | None = None,
        description: str = "solving",
    ):
        self.stream = sys.stderr if stream is None else stream
        if enabled is None:
            isatty = getattr(self.stream, "isatty", None)
            enabled = bool(isatty and isatty())
        self.enabled = enabled
        self.description = description
        self.time = 0.0
        self.steps = 0
        self._bar: tqdm | None = None

    def __call__(self, time: float, end_time: float, steps: int) -> None:
        """Show that the run has reached ``time`` of ``end_time`` s after ``steps`` steps."""
        self.time, self.steps = float(time), int(steps)
        if not self.enabled:
            return
        if self._bar is None:
            self._bar = tqdm(
                total=float(end_time),
                desc=self.description,
                file=self.stream,
                bar_format=BAR_FORMAT,
                dynamic_ncols=True,
                leave=True,
                mininterval=0.2,
            )
        bar = self._bar
        simulated = f"{duration_text(self.time)} of {duration_text(bar.total)}"
        bar.set_postfix_str(f"{simulated}, {self.steps} steps", refresh=False)
        bar.update(min(self.time, bar.total) - bar.n)
        if self.time >= bar.total:
            self.close()

    def close(self) -> None:
        """End the line (it is ended by itself when the run reaches its end time)."""
        if self._bar is not None:
            self._bar.close()
            self._bar = None

    def __enter__(self) -> RunProgress:
        return self

    def __exit__(self, *_) -> None:
        self.close()
