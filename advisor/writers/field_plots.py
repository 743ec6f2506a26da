"""Pictures of the temperature field over the section, without a matplotlib figure per
picture: a few snapshots, each on its own colour scale, and the scene the animation shares
(the whole part's extent, its lines and a pixel map per panel).

A symmetric model is drawn as the whole part it stands for: the modelled piece mirrored
across its symmetry lines (dashed), an axisymmetric one as the full r–z section.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from fem import Solution

from ..analysis.assessment import Assessment
from ..whole_part import Mirror, copies, drawn_mirrors
from .atomic import write_with
from .plot_style import COOL, FIELD_MAP, WARM, clock
from .raster import PixelMap, levels, pixel_map, whole_extent
from .raster_chrome import (
    Lines,
    PanelArt,
    plain_ticks,
    render_chrome,
    titled_layout,
    uniform_label,
)
from .raster_layout import Layout, part_extent
from .raster_picture import Canvas, image_of, make_canvas, paint_bar
from .section_fields import whole_part_lines

SNAPSHOT_SIZE = (1200, 960)  # px: the largest snapshot picture
PIECES = {2: "half", 4: "quarter", 8: "eighth"}


def snapshot_indices(output_times: np.ndarray, peak_time: float, count: int = 4) -> list[int]:
    """Which output fields to draw: ``count`` spread over the run after t = 0, one of them
    the output nearest the peak internal difference."""
    n = len(output_times)
    if n <= count:
        return list(range(n))
    picks = np.rint(np.linspace(1, n - 1, count)).astype(int)
    peak = int(np.argmin(np.abs(np.asarray(output_times) - peak_time)))
    picks[int(np.argmin(np.abs(picks - peak)))] = peak
    return sorted({int(i) for i in picks})


@dataclass(frozen=True)
class Scene:
    """The part as pictures show it: vertices and triangles of the modelled piece, the lines
    it unfolds across, the whole part's extent (m) and lines, and a phrase saying what is
    drawn."""

    vertices: np.ndarray
    triangles: np.ndarray
    mirrors: tuple[Mirror, ...]
    extent: tuple[float, float, float, float]
    lines: Lines
    view: str

    def pixel_map(self, layout: Layout, panel: int) -> PixelMap:
        box = layout.panels[panel].part
        extent = part_extent(self.extent, box)
        return pixel_map(
            self.vertices, self.triangles, (box.height, box.width), extent, self.mirrors
        )

    def art(self, layout: Layout, panel: int, caption: str, ticks, markers=()) -> PanelArt:
        extent = part_extent(self.extent, layout.panels[panel].part)
        return PanelArt(caption, ticks, extent, self.lines, tuple(markers))


def scene(solution: Solution, mirrors: Sequence[Mirror] = ()) -> Scene:
    """The whole part of ``solution``'s section unfolded across ``mirrors`` (and the axis,
    for an axisymmetric section)."""
    section = solution.model.section
    axisymmetric = section.axisymmetric
    unfolded = drawn_mirrors(mirrors, axisymmetric)
    outline, borders, dashed = whole_part_lines(section, unfolded)
    extent = whole_extent(section.vertices, unfolded)
    count = copies(mirrors, axisymmetric)
    if count > 1:
        piece = PIECES.get(count, f"1/{count}")
        whole_of = "full r–z section" if axisymmetric else "whole part"
        view = f"{whole_of} mirrored from the modelled {piece}"
    elif axisymmetric:
        view = "full r–z section, mirrored about the axis"
    else:
        view = "the modelled section"
    if len(dashed):
        view += " (dashed: symmetry lines)"
    return Scene(
        section.vertices,
        np.asarray(section.mesh.t),
        unfolded,
        extent,
        Lines(outline, borders, dashed),
        view,
    )


def _with_peak(solution, fields: list, times: list) -> None:
    """Put the field of the largest internal difference in place of the panel nearest its
    time when no output time caught it (a fast event in a long run)."""
    peak = getattr(solution, "peak_field", None)  # a stand-in solution may not have one
    when = getattr(solution, "peak_field_time", None)
    if peak is None or when in times:
        return
    nearest = int(np.argmin(np.abs(np.asarray(times) - when)))
    if np.ptp(peak) > np.ptp(fields[nearest]):
        fields[nearest], times[nearest] = np.asarray(peak, dtype=float), float(when)
        order = np.argsort(times, kind="stable")
        fields[:] = [fields[i] for i in order]
        times[:] = [times[i] for i in order]


def snapshot_canvas(assessment: Assessment, mirrors: Sequence[Mirror] = (), count: int = 4):
    """The snapshot picture's :class:`Canvas` and its index picture."""
    solution = assessment.solution
    indices = snapshot_indices(
        solution.output_times, assessment.peak_internal_difference_time, count
    )
    whole = scene(solution, mirrors)
    title = f"Temperature (°C), each on its own scale; ▲ hottest, ▼ coldest — {whole.view}"
    layout, title = titled_layout(title, whole.extent, len(indices), SNAPSHOT_SIZE, False)
    fields = [np.asarray(solution.fields[i], dtype=float) for i in indices]
    times = [float(solution.output_times[i]) for i in indices]
    _with_peak(solution, fields, times)
    x, y = solution.model.section.vertices
    arts, maps = [], []
    for k, (time, field) in enumerate(zip(times, fields, strict=True)):
        low, high = float(field.min()), float(field.max())
        when = f"t = {clock(time)}: "
        ticks = plain_ticks(low, high, layout.panels[k].bar.width)
        uniform = uniform_label(low, high)
        if uniform is not None:  # no colours, no extremes: rounding is not a gradient
            caption, markers = when + uniform, []
        else:
            caption = when + f"{low:.4g} to {high:.4g} °C, ΔT {high - low:.3g} K"
            hot, cold = int(np.argmax(field)), int(np.argmin(field))
            markers = [((x[hot], y[hot]), WARM, "^"), ((x[cold], y[cold]), COOL, "v")]
        arts.append(whole.art(layout, k, caption, ticks, markers))
        maps.append(maps[0] if maps else whole.pixel_map(layout, k))  # boxes of one size
    chrome, boxes = render_chrome(layout, title, arts)
    canvas = make_canvas(layout, chrome, [FIELD_MAP], maps, boxes)
    for panel, field in zip(layout.panels, fields, strict=True):
        if uniform_label(float(field.min()), float(field.max())) is None:  # else no scale
            paint_bar(canvas, panel.bar, 0)
    shown = []
    for pixel_map_, field in zip(maps, fields, strict=True):
        low, high = float(field.min()), float(field.max())
        high = high if uniform_label(low, high) is None else low  # uniform: one level
        shown.append(levels(pixel_map_.values(field), low, high, canvas.palette.levels))
    return canvas, canvas.frame(shown, [0] * len(shown))


