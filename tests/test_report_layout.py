"""report.html at a desk and on a phone: headless Chromium lays the page out 1280 px and 420 px
wide, and the page's own geometry (read with the browser's DOM measurements) says whether a
table pokes out of its container, whether the page scrolls sideways, and whether the verdict
is on screen and readable (its two columns stacked below 600 px).

Chromium's headless window is at least 500 px wide, so the page is laid out in an iframe of
the width under test inside a host page; the host reads the iframe's DOM (file:// access
allowed for this run only) and writes its measurements as JSON into its own DOM, which
``--dump-dom`` prints. Screenshots at both widths are kept in the test's temporary folder.
The tests skip only when no Chromium or Chrome is on the machine.
"""

from __future__ import annotations

import json
import re
import shutil
import subprocess
from pathlib import Path

import pytest
from PIL import Image, ImageStat
from test_writers import coated_strip

from advisor import assess, write_results
from fem import solve

BROWSERS = ("chromium", "chromium-browser", "google-chrome", "google-chrome-stable")
HEIGHT = 2400  # px of the iframe: the verdict and the first tables

MEASURE = """
<script>
const frame = document.getElementById('page');
frame.onload = () => {
  const d = frame.contentDocument, w = frame.contentWindow;
  const width = d.documentElement.clientWidth;
  const tables = [...d.querySelectorAll('table')].map(t => {
    const box = t.closest('.scroll');
    const r = box ? box.getBoundingClientRect() : t.getBoundingClientRect();
    return {contained: !!box, overflow: box ? w.getComputedStyle(box).overflowX : '',
            right: r.right, left: r.left, wider: box ? box.scrollWidth > box.clientWidth : false};
  });
  const callout = d.querySelector('#verdict .callout').getBoundingClientRect();
  const dt = d.querySelector('#verdict dl.facts dt').getBoundingClientRect();
  const dd = d.querySelector('#verdict dl.facts dd').getBoundingClientRect();
  const dl = d.querySelector('#verdict dl.facts').getBoundingClientRect();
  const images = [...d.querySelectorAll('img')].map(i => i.getBoundingClientRect().right);
  document.getElementById('out').textContent = JSON.stringify({
    width, page: d.documentElement.scrollWidth, tables, images,
    callout: [callout.left, callout.top, callout.right, callout.bottom],
    dt: [dt.left, dt.top, dt.right, dt.bottom], dd: [dd.left, dd.top, dd.right, dd.bottom],
    dl: [dl.left, dl.right], visibility: w.getComputedStyle(d.querySelector('#verdict')).visibility
  });
};
</script>
"""


def browser() -> str | None:
    for name in BROWSERS:
        found = shutil.which(name)
        if found:
            return found
    return "/usr/bin/chromium" if Path("/usr/bin/chromium").exists() else None


def chromium(page: Path, profile: Path, window: int, *extra: str) -> subprocess.CompletedProcess:
    executable = browser()
    if executable is None:
        pytest.skip(
            "no Chromium or Chrome on this machine (apt-get install chromium); .ci/run installs it"
        )
    return subprocess.run(
        [
            executable,
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--allow-file-access-from-files",
            f"--user-data-dir={profile}",
            f"--window-size={window},{HEIGHT + 40}",
            *extra,
            page.resolve().as_uri(),
        ],
        capture_output=True,
        text=True,
        timeout=120,
    )


@pytest.fixture(scope="module")
def folder(tmp_path_factory) -> Path:
    solution = solve(coated_strip(mesh_size=0.003), end_time=300.0, time_step=3.0)
    out = tmp_path_factory.mktemp("layout") / "results"
    write_results(assess(solution, target=150.0), out, animation=False)
    return out


def host(folder: Path, width: int, measure: bool) -> Path:
    page = folder / f"host-{width}{'-measure' if measure else ''}.html"
    page.write_text(
        '<!DOCTYPE html><html><head><meta charset="utf-8"></head><body style="margin:0">'
        f'<iframe id="page" src="report.html" style="width:{width}px;height:{HEIGHT}px;'
        'border:0;display:block"></iframe><pre id="out"></pre>'
        + (MEASURE if measure else "")
        + "</body></html>",
        encoding="utf-8",
    )
    return page


