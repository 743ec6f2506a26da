"""Field pictures as a reader meets them: no text over other text on flat and tall sections,
the part large in its picture, GIF frames without colour bands, and the whole part a
symmetric model stands for (its copies counted, its picture mirrored).

Text boxes come from the renderers that draw them: matplotlib's window extents for the still
text, Pillow's text box for the per-frame stamp.
"""

from __future__ import annotations

import textwrap
from pathlib import Path
from types import SimpleNamespace

import numpy as np
import pytest
from PIL import Image

from advisor.casefile import CaseError
from advisor.casefile.case import case_from_toml
from advisor.writers import animation
from advisor.writers.field_plots import snapshot_canvas
from advisor.writers.raster_picture import colour_levels, draw_stamp
from geometries import Rectangle


def fake_run(
    width: float, height: float, size: float, times=(0.0, 30.0, 60.0, 90.0, 120.0), shift=3.0
):
    """A run-like object over a width × height (m) rectangle whose fields rise linearly in x
    (a ramp of 100 K, lowered by ``shift`` K each output), for pictures alone."""
    section = Rectangle(width, height).mesh(size)
    x, y = section.vertices
    fields = [400.0 - shift * k + 100.0 * x / width + 0.0 * y for k in range(len(times))]
    solution = SimpleNamespace(
        model=SimpleNamespace(section=section),
        fields=fields,
        output_times=np.asarray(times, dtype=float),
    )
    return SimpleNamespace(solution=solution, peak_internal_difference_time=60.0)


def overlapping(boxes) -> list:
    """Pairs of (left, top, right, bottom) boxes that share any area."""
    found = []
    for i, a in enumerate(boxes):
        for b in boxes[i + 1 :]:
            if min(a[2], b[2]) > max(a[0], b[0]) and min(a[3], b[3]) > max(a[1], b[1]):
                found.append((a, b))
    return found


def within(box, width: int, height: int) -> bool:
    return box[0] >= 0 and box[1] >= 0 and box[2] <= width and box[3] <= height


FLAT = (0.060, 0.002, 0.0005)  # a 60 × 2 mm strip (width, height, mesh size in m)
TALL = (0.005, 0.080, 0.001)  # a 5 × 80 mm fin


@pytest.mark.parametrize("shape", [FLAT, TALL], ids=["flat", "tall"])
def test_snapshots_of_flat_and_tall_sections_keep_text_apart_and_the_part_large(shape):
    run = fake_run(*shape)
    canvas, picture = snapshot_canvas(run)
    layout = canvas.layout
    height, width = picture.shape
    assert not overlapping(canvas.text_boxes)
    assert all(within(b, width, height) for b in canvas.text_boxes)
    parts = [panel.part for panel in layout.panels]
    # the part's long side spans most of the picture's matching side (common practice for a
    # figure about the part: the part, not the margins, takes the space)
    if shape is FLAT:
        assert min(p.width for p in parts) >= 0.8 * width
    else:
        assert min(p.height for p in parts) >= 0.7 * height
    # colour bars are sized to the panel, not to a thin part
    assert min(panel.bar.width for panel in layout.panels) >= 280
    for box in canvas.text_boxes:  # no text over a part
        for part in parts:
            assert overlapping([box, (part.left, part.top, part.right, part.bottom)]) == []


@pytest.mark.parametrize("shape", [FLAT, TALL], ids=["flat", "tall"])
def test_an_animation_frame_keeps_its_stamp_apart_from_every_other_text(shape):
    run = fake_run(*shape)
    canvas = animation.film_canvas(run.solution)
    frame = canvas.frame([np.zeros(len(m.pixels), np.uint8) for m, _, _ in canvas.panels], [0, 1])
    longest = "t = 10 h 59 min of 11 h 00 min   ·   coldest -123.4 °C, hottest 1234 °C, ΔT 1357 K"
    stamp = draw_stamp(frame, canvas, canvas.layout.stamp, longest)
    boxes = [*canvas.text_boxes, stamp]
    height, width = frame.shape
    assert not overlapping(boxes)
    assert all(within(b, width, height) for b in boxes)
    assert stamp[2] <= canvas.layout.stamp.right  # the stamp fits its line