def write_snapshots(
    assessment: Assessment,
    stem: Path,
    formats: Sequence[str] = ("png",),
    mirrors: Sequence[Mirror] = (),
) -> list[Path]:
    """Write the snapshot picture as ``stem.png`` (and ``stem.svg``, the same picture inside
    an SVG, when asked); return the paths."""
    canvas, picture = snapshot_canvas(assessment, mirrors)
    return save_picture(picture, canvas, Path(stem), formats)


def save_picture(picture: np.ndarray, canvas: Canvas, stem: Path, formats) -> list[Path]:
    """Save an index picture as PNG and, if asked, as an SVG that embeds the PNG."""
    import base64
    import io

    image = image_of(picture, canvas.palette)
    buffer = io.BytesIO()
    image.save(buffer, format="PNG", optimize=False, compress_level=3)
    data = buffer.getvalue()
    stem.parent.mkdir(parents=True, exist_ok=True)
    paths = []
    for kind in formats:
        path = stem.with_name(f"{stem.name}.{kind}")
        if kind == "png":
            write_with(path, lambda p: p.write_bytes(data))
        elif kind == "svg":
            width, height = image.size
            encoded = base64.b64encode(data).decode("ascii")
            text = (
                f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
                f'viewBox="0 0 {width} {height}"><image width="{width}" height="{height}" '
                f'href="data:image/png;base64,{encoded}"/></svg>\n'
            )
            write_with(path, lambda p, t=text: p.write_text(t, encoding="utf-8"))
        else:
            raise ValueError(f"unknown picture format {kind!r}; expected 'png' or 'svg'")
        paths.append(path)
    return paths