def measure(folder: Path, width: int, profile: Path) -> dict:
    done = chromium(host(folder, width, True), profile, max(width, 500) + 20, "--dump-dom")
    assert done.returncode == 0, done.stderr[-2000:]
    found = re.search(r'<pre id="out">(.*?)</pre>', done.stdout, flags=re.DOTALL)
    assert found and found[1].strip(), done.stdout[-2000:]
    return json.loads(found[1].replace("&quot;", '"').replace("&amp;", "&"))


@pytest.mark.parametrize("width", [1280, 420])
def test_no_table_or_picture_overflows_and_the_verdict_shows(folder, tmp_path, width):
    found = measure(folder, width, tmp_path / "profile")
    assert width - 20 <= found["width"] <= width, found  # less a vertical scroll bar
    width = found["width"]
    # The page itself never scrolls sideways (1 px of sub-pixel rounding allowed).
    assert found["page"] <= width + 1, found
    assert found["tables"], "the report has no tables"
    for table in found["tables"]:
        assert table["contained"], table  # every table sits in a scrolling container
        assert table["overflow"] in ("auto", "scroll"), table
        assert table["left"] >= -1 and table["right"] <= width + 1, table
    assert all(right <= width + 1 for right in found["images"]), found["images"]
    left, top, right, bottom = found["callout"]
    assert found["visibility"] == "visible"
    assert 0 <= left and right <= width + 1 and bottom - top > 20 and right - left > 200
    dt, dd, (dl_left, dl_right) = found["dt"], found["dd"], found["dl"]
    if width < 600:  # stacked: the answer under its question, the full width of the list
        assert dd[1] >= dt[3] - 1, (dt, dd)
        assert dd[2] - dd[0] >= 0.9 * (dl_right - dl_left), (dd, dl_left, dl_right)
    else:  # two columns: the answer beside its question
        assert dd[0] >= dt[2], (dt, dd)
    if width < 600:
        assert any(t["wider"] for t in found["tables"]), "no table needed to scroll at 420 px"


@pytest.mark.parametrize("width", [1280, 420])
def test_screenshots_at_desk_and_phone_width(folder, tmp_path, width):
    shot = tmp_path / f"report-{width}.png"
    window = max(width, 500) + 20
    done = chromium(
        host(folder, width, False), tmp_path / "profile", window, f"--screenshot={shot}"
    )
    assert done.returncode == 0 and shot.is_file(), done.stderr[-2000:]
    with Image.open(shot) as image:
        page = image.convert("L").crop((0, 0, width, HEIGHT))
        # The dark header band on top, a light page below: the style sheet applied at this width.
        assert ImageStat.Stat(page.crop((0, 0, width, 40))).mean[0] < 100
        assert ImageStat.Stat(page.crop((0, 600, width, HEIGHT))).mean[0] > 150
    keep = folder.parent / shot.name
    shutil.copy(shot, keep)


def test_the_field_files_are_summarised(folder):
    text = (folder / "report.html").read_text(encoding="utf-8")
    frames = sorted(p.name for p in (folder / "fields").glob("*.vtu"))
    assert len(frames) > 3
    numbers = [re.search(r"(\d+)\.vtu$", n)[1] for n in frames]
    assert f"{len(frames)} VTK frames, fields/" in text
    assert f"{numbers[0]}–{numbers[-1]}.vtu" in text
    assert frames[1] not in text  # the frames between the first and last are not listed


def test_planar_quantities_say_per_metre_of_depth(folder):
    # A planar section's capacities, conductances and energies are per metre of depth.
    text = (folder / "report.html").read_text(encoding="utf-8")
    assert "J/K per metre of depth" in text and "W/K per metre of depth" in text
    assert "m³ per metre of depth" in text
