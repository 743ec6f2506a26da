"""The field as an animation: a GIF through Pillow and, with the ``mp4`` extra
(imageio-ffmpeg), an MP4.

Each frame has two panels of the whole part: the temperature on one colour scale for the whole
run, and beside it the same field spread over its own frame's range (coldest to hottest), so
an internal difference stays visible when the run spans hundreds of kelvin. The stamp gives
the time and the frame's coldest and hottest temperatures; both panels mark the hottest and
coldest vertex. At most :data:`MAX_FRAMES` frames, spread evenly over the output times; the
clip lasts a few seconds.

Frames are indices into one palette that holds every colour level (no quantising, no bands);
the still parts are drawn once, each frame is a gather of the field, a colour lookup and
Pillow's text and encoding (see :mod:`.raster_picture`).
"""

from __future__ import annotations

import importlib.util
from collections.abc import Iterator, Sequence
from pathlib import Path

import numpy as np

from fem import Solution

from ..whole_part import Mirror
from .atomic import write_with
from .field_plots import scene
from .plot_style import FIELD_MAP, clock
from .raster import dither_thresholds, levels
from .raster_chrome import plain_ticks, render_chrome, titled_layout, uniform_label
from .raster_picture import (
    Canvas,
    draw_marker,
    draw_stamp,
    make_canvas,
    paint_bar,
    to_pixel,
)

MAX_FRAMES = 60
CLIP_SECONDS = 6.0  # how long the whole clip plays
FRAME_LIMIT = (960, 720)  # px: the largest frame; sides are multiples of 16 (MP4 encoders)
RANGE_MAP = "inferno"  # the second panel's map, unlike the first so the two are not confused


def mp4_available() -> bool:
    """True when imageio-ffmpeg (the ``mp4`` extra) is installed, so MP4 can be written."""
    return importlib.util.find_spec("imageio_ffmpeg") is not None


def frame_indices(count: int, max_frames: int = MAX_FRAMES) -> list[int]:
    """Indices of the output fields to show: all of them up to ``max_frames``, else
    ``max_frames`` spread evenly from the first to the last."""
    if count <= 0:
        return []
    if max_frames < 2:
        raise ValueError(f"max_frames must be at least 2, got {max_frames!r}")
    return sorted({int(i) for i in np.rint(np.linspace(0, count - 1, min(count, max_frames)))})


def frame_duration(frames: int) -> int:
    """Milliseconds each of ``frames`` frames is shown for: the clip plays for about
    :data:`CLIP_SECONDS`, no frame shorter than 80 ms nor longer than 0.5 s."""
    return int(np.clip(round(1000 * CLIP_SECONDS / max(frames, 1)), 80, 500))


def film_canvas(solution: Solution, mirrors: Sequence[Mirror] = ()) -> Canvas:
    """The film's still picture: title, the two panels' captions, colour bars and lines."""
    fields = solution.fields
    low = min(float(np.min(fields[i])) for i in range(len(fields)))
    high = max(float(np.max(fields[i])) for i in range(len(fields)))
    whole = scene(solution, mirrors)
    title = f"Temperature over the run — {whole.view}"
    layout, title = titled_layout(title, whole.extent, 2, FRAME_LIMIT, True, multiple=16)
    arts = [
        whole.art(
            layout,
            0,
            "temperature (°C), one scale for the run",
            plain_ticks(low, high, layout.panels[0].bar.width),
        ),
        whole.art(
            layout,
            1,
            "within this frame: coldest to hottest",
            ((0.0, "coldest"), (1.0, "hottest")),
        ),
    ]
    shared = whole.pixel_map(layout, 0)  # the panels' part boxes are the same size
    maps = [shared, shared]
    chrome, boxes = render_chrome(layout, title, arts)
    canvas = make_canvas(layout, chrome, [FIELD_MAP, RANGE_MAP], maps, boxes)
    paint_bar(canvas, layout.panels[0].bar, 0)
    paint_bar(canvas, layout.panels[1].bar, 1)
    canvas.scale = (low, high)
    return canvas


