"""The still parts of a field picture, drawn once by matplotlib: title, captions, colour-bar
ticks, the part's outline, region borders, dashed symmetry lines and markers; and the colour
ticks themselves, written plainly (no offset notation).

The drawing is on a transparent canvas at the layout's exact pixel size; the field goes under
it where it is clear, so a frame never needs matplotlib again.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .plot_style import INK
from .raster_layout import Box, Layout, arrange

DPI = 100  # so a layout pixel is a figure pixel
FONT = {"title": 11.0, "caption": 9.0, "tick": 8.0, "stamp": 10.0}  # points
UNIFORM_BELOW = 1e-3  # K: a field whose range is smaller is said to be uniform


@dataclass(frozen=True)
class Lines:
    """Segments to draw over a part, in m: (n, 2, 2) arrays."""

    outline: np.ndarray
    regions: np.ndarray
    dashed: np.ndarray


@dataclass(frozen=True)
class PanelArt:
    """What a panel shows that does not change: caption, tick labels along the colour bar
    (fraction 0–1, text), the part's extent in m, its lines and fixed markers
    ((x, y) m, colour, ``"^"`` or ``"v"``)."""

    caption: str
    ticks: tuple[tuple[float, str], ...]
    extent: tuple[float, float, float, float]
    lines: Lines
    markers: tuple = field(default_factory=tuple)


def measure_text(text: str, size: float, bold: bool = False) -> tuple[float, float]:
    """Width and height in px of ``text`` (its widest line) at ``size`` points (DejaVu Sans,
    at :data:`DPI`)."""
    from matplotlib.backends.backend_agg import RendererAgg
    from matplotlib.font_manager import FontProperties

    font = FontProperties(size=size, weight="bold" if bold else "normal")
    sizes = [
        _renderer(RendererAgg).get_text_width_height_descent(line, font, ismath=False)
        for line in text.split("\n")
    ]
    return float(max(w for w, _, _ in sizes)), float(sum(h for _, h, _ in sizes))


def titled_layout(title: str, extent, count: int, largest, stamp: bool, multiple: int = 1):
    """The layout (:func:`.raster_layout.arrange`) and the title as drawn: on one line when it
    fits the picture's width at full size, else broken at " — " onto two."""
    layout = arrange(extent, count, largest, stamp, multiple)
    if (
        measure_text(title, FONT["title"], bold=True)[0] <= layout.title.width
        or " — " not in title
    ):
        return layout, title
    title = title.replace(" — ", "\n", 1)
    return arrange(extent, count, largest, stamp, multiple, title_lines=2), title


_RENDERERS: dict = {}


def _renderer(kind):
    if kind not in _RENDERERS:
        _RENDERERS[kind] = kind(8, 8, DPI)
    return _RENDERERS[kind]


def uniform_label(low: float, high: float) -> str | None:
    """ "uniform at X °C" for a field whose range ``low``–``high`` °C is below
    :data:`UNIFORM_BELOW` K (rounding, not a gradient: no colours, no extremes); None for a
    field with a gradient to show. The one wording of snapshots, films and colour bars."""
    if high - low >= UNIFORM_BELOW:
        return None
    return f"uniform at {_plain((low + high) / 2, 0.01)} °C"


def plain_ticks(low: float, high: float, width: float) -> tuple[tuple[float, str], ...]:
    """Tick labels for a colour bar from ``low`` to ``high`` °C that is ``width`` px wide:
    round values written out in full, as many as fit without touching; a range below
    :data:`UNIFORM_BELOW` K is one label, "uniform at X °C"."""
    uniform = uniform_label(low, high)
    if uniform is not None:
        return ((0.5, uniform),)
    from matplotlib.ticker import MaxNLocator

    for bins in (8, 6, 5, 4, 3, 2, 1):
        values = [
            v
            for v in MaxNLocator(bins, steps=[1, 2, 2.5, 5, 10]).tick_values(low, high)
            if low <= v <= high
        ]
        if len(values) < 2 and bins > 1:
            continue
        step = (values[1] - values[0]) if len(values) > 1 else high - low
        labels = [_plain(v, step) for v in values]
        fractions = [float((v - low) / (high - low)) for v in values]
        widest = max(measure_text(t, FONT["tick"])[0] for t in labels)
        gap = min(np.diff(fractions), default=1.0) * width
        if gap >= widest + 10:
            return tuple(zip(fractions, labels, strict=True))
    middle = (low + high) / 2
    return ((0.5, _plain(middle, (high - low) / 2)),)


