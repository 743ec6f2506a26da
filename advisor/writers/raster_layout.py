"""Where everything goes in a field picture: panels sized to the part's shape, a header for the
title and the time stamp, and under each part a colour bar as wide as its panel.

Every box is placed here in pixels (origin top left), so nothing is left to a layout engine
and no two texts share a line: the header holds the title and the stamp on lines of their
own, each panel a caption line above the part and tick labels below its colour bar.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

MARGIN = 12  # px around the picture and between panels
TITLE_HEIGHT = 22  # px, one line of title text
STAMP_HEIGHT = 20  # px, one line of stamp text
CAPTION_HEIGHT = 18  # px, a panel's caption line
BAR_GAP = 8  # px between the part and its colour bar
BAR_HEIGHT = 12  # px
TICK_HEIGHT = 16  # px, tick labels under a colour bar
MIN_PANEL_WIDTH = 280  # px: room for a caption and a readable colour bar
MIN_PART = 8  # px: the thinnest part still drawn
EDGE_PIXELS = 3  # px between the part's extreme points and its box


@dataclass(frozen=True)
class Box:
    """A rectangle in pixels: left, top, width, height (origin at the picture's top left)."""

    left: int
    top: int
    width: int
    height: int

    @property
    def right(self) -> int:
        return self.left + self.width

    @property
    def bottom(self) -> int:
        return self.top + self.height


@dataclass(frozen=True)
class PanelBoxes:
    """One panel: its caption line, the part's box and its colour bar with the tick line."""

    caption: Box
    part: Box
    bar: Box
    ticks: Box


@dataclass(frozen=True)
class Layout:
    """A picture's size and the boxes in it."""

    width: int
    height: int
    title: Box
    stamp: Box | None
    panels: tuple[PanelBoxes, ...]
    scale: float  # px per m


def _panel_extra() -> int:
    """Height in px a panel needs beyond its part."""
    return CAPTION_HEIGHT + BAR_GAP + BAR_HEIGHT + TICK_HEIGHT + MARGIN


def arrange(
    extent: tuple[float, float, float, float],
    count: int,
    largest: tuple[int, int],
    stamp: bool,
    multiple: int = 1,
    title_lines: int = 1,
) -> Layout:
    """Lay out ``count`` panels of a part spanning ``extent`` (m) in a picture no larger than
    ``largest`` (width, height) px: the number of columns that draws the part largest, the
    picture shrunk to what the panels need (each side a multiple of ``multiple`` px), with
    ``title_lines`` lines of title."""
    part_width = max(extent[1] - extent[0], 1e-300)
    part_height = max(extent[3] - extent[2], 1e-300)
    header = MARGIN + TITLE_HEIGHT * title_lines + (STAMP_HEIGHT if stamp else 0)
    best = None
    for columns in range(1, count + 1):
        if MARGIN * (columns + 1) + columns * MIN_PANEL_WIDTH > largest[0] and columns > 1:
            break  # no room for that many colour bars side by side
        rows = -(-count // columns)
        across = (largest[0] - MARGIN * (columns + 1)) / columns
        down = (largest[1] - header - rows * _panel_extra()) / rows
        scale = min(across / part_width, down / part_height)
        if scale > 0 and (best is None or scale > best[0] * 1.0001):
            best = (scale, columns, rows)
    if best is None:
        raise ValueError(f"no room for {count} panels in {largest} px")
    scale, columns, rows = best
    box_width = max(int(part_width * scale), MIN_PART)
    box_height = max(int(part_height * scale), MIN_PART)
    panel_width = max(box_width, MIN_PANEL_WIDTH)
    width = _round_up(MARGIN * (columns + 1) + columns * panel_width, multiple)
    height = _round_up(header + rows * (box_height + _panel_extra()), multiple)
    panels = []
    for k in range(count):
        row, column = divmod(k, columns)
        left = MARGIN + column * (panel_width + MARGIN)
        top = header + row * (box_height + _panel_extra())
        caption = Box(left, top, panel_width, CAPTION_HEIGHT)
        part = Box(left + (panel_width - box_width) // 2, caption.bottom, box_width, box_height)
        bar = Box(left, part.bottom + BAR_GAP, panel_width, BAR_HEIGHT)
        ticks = Box(left, bar.bottom, panel_width, TICK_HEIGHT)
        panels.append(PanelBoxes(caption, part, bar, ticks))
    title = Box(MARGIN, MARGIN // 2, width - 2 * MARGIN, TITLE_HEIGHT * title_lines)
    stamp_box = Box(MARGIN, title.bottom, width - 2 * MARGIN, STAMP_HEIGHT) if stamp else None
    return Layout(width, height, title, stamp_box, tuple(panels), scale)


def _round_up(value: float, multiple: int) -> int:
    return int(-(-int(np.ceil(value)) // multiple) * multiple)


def part_extent(
    extent: tuple[float, float, float, float], box: Box
) -> tuple[float, float, float, float]:
    """``extent`` widened about its centre to the aspect of ``box``, so pixels are square."""
    x_min, x_max, y_min, y_max = extent
    # a pixel to spare on every side, so the outline is not cut at the box's edge
    per_pixel = max(
        (x_max - x_min) / max(box.width - 2, 1), (y_max - y_min) / max(box.height - 2, 1)
    )
    cx, cy = (x_min + x_max) / 2, (y_min + y_max) / 2
    half_w, half_h = box.width * per_pixel / 2, box.height * per_pixel / 2
    return (cx - half_w, cx + half_w, cy - half_h, cy + half_h)