def render_frames(
    solution: Solution, max_frames: int = MAX_FRAMES, mirrors: Sequence[Mirror] = ()
) -> Iterator[np.ndarray]:
    """Index frames (height, width) of uint8 into the film's palette, one per
    :func:`frame_indices` output; the first item yielded is the :class:`Canvas`."""
    fields = solution.fields
    indices = frame_indices(len(fields), max_frames)
    if not indices:
        return
    canvas = film_canvas(solution, mirrors)
    yield canvas
    low, high = canvas.scale
    end = clock(float(solution.output_times[-1]))
    x, y = solution.model.section.vertices
    thresholds = dither_thresholds(canvas.panels[0][0])
    for index in indices:
        field = np.asarray(fields[index], dtype=float)
        coldest, hottest = float(field.min()), float(field.max())
        values = canvas.panels[0][0].values(field)
        uniform = uniform_label(coldest, hottest)
        # a uniform frame takes the scale's first level on its own panel: no gradient to show
        spread = (coldest, coldest) if uniform else (coldest, hottest)
        count = canvas.palette.levels
        shown = [
            levels(values, low, high, count, thresholds),
            levels(values, *spread, count, thresholds),
        ]
        picture = canvas.frame(shown, [0, 1])
        when = f"t = {clock(float(solution.output_times[index]))} of {end}"
        if uniform:
            text = f"{when}   ·   {uniform}"
        else:
            text = (
                f"{when}   ·   coldest {coldest:.4g} °C, hottest {hottest:.4g} °C, "
                f"ΔT {hottest - coldest:.3g} K"
            )
        draw_stamp(picture, canvas, canvas.layout.stamp, text)
        if not uniform:
            i_hot, i_cold = int(np.argmax(field)), int(np.argmin(field))
            for panel in (0, 1):
                draw_marker(picture, canvas, *to_pixel(canvas, panel, x[i_hot], y[i_hot]), True)
                draw_marker(picture, canvas, *to_pixel(canvas, panel, x[i_cold], y[i_cold]), False)
        yield picture


def write_gif(frames: list[np.ndarray], canvas: Canvas, path: Path) -> None:
    """Write index ``frames`` as a looping GIF on the film's palette (every colour level
    exact: nothing is quantised), atomically."""
    from .raster_picture import image_of

    if not frames:
        raise ValueError("an animation needs at least one frame")
    pictures = [image_of(frame, canvas.palette) for frame in frames]
    write_with(
        Path(path),
        lambda p: pictures[0].save(
            p,
            format="GIF",
            save_all=True,
            append_images=pictures[1:],
            duration=frame_duration(len(frames)),
            loop=0,
            optimize=False,
        ),
    )


def write_mp4(frames: list[np.ndarray], path: Path) -> None:
    """Write RGB ``frames`` as an H.264 MP4 through imageio-ffmpeg, atomically.

    Raises
    ------
    ModuleNotFoundError
        If imageio-ffmpeg (the ``mp4`` extra) is not installed.
    """
    import imageio_ffmpeg

    if not frames:
        raise ValueError("an animation needs at least one frame")
    height, width = frames[0].shape[:2]
    fps = 1000.0 / frame_duration(len(frames))

    def encode(target: Path) -> None:
        writer = imageio_ffmpeg.write_frames(
            str(target),
            (width, height),
            fps=fps,
            codec="libx264",
            pix_fmt_in="rgb24",
            pix_fmt_out="yuv420p",
            macro_block_size=16,
            ffmpeg_log_level="quiet",  # the library does not talk to the terminal
            output_params=["-f", "mp4", "-movflags", "+faststart"],
        )
        writer.send(None)
        for frame in frames:
            writer.send(np.ascontiguousarray(frame).tobytes())  # RGB
        writer.close()

    write_with(Path(path), encode)


def write_animation(
    solution: Solution,
    gif: Path | None,
    mp4: Path | None = None,
    max_frames: int = MAX_FRAMES,
    mirrors: Sequence[Mirror] = (),
) -> list[Path]:
    """Render the field once and write it as a GIF (``gif``) and/or an MP4 (``mp4``),
    the whole part unfolded across ``mirrors``.

    Returns the written paths.
    """
    rendered = render_frames(solution, max_frames, mirrors)
    canvas = next(rendered, None)
    if canvas is None:
        raise ValueError("an animation needs at least one output field")
    frames = list(rendered)
    written = []
    if gif is not None:
        write_gif(frames, canvas, gif)
        written.append(Path(gif))
    if mp4 is not None:
        colours = canvas.palette.colours
        write_mp4([colours[frame] for frame in frames], mp4)
        written.append(Path(mp4))
    return written
