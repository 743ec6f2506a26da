"""A field picture made of indices into one palette: colour maps with a fixed number of
levels, the still parts drawn once (:mod:`.raster_chrome`), and per frame only the gathered
field, the time stamp (Pillow text) and the extreme markers.

The palette holds every colour level of the maps exactly, so a GIF needs no quantising (no
bands that look like isotherms) and PNG and MP4 frames are the same pixels looked up.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np

from .plot_style import COOL, INK, WARM
from .raster import PixelMap
from .raster_chrome import DPI, FONT
from .raster_layout import Box, Layout

RAMP = 8  # shades from white to ink for the per-frame text
CHROME = 24  # palette entries for the colours of the still parts (text shading, lines)
WHITE = "#ffffff"


def _rgb(colour: str) -> np.ndarray:
    return np.array([int(colour[i : i + 2], 16) for i in (1, 3, 5)], dtype=np.uint8)


def map_levels(maps: int) -> int:
    """Colour levels each of ``maps`` colour maps gets: the palette's 256 entries less the
    fixed colours and the still parts' (one map 220 levels, two 110)."""
    return (256 - 4 - RAMP - CHROME) // maps


def colour_levels(name: str, count: int) -> np.ndarray:
    """``count`` colours (count, 3) uint8 evenly along matplotlib's colour map ``name``."""
    from matplotlib import colormaps

    return np.round(colormaps[name](np.linspace(0.0, 1.0, count))[:, :3] * 255).astype(np.uint8)


@dataclass(frozen=True)
class Palette:
    """256 colours: the maps' levels first, then white, ink, warm, cool, the white-to-ink
    ramp and the colours of the still parts."""

    colours: np.ndarray  # (256, 3) uint8
    offsets: tuple[int, ...]  # where each map's levels start
    levels: int  # levels per map

    @property
    def white(self) -> int:
        return self.levels * len(self.offsets)

    @property
    def ink(self) -> int:
        return self.white + 1

    @property
    def warm(self) -> int:
        return self.white + 2

    @property
    def cool(self) -> int:
        return self.white + 3

    def ramp(self) -> np.ndarray:
        """Indices of the shades from white (0) to ink (RAMP − 1)."""
        return self.white + 4 + np.arange(RAMP)


def build_palette(maps: list[str], chrome_rgb: np.ndarray) -> Palette:
    """The palette for ``maps`` and the colours ``chrome_rgb`` (n, 3) uint8 of what the still
    picture draws."""
    from PIL import Image

    count = map_levels(len(maps))
    fixed = [colour_levels(name, count) for name in maps]
    white, ink = _rgb(WHITE).astype(float), _rgb(INK).astype(float)
    shades = np.round(white + np.linspace(0, 1, RAMP)[:, None] * (ink - white)).astype(np.uint8)
    fixed += [np.array([_rgb(WHITE), _rgb(INK), _rgb(WARM), _rgb(COOL)]), shades]
    head = np.concatenate(fixed)
    spare = 256 - len(head)
    drawn = np.ascontiguousarray(chrome_rgb.reshape(1, -1, 3)) if len(chrome_rgb) else head[None]
    quantised = Image.fromarray(drawn).quantize(spare, method=Image.Quantize.MEDIANCUT)
    rest = np.array(quantised.getpalette()[: 3 * spare], dtype=np.uint8).reshape(-1, 3)
    rest = np.vstack([rest, np.zeros((spare - len(rest), 3), np.uint8)])
    offsets = tuple(count * k for k in range(len(maps)))
    return Palette(np.vstack([head, rest]), offsets, count)


def to_indices(rgb: np.ndarray, palette: Palette) -> np.ndarray:
    """Each colour of ``rgb`` (..., 3) as the index of the nearest palette colour (exactly:
    each distinct colour is matched once)."""
    packed = (rgb[..., 0].astype(np.int32) << 16) | (rgb[..., 1].astype(np.int32) << 8)
    packed |= rgb[..., 2].astype(np.int32)
    distinct, inverse = np.unique(packed.ravel(), return_inverse=True)
    colours = np.column_stack([(distinct >> 16) & 255, (distinct >> 8) & 255, distinct & 255])
    entries = palette.colours.astype(np.int32)
    nearest = np.empty(len(colours), dtype=np.uint8)
    for start in range(0, len(colours), 4096):  # bounded memory for many antialiased shades
        block = colours[start : start + 4096, None, :] - entries[None, :, :]
        nearest[start : start + 4096] = np.argmin((block * block).sum(axis=2), axis=1)
    return nearest[inverse].reshape(rgb.shape[:-1])


@dataclass
class Canvas:
    """A picture ready for frames: the still picture as indices, where the field may show
    (not under a line or text), each panel's pixel map and its positions in the picture."""

    layout: Layout
    palette: Palette
    still: np.ndarray  # (h, w) uint8
    panels: list[tuple[PixelMap, np.ndarray, np.ndarray]]  # map, which of its pixels, where
    text_boxes: list
    scale: tuple[float, float] = (0.0, 0.0)  # °C: a film's one colour scale

    def frame(self, panel_levels: list[np.ndarray], maps: list[int]) -> np.ndarray:
        """Indices of a frame: the panels' colour ``panel_levels`` (one per mapped pixel, on
        map ``maps[k]``) over the still picture."""
        picture = self.still.copy()
        flat = picture.reshape(-1)
        for (_, chosen, where), values, which in zip(self.panels, panel_levels, maps, strict=True):
            flat[where] = values[chosen] + self.palette.offsets[which]
        return picture