def _plain(value: float, step: float) -> str:
    """``value`` with as many decimals as ``step`` needs, never in scientific notation."""
    step = abs(step)
    decimals = 0
    while decimals < 9 and abs(round(step, decimals) - step) > 1e-6 * step:
        decimals += 1
    text = f"{value:.{decimals}f}"
    return "0" if text.strip("-0.") == "" else text


def render_chrome(layout: Layout, title: str, panels: list[PanelArt]):
    """Draw the still parts; return the RGBA picture (height, width, 4) uint8 and the boxes
    (left, top, right, bottom) px of every text drawn, for checks."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    figure = Figure(figsize=(layout.width / DPI, layout.height / DPI), dpi=DPI)
    figure.patch.set_alpha(0.0)
    canvas = FigureCanvasAgg(figure)
    texts = [_text(figure, layout, layout.title, title, "title", "left", bold=True)]
    for boxes, art in zip(layout.panels, panels, strict=True):
        texts.append(_text(figure, layout, boxes.caption, art.caption, "caption", "left"))
        texts += _ticks(figure, layout, boxes.bar, boxes.ticks, art.ticks)
        _part_lines(figure, layout, boxes.part, art)
    canvas.draw()
    renderer = canvas.get_renderer()
    boxes = []
    for text in texts:
        extent = text.get_window_extent(renderer)
        boxes.append((extent.x0, layout.height - extent.y1, extent.x1, layout.height - extent.y0))
    return np.asarray(canvas.buffer_rgba()).copy(), boxes


def _text(figure, layout: Layout, box: Box, text: str, kind: str, align: str, bold=False):
    """``text`` in ``box``, shrunk until it fits the box's width."""
    size = FONT[kind]
    while size > 6 and measure_text(text, size, bold)[0] > box.width:
        size -= 0.5
    x = box.left if align == "left" else box.left + box.width / 2
    return figure.text(
        x / layout.width,
        1 - (box.top + box.height / 2) / layout.height,
        text,
        ha=align,
        va="center",
        fontsize=size,
        color=INK,
        fontweight="bold" if bold else "normal",
    )


def _ticks(figure, layout: Layout, bar: Box, line: Box, ticks) -> list:
    """Tick labels under the colour bar, each kept inside the bar's span; a frame round it."""
    from matplotlib.patches import Rectangle

    frame = Rectangle(
        (bar.left / layout.width, 1 - bar.bottom / layout.height),
        bar.width / layout.width,
        bar.height / layout.height,
        transform=figure.transFigure,
        fill=False,
        edgecolor=INK,
        linewidth=0.6,
    )
    figure.patches.append(frame)
    texts = []
    for fraction, label in ticks:
        half = measure_text(label, FONT["tick"])[0] / 2
        x = float(np.clip(bar.left + fraction * bar.width, bar.left + half, bar.right - half))
        texts.append(
            figure.text(
                x / layout.width,
                1 - (line.top + line.height / 2) / layout.height,
                label,
                ha="center",
                va="center",
                fontsize=FONT["tick"],
                color=INK,
            )
        )
    return texts


def _part_lines(figure, layout: Layout, box: Box, art: PanelArt) -> None:
    """Outline, region borders, dashed symmetry lines and fixed markers over the part, drawn
    in the figure's pixels (no axes: a panel costs a few artists, not an axes)."""
    from matplotlib.collections import LineCollection
    from matplotlib.lines import Line2D
    from matplotlib.transforms import IdentityTransform

    x_min, x_max, y_min, y_max = art.extent
    per_metre = box.width / (x_max - x_min)

    def to_figure(points: np.ndarray) -> np.ndarray:
        """m → figure pixels (origin bottom left, as the figure draws)."""
        x = box.left + (points[..., 0] - x_min) * per_metre
        y = layout.height - box.bottom + (points[..., 1] - y_min) * per_metre
        return np.stack([x, y], axis=-1)

    lines = art.lines
    for segments, width, style in (
        (lines.regions, 0.6, "solid"),
        (lines.outline, 1.0, "solid"),
        (lines.dashed, 0.8, (0, (4, 3))),
    ):
        if len(segments):
            figure.add_artist(
                LineCollection(
                    to_figure(np.asarray(segments)),
                    colors=INK,
                    linewidths=width,
                    linestyles=style,
                    transform=IdentityTransform(),
                )
            )
    for (x, y), colour, symbol in art.markers:
        (px, py) = to_figure(np.array([x, y]))
        figure.add_artist(
            Line2D(
                [px],
                [py],
                marker=symbol,
                color=colour,
                mec="white",
                mew=0.8,
                ms=8,
                transform=IdentityTransform(),
            )
        )
