"""Times as a person reads them: hours and minutes, minutes and seconds, or seconds.

One formatter for every place a person reads a time (the command line, the report, the plots
and their legends); files meant for programs (``summary.json``, CSV) keep seconds. Only the
standard library is used, so the command line and the analysis can import it cheaply.
"""

from __future__ import annotations

import math

__all__ = ["duration_text"]


def duration_text(seconds: float) -> str:
    """A duration in the unit that fits, never in scientific notation.

    Under a minute: three significant figures in seconds (``"38.2 s"``, ``"0.85 s"``; below
    a millisecond in ms or µs). Under an hour: whole minutes and seconds (``"4 min 12 s"``,
    ``"5 min"``). From an hour: hours and whole minutes (``"3 h 10 min"``, ``"5 h"``).

    Parameters
    ----------
    seconds : float
        The duration in s (negative durations keep their sign).

    Returns
    -------
    str
        The duration in words and symbols.

    Examples
    --------
    >>> duration_text(18980.0)
    '5 h 16 min'
    >>> duration_text(252.0), duration_text(38.24), duration_text(0.85)
    ('4 min 12 s', '38.2 s', '0.85 s')
    """
    value = float(seconds)
    if not math.isfinite(value):
        return f"{value} s"
    if value < 0:
        return "−" + duration_text(-value)
    if value < 59.95:
        return _short(value)
    whole = round(value)
    if whole < 3600:
        minutes, rest = divmod(whole, 60)
        return f"{minutes} min" + (f" {rest} s" if rest else "")
    hours, minutes = divmod(round(value / 60), 60)
    return f"{hours} h" + (f" {minutes} min" if minutes else "")


def _short(value: float) -> str:
    """Under a minute: three significant figures, in s, ms or µs, positional."""
    if value == 0:
        return "0 s"
    for threshold, scale, unit in ((1e-3, 1.0, "s"), (1e-6, 1e-3, "ms"), (0.0, 1e-6, "µs")):
        if value >= threshold:
            scaled = value / scale
            decimals = max(0, 2 - math.floor(math.log10(scaled)))
            text = f"{scaled:.{decimals}f}"
            if "." in text:
                text = text.rstrip("0").rstrip(".")
            return f"{text} {unit}"
    raise AssertionError("unreachable")