def make_canvas(layout: Layout, chrome_rgba: np.ndarray, maps: list[str], pixel_maps, boxes):
    """A :class:`Canvas` from the still drawing, the colour ``maps`` used and each panel's
    pixel map; the colour bars are painted with the panel's map levels."""
    drawn = chrome_rgba[..., 3] > 0
    colour = chrome_rgba[drawn].astype(np.uint32)
    alpha = colour[:, 3:4]
    over_white = ((colour[:, :3] * alpha + 255 * (255 - alpha) + 127) // 255).astype(np.uint8)
    palette = build_palette(maps, over_white)
    still = np.full(drawn.shape, palette.white, dtype=np.uint8)
    still[drawn] = to_indices(over_white, palette)
    clear = chrome_rgba[..., 3] < 128
    panels = []
    for panel_boxes, pixel_map in zip(layout.panels, pixel_maps, strict=True):
        part = panel_boxes.part
        rows, columns = np.divmod(pixel_map.pixels, pixel_map.shape[1])
        where = (part.top + rows) * layout.width + part.left + columns
        chosen = np.flatnonzero(clear.reshape(-1)[where])
        panels.append((pixel_map, chosen, where[chosen]))
    return Canvas(layout, palette, still, panels, boxes)


def paint_bar(canvas: Canvas, bar: Box, which: int) -> None:
    """Fill the inside of colour bar ``bar`` with map ``which``'s levels, left to right."""
    inner = canvas.still[bar.top + 1 : bar.bottom - 1, bar.left + 1 : bar.right - 1]
    columns = inner.shape[1]
    levels = (np.arange(columns) * canvas.palette.levels // max(columns, 1)).astype(np.uint8)
    inner[:, :] = levels[None, :] + canvas.palette.offsets[which]


def font(size: float):
    """DejaVu Sans (matplotlib's own font file) at ``size`` points, for Pillow."""
    import matplotlib
    from PIL import ImageFont

    path = Path(matplotlib.get_data_path()) / "fonts" / "ttf" / "DejaVuSans.ttf"
    return ImageFont.truetype(str(path), size=round(size * DPI / 72))


def stamp_fit(text: str, box: Box):
    """The largest font (from the stamp's size down) at which ``text`` fits ``box``'s width,
    with the text's box (left, top, right, bottom) px relative to the box."""
    size = FONT["stamp"]
    while True:
        face = font(size)
        bounds = face.getbbox(text)
        if bounds[2] <= box.width or size <= 6:
            return face, bounds
        size -= 0.5


def draw_stamp(picture: np.ndarray, canvas: Canvas, box: Box, text: str) -> tuple:
    """Write ``text`` into ``box`` of the index ``picture`` in ink shades; return the text's
    box (left, top, right, bottom) in px."""
    from PIL import Image, ImageDraw

    face, bounds = stamp_fit(text, box)
    mask = Image.new("L", (box.width, box.height), 0)
    top = (box.height - (bounds[3] - bounds[1])) // 2 - bounds[1]
    ImageDraw.Draw(mask).text((0, top), text, fill=255, font=face)
    shade = (np.asarray(mask, dtype=np.int32) * (RAMP - 1) + 127) // 255
    region = picture[box.top : box.bottom, box.left : box.right]
    region[:, :] = canvas.palette.ramp()[shade]
    return (
        box.left + bounds[0],
        box.top + top + bounds[1],
        box.left + bounds[2],
        box.top + top + bounds[3],
    )


def draw_marker(picture: np.ndarray, canvas: Canvas, x: float, y: float, up: bool) -> None:
    """A triangle (▲ hottest in warm, ▼ coldest in cool) centred on pixel (x, y), drawn on
    the small patch of ``picture`` it covers."""
    from PIL import ImageDraw

    r = 6
    top, left = max(int(y) - r - 2, 0), max(int(x) - r - 2, 0)
    patch = picture[top : int(y) + r + 3, left : int(x) + r + 3]
    if patch.size == 0:
        return
    image = _indexed(patch)
    cx, cy = x - left, y - top
    points = (
        [(cx, cy - r), (cx - r, cy + r * 0.7), (cx + r, cy + r * 0.7)]
        if up
        else [(cx, cy + r), (cx - r, cy - r * 0.7), (cx + r, cy - r * 0.7)]
    )
    fill = canvas.palette.warm if up else canvas.palette.cool
    ImageDraw.Draw(image).polygon(points, fill=fill, outline=canvas.palette.white)
    patch[:, :] = np.array(image)


def to_pixel(canvas: Canvas, panel: int, x: float, y: float) -> tuple[float, float]:
    """Picture pixel of the point (x, y) m in ``panel``."""
    pixel_map = canvas.panels[panel][0]
    part = canvas.layout.panels[panel].part
    x_min, x_max, y_min, y_max = pixel_map.extent
    rows, columns = pixel_map.shape
    return (
        part.left + (x - x_min) / (x_max - x_min) * columns,
        part.top + (y_max - y) / (y_max - y_min) * rows,
    )


def image_of(picture: np.ndarray, palette: Palette):
    """A Pillow palette image of the index ``picture``."""

    image = _indexed(picture)
    image.putpalette(palette.colours.ravel().tolist())
    return image


def _indexed(picture: np.ndarray):
    """A Pillow "P" image holding the (h, w) uint8 indices of ``picture``."""
    from PIL import Image

    height, width = picture.shape
    return Image.frombytes("P", (width, height), np.ascontiguousarray(picture).tobytes())
