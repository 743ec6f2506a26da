"""The field as an animation: a GIF through Pillow and, with the ``mp4`` extra
(imageio-ffmpeg), an MP4.

Every frame shares one colour scale (the lowest and highest temperature of all output fields),
carries its time stamp and the colour bar, and marks the hottest and coldest vertex. At most
:data:`MAX_FRAMES` frames are drawn, spread evenly over the output times, whatever their
number; the clip lasts a few seconds.
"""

from __future__ import annotations

import importlib.util
from collections.abc import Iterator
from pathlib import Path

import numpy as np
from matplotlib.figure import Figure
from matplotlib.tri import Triangulation
from PIL import Image

from fem import Solution

from .atomic import write_with
from .field_plots import axis_names, draw_outline, section_triangulation
from .plot_style import COOL, FIELD_MAP, INK, WARM, clock, new_figure

MAX_FRAMES = 60
CLIP_SECONDS = 6.0  # how long the whole clip plays
FRAME_SIZE = (768, 576)  # pixels; multiples of 16 as MP4 encoders want
PALETTE_COLOURS = 255


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


def render_frames(solution: Solution, max_frames: int = MAX_FRAMES) -> Iterator[np.ndarray]:
    """RGB frames (height, width, 3) of uint8, one per :func:`frame_indices` output.

    The figure is drawn once without the field, the outline, the markers and the time stamp;
    each frame restores that background and draws only those on it, so the layout and the
    colour scale stay put and a frame costs a fraction of a full draw.
    """
    fields = solution.fields
    indices = frame_indices(len(fields), max_frames)
    if not indices:
        return
    low = min(float(np.min(fields[i])) for i in range(len(fields)))
    high = max(float(np.max(fields[i])) for i in range(len(fields)))
    high = max(high, low + 1e-9 * max(abs(low), 1.0))

    width, height = FRAME_SIZE
    figure = new_figure(width / 120, height / 120)
    axes = figure.subplots()
    triangulation = section_triangulation(solution)
    xs, ys = triangulation.x, triangulation.y
    first = np.asarray(fields[indices[0]], dtype=float)
    image, outline, hot, cold, stamp = _frame_artists(
        figure, axes, solution, triangulation, first, (low, high)
    )
    end = clock(float(solution.output_times[-1]))
    changing = (image, outline, hot, cold, stamp)
    for artist in changing:
        artist.set_animated(True)
    canvas = figure.canvas
    canvas.draw()
    figure.set_layout_engine("none")  # the first layout holds for every frame
    background = canvas.copy_from_bbox(figure.bbox)
    for index in indices:
        field = np.asarray(fields[index], dtype=float)
        image.set_array(field)
        i_hot, i_cold = int(np.argmax(field)), int(np.argmin(field))
        hot.set_data([xs[i_hot]], [ys[i_hot]])
        cold.set_data([xs[i_cold]], [ys[i_cold]])
        stamp.set_text(f"t = {clock(float(solution.output_times[index]))} of {end}")
        canvas.restore_region(background)
        for artist in changing:
            axes.draw_artist(artist)
        rgba = np.asarray(canvas.buffer_rgba())
        yield np.ascontiguousarray(rgba[:height, :width, :3])


def _frame_artists(
    figure: Figure,
    axes,
    solution: Solution,
    triangulation: Triangulation,
    first: np.ndarray,
    scale: tuple[float, float],
) -> tuple:
    """Draw the frame's fixed parts (labels, colour bar, legend) and return the artists each
    frame changes: the field image on the run's colour ``scale`` (low, high) in °C, the
    outline, the hottest and coldest markers and the time stamp."""
    low, high = scale
    image = axes.tripcolor(
        triangulation,
        first,
        shading="gouraud",
        cmap=FIELD_MAP,
        vmin=low,
        vmax=high,
    )
    outline = draw_outline(axes, solution)
    (hot,) = axes.plot([], [], "^", color=WARM, mec="white", mew=0.8, ms=9, label="hottest")
    (cold,) = axes.plot([], [], "v", color=COOL, mec="white", mew=0.8, ms=9, label="coldest")
    axes.set_aspect("equal")
    x_name, y_name = axis_names(solution)
    axes.set_xlabel(x_name)
    axes.set_ylabel(y_name)
    axes.set_title("Temperature in the section", fontsize=10, loc="left")
    stamp = axes.text(
        0.99,
        1.01,
        "",
        transform=axes.transAxes,
        ha="right",
        va="bottom",
        fontsize=10,
        color=INK,
        family="monospace",
    )
    figure.colorbar(image, ax=axes, label="temperature (°C)", shrink=0.9)
    figure.legend(loc="outside lower center", ncols=2, fontsize=8, frameon=False)
    return image, outline, hot, cold, stamp


def write_gif(frames: list[np.ndarray], path: Path) -> None:
    """Write RGB ``frames`` as a looping GIF on one shared palette (no flicker between
    frames), atomically."""
    if not frames:
        raise ValueError("an animation needs at least one frame")
    pictures = [Image.fromarray(frame) for frame in frames]
    sample = np.concatenate([frames[0], frames[len(frames) // 2], frames[-1]], axis=0)
    palette = Image.fromarray(sample).quantize(colors=PALETTE_COLOURS)
    indexed = [p.quantize(palette=palette, dither=Image.Dither.NONE) for p in pictures]
    write_with(
        Path(path),
        lambda p: indexed[0].save(
            p,
            format="GIF",
            save_all=True,
            append_images=indexed[1:],
            duration=frame_duration(len(frames)),
            loop=0,
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
            writer.send(np.ascontiguousarray(frame).tobytes())
        writer.close()

    write_with(Path(path), encode)


def write_animation(
    solution: Solution,
    gif: Path | None,
    mp4: Path | None = None,
    max_frames: int = MAX_FRAMES,
) -> list[Path]:
    """Render the field once and write it as a GIF (``gif``) and/or an MP4 (``mp4``).

    Returns the written paths.
    """
    frames = list(render_frames(solution, max_frames))
    written = []
    if gif is not None:
        write_gif(frames, gif)
        written.append(Path(gif))
    if mp4 is not None:
        write_mp4(frames, mp4)
        written.append(Path(mp4))
    return written