def test_gif_frames_show_a_ramp_without_bands(tmp_path):
    # The field rises linearly across the strip. On the run's colour scale (420 K) the frame
    # spans about a quarter of the map's levels, where levels rounded to the nearest show
    # flat bands; ordered dithering between neighbouring exact levels must instead average to
    # the ramp, and neighbouring pixels may differ by at most one level.
    run = fake_run(0.040, 0.010, 0.001, shift=80.0)
    gif = tmp_path / "ramp.gif"
    animation.write_animation(run.solution, gif)
    canvas = animation.film_canvas(run.solution)
    part = canvas.layout.panels[0].part
    count = canvas.palette.levels
    lookup = {tuple(c): k for k, c in enumerate(colour_levels("cividis", count))}
    with Image.open(gif) as image:
        image.seek(2)
        rgb = np.asarray(image.convert("RGB"))
    rows = slice(part.top + part.height // 3, part.top + 2 * part.height // 3)
    inner = rgb[rows, part.left + 6 : part.right - 6]
    level = np.array([[lookup.get(tuple(p), -1) for p in row] for row in inner])
    assert (level >= 0).mean() > 0.99, "panel pixels are exact colour levels of the map"
    level = np.where(level < 0, np.nan, level)
    steps = np.abs(np.diff(level, axis=1))
    assert np.nanmax(steps) <= 1, "a jump of more than one level is a band edge"
    # expected level at each column from the exact ramp: field = 240 + 100·x/width (the
    # third output) on the scale of the run (80 to 500 °C)
    fields = run.solution.fields
    low = min(f.min() for f in fields)
    high = max(f.max() for f in fields)
    pixel_map = canvas.panels[0][0]
    x_min, x_max = pixel_map.extent[:2]
    columns = np.arange(part.left + 6, part.right - 6) - part.left
    x = x_min + (columns + 0.5) * (x_max - x_min) / pixel_map.shape[1]
    expected = (240.0 + 100.0 * x / 0.040 - low) / (high - low) * (count - 1)
    # averaged over 4 × 4 dither cells the levels follow the ramp to a tenth of a level plus
    # the ramp's rise over the cell (16 thresholds average to within 1/32 of a level); the
    # nearest level without dithering is off by up to half a level, in bands
    block = 4
    usable = (level.shape[1] // block) * block
    averaged = np.nanmean(level[: (level.shape[0] // block) * block, :usable], axis=0)
    averaged = averaged.reshape(-1, block).mean(axis=1)
    target = expected[:usable].reshape(-1, block).mean(axis=1)
    rise = (count - 1) * 100.0 / (high - low) * (block * (x_max - x_min) / pixel_map.shape[1])
    rise /= 0.040
    assert rise < 0.2
    assert np.max(np.abs(averaged - target)) <= 0.1 + rise


QUARTER = """
title = "quarter bar"
[section]
mesh_size = "2 mm"
{mirrors}
[[section.shape]]
kind = "rectangle"
width = "30 mm"
height = "20 mm"
edges = {{ left = "symmetry", bottom = "symmetry", right = "cooled", top = "cooled" }}
[material]
conductivity = "40 W/(m*K)"
density = "7800 kg/m^3"
specific_heat = "460 J/(kg*K)"
[boundaries.symmetry]
insulated = "symmetry"
[boundaries.cooled]
convection = {{ coefficient = "200 W/(m^2*K)", ambient = "20 degC" }}
[initial]
temperature = "500 degC"
[run]
end_time = "2 min"
time_step = "10 s"
"""


def quarter_case(mirrors: str, tmp_path: Path):
    text = textwrap.dedent(QUARTER).format(mirrors=mirrors)
    return case_from_toml(text, tmp_path / "quarter.toml")


def test_declared_mirror_lines_count_the_copies_and_scale_the_whole_part(tmp_path):
    bare = quarter_case("", tmp_path).model().section.facts
    case = quarter_case('mirror_lines = ["x = 0 mm", "y = 0 mm"]', tmp_path)
    facts = case.model().section.facts
    assert bare.symmetry_multiplier == 1 and facts.symmetry_multiplier == 4
    # the whole bar is 60 × 40 mm: its volume per metre of depth, computed here
    assert facts.part_volume == pytest.approx(0.060 * 0.040, rel=1e-12)
    assert facts.volume == pytest.approx(bare.volume, rel=1e-12)
    mirrors = case.whole_part(case.model().section)
    assert [m.normal for m in mirrors] == [(1.0, 0.0), (0.0, 1.0)]


def test_the_whole_quarter_bar_is_drawn_mirrored(tmp_path):
    from advisor.pipeline import run_case

    results = run_case(quarter_case('mirror_lines = ["x = 0 mm", "y = 0 mm"]', tmp_path))
    assert len(results.mirrors) == 2
    canvas, picture = snapshot_canvas(results.assessment, results.mirrors)
    pixel_map = canvas.panels[0][0]
    x_min, x_max, y_min, y_max = pixel_map.extent
    assert x_min < -0.029 and x_max > 0.029 and y_min < -0.019 and y_max > 0.019
    inside = pixel_map.inside()
    np.testing.assert_array_equal(inside, inside[:, ::-1])
    np.testing.assert_array_equal(inside, inside[::-1, :])


@pytest.mark.parametrize(
    "line, words",
    [
        ('mirror_lines = ["x = 10 mm"]', "both sides of the mirror line"),
        ('mirror_lines = ["q = 0 mm"]', "is not a line"),
        ('mirror_lines = ["x = 0 kg"]', "length"),
        ('mirror_lines = "x = 0 mm"', "expected a list"),
    ],
)
def test_bad_mirror_lines_name_the_key_and_line(line, words, tmp_path):
    with pytest.raises(CaseError, match=words) as caught:
        case = quarter_case(line, tmp_path)
        case.whole_part(case.model().section)
    message = str(caught.value)
    assert "mirror_lines" in message and "quarter.toml" in message
    if "both sides" not in words:
        assert "line 5" in message


def test_an_axisymmetric_section_takes_only_lines_across_its_axis(tmp_path):
    text = textwrap.dedent(QUARTER).format(mirrors='mirror_lines = ["r = 0 mm"]')
    text = text.replace('mesh_size = "2 mm"', 'axisymmetric = true\nmesh_size = "2 mm"')
    with pytest.raises(CaseError, match="whole about its axis"):
        case_from_toml(text, tmp_path / "round.toml")


def test_writers_side_by_side_give_the_same_files_and_pass_errors_on(tmp_path, monkeypatch):
    import advisor.writers.pictures as pictures
    import advisor.writers.side_by_side as writers_together
    from advisor.pipeline import run_case, write_results

    if not __import__("sys").platform.startswith("linux"):
        pytest.skip("the writers fork only on Linux; elsewhere they run one after the other")
    results = run_case(quarter_case("", tmp_path))
    monkeypatch.setattr(writers_together, "cores_free", lambda: True)
    forked = write_results(results, tmp_path / "forked", report=False, vtk=False)
    monkeypatch.setattr(writers_together, "cores_free", lambda: False)
    alone = write_results(results, tmp_path / "alone", report=False, vtk=False)
    assert forked == alone and Path("plots/histories.png") in forked
    for name in forked:
        assert (tmp_path / "forked" / name).stat().st_size > 0

    def broken(*args, **kwargs):
        raise RuntimeError("drawing failed")

    monkeypatch.setattr(writers_together, "cores_free", lambda: True)
    monkeypatch.setattr(pictures, "write_line_plots", broken)
    with pytest.raises(RuntimeError, match="drawing failed"):
        write_results(results, tmp_path / "broken", report=False, vtk=False)
    assert not (tmp_path / "broken").exists()


@pytest.mark.parametrize(
    ("load", "others", "free"),
    [(0.2, 3, True), (1.9, 0, True), (1.9, 1, False), (8.0, 5, False)],
)
def test_a_second_process_is_started_only_when_a_core_is_free(load, others, free, monkeypatch):
    import advisor.writers.side_by_side as writers_together

    monkeypatch.setattr(writers_together.sys, "platform", "linux")
    monkeypatch.setattr(writers_together.os, "cpu_count", lambda: 2)
    monkeypatch.setattr(writers_together.os, "getloadavg", lambda: (load, load, load))
    monkeypatch.setattr(writers_together, "_others_running", lambda: others)
    assert writers_together.cores_free() is free
    monkeypatch.setattr(writers_together.os, "cpu_count", lambda: 1)
    assert writers_together.cores_free() is False  # one core: nothing runs beside


def test_a_warm_writer_gives_the_same_files_ends_with_its_block_and_passes_errors_on(
    tmp_path, monkeypatch
):
    import multiprocessing

    import advisor.writers.pictures as pictures
    import advisor.writers.side_by_side as writers_together
    from advisor.pipeline import run_case, write_results

    if not __import__("sys").platform.startswith("linux"):
        pytest.skip("the writers fork only on Linux; elsewhere they run one after the other")
    results = run_case(quarter_case("", tmp_path))
    monkeypatch.setattr(writers_together, "cores_free", lambda: False)
    alone = write_results(results, tmp_path / "alone", report=True, vtk=False)
    monkeypatch.setattr(writers_together, "cores_free", lambda: True)
    with writers_together.warm_writer(writers_together.load_plotting) as warm:
        assert warm is not None and warm.alive()
        warmed = write_results(results, tmp_path / "warm", report=True, vtk=False)
        assert not warm.alive()  # one task each: a second write forks afresh
        again = write_results(results, tmp_path / "again", report=True, vtk=False)
    assert multiprocessing.active_children() == []  # the block ended the process
    assert warmed == alone == again and Path("plots/field_snapshots.png") in warmed
    for name in alone:  # the same pictures: pixels drawn by the same code in either process
        if name.suffix == ".png":
            first = np.asarray(Image.open(tmp_path / "alone" / name))
            assert np.array_equal(first, np.asarray(Image.open(tmp_path / "warm" / name)))

    def broken(*args, **kwargs):
        raise RuntimeError("the animation failed")

    monkeypatch.setattr(pictures, "write_animation", broken)  # before the fork
    with writers_together.warm_writer(lambda: None), pytest.raises(RuntimeError, match="anim"):
        write_results(results, tmp_path / "broken", report=False, vtk=False)
    assert not (tmp_path / "broken").exists()
    assert multiprocessing.active_children() == []


def test_a_writer_process_that_has_gone_leaves_its_task_to_run_here():
    import sys

    import advisor.writers.side_by_side as writers_together

    if not sys.platform.startswith("linux"):
        pytest.skip("the writers fork only on Linux; elsewhere they run one after the other")
    writer = writers_together.WarmWriter(warm=None)
    writer._process.terminate()  # as if it had been killed while loading
    writer._process.join()
    try:
        there, here = writer.run(sum, ([1, 2, 3],), lambda: "here")
    finally:
        writer.close()
    assert (there, here) == (6, "here")


def test_a_run_with_a_warm_writer_loads_no_plotting_in_its_own_process(tmp_path):
    import subprocess
    import sys

    if not sys.platform.startswith("linux"):
        pytest.skip("the writers fork only on Linux; elsewhere they run one after the other")
    case = tmp_path / "quarter.toml"
    case.write_text(textwrap.dedent(QUARTER).format(mirrors=""), encoding="utf-8")
    out = tmp_path / "out"
    script = textwrap.dedent(
        f"""
        import sys
        import advisor.writers.side_by_side as writers
        writers.cores_free = lambda: True  # the writer process whatever the machine's load
        from advisor.cli import main
        status = main(["-q", "run", {str(case)!r}, "--out", {str(out)!r}])
        print(status, *(name in sys.modules for name in ("matplotlib", "PIL")))
        """
    )
    root = Path(__file__).resolve().parent.parent  # this checkout, not an installed copy
    done = subprocess.run(
        [sys.executable, "-c", script], cwd=root, capture_output=True, text=True, timeout=300
    )
    assert done.stdout.split() == ["0", "False", "False"], done.stderr[-2000:]
    for name in ("plots/histories.png", "plots/field_snapshots.png", "animation.gif"):
        assert (out / name).stat().st_size > 0
    report = (out / "report.html").read_text(encoding="utf-8")
    assert report.count("data:image/png;base64,") >= 5  # the plots embedded after drawing


def test_the_outputs_table_switches_plots_svg_and_mp4(tmp_path):
    from advisor.pipeline import run_case, write_results

    text = textwrap.dedent(QUARTER).format(mirrors="")
    text += "[outputs]\nplots = true\nsvg = true\nanimation = false\nvtk = false\nreport = false\n"
    results = run_case(case_from_toml(text, tmp_path / "quarter.toml"))
    files = {f.as_posix() for f in write_results(results, tmp_path / "with-svg")}
    assert {"plots/histories.png", "plots/histories.svg", "plots/field_snapshots.svg"} <= files
    assert not any(f.startswith(("fields/", "animation", "report")) for f in files)
    off = text.replace("plots = true", "plots = false")
    results = run_case(case_from_toml(off, tmp_path / "quarter.toml"))
    files = {f.as_posix() for f in write_results(results, tmp_path / "no-plots")}
    assert files == {"summary.json", "histories.csv", ".soakwise-results"}
    with pytest.raises(CaseError, match="outputs"):
        case_from_toml(text + "mp4 = 3\n", tmp_path / "quarter.toml")


def test_a_fast_event_between_outputs_is_still_pictured():
    """A 2 mm plate quenched hard peaks within seconds, long before the first of 50 outputs
    over 10 minutes: the run keeps the field of its largest internal difference, the same
    difference and time its histories show, and the snapshots draw it."""
    from advisor.writers.field_plots import _with_peak
    from fem import Convection, Material, ThermalModel, solve

    plate = Rectangle(0.06, 0.002).mesh(0.0005)
    oil = Convection(heat_transfer_coefficient=2000.0, ambient=60.0)
    model = ThermalModel(
        plate,
        Material(40.0, 7850.0, 520.0),
        {side: oil for side in ("left", "right", "top", "bottom")},
        initial_temperature=850.0,
    )
    solution = solve(model, end_time=600.0, output_interval=12.0)
    spread = solution.maximum - solution.minimum
    peak = int(np.argmax(spread))
    assert solution.peak_field_time == solution.times[peak] < solution.output_times[1]
    assert np.ptp(solution.peak_field) == pytest.approx(spread[peak], rel=1e-12)
    fields = [np.asarray(solution.fields[i]) for i in (1, 10, 20, 50)]
    times = [float(solution.output_times[i]) for i in (1, 10, 20, 50)]
    before = max(np.ptp(f) for f in fields)
    _with_peak(solution, fields, times)
    assert times[0] == solution.peak_field_time and np.ptp(fields[0]) > 2 * before
