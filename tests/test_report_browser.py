"""report.html as a person sees it: headless Chromium renders the page, the screenshot is not
blank, and the rendered DOM holds the report's headings, its images and the names as text.

Chromium is Debian's package (.ci/run installs it when missing); the tests skip only when no
Chromium or Chrome can be found on the machine.
"""

from __future__ import annotations

import shutil
import subprocess
from html.parser import HTMLParser
from pathlib import Path

import pytest
from PIL import Image, ImageStat
from test_writers import OIL, STEEL_NAME, coated_strip

from advisor import assess, write_results
from advisor.writers.report_content import HEADINGS
from advisor.writers.report_document import PROCESS_PARTS
from fem import solve

BROWSERS = ("chromium", "chromium-browser", "google-chrome", "google-chrome-stable")
WINDOW = (1200, 2000)


def browser() -> str | None:
    for name in BROWSERS:
        found = shutil.which(name)
        if found:
            return found
    return "/usr/bin/chromium" if Path("/usr/bin/chromium").exists() else None


def run_browser(page: Path, profile: Path, *extra: str) -> subprocess.CompletedProcess:
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
            "--disable-quic",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            f"--user-data-dir={profile}",
            f"--window-size={WINDOW[0]},{WINDOW[1]}",
            *extra,
            page.resolve().as_uri(),
        ],
        capture_output=True,
        text=True,
        timeout=120,
    )


@pytest.fixture(scope="module")
def report(tmp_path_factory) -> Path:
    solution = solve(coated_strip(mesh_size=0.003), end_time=300.0, time_step=3.0)
    out = tmp_path_factory.mktemp("browser") / "results"
    write_results(assess(solution, target=150.0), out, vtk=False)
    return out / "report.html"


def test_the_report_renders_to_a_picture_that_is_not_blank(report, tmp_path):
    screenshot = tmp_path / "report.png"
    done = run_browser(report, tmp_path / "profile", f"--screenshot={screenshot}")
    assert done.returncode == 0, done.stderr[-2000:]
    assert screenshot.is_file(), done.stderr[-2000:]
    with Image.open(screenshot) as image:
        assert image.size == WINDOW
        grey = image.convert("L")
        variance = ImageStat.Stat(grey).var[0]
        assert variance > 500, f"the page looks blank (pixel variance {variance:.1f})"
        # The header band is dark and the page below it light: the style sheet was applied.
        top = ImageStat.Stat(grey.crop((0, 0, WINDOW[0], 60))).mean[0]
        body = ImageStat.Stat(grey.crop((0, 400, WINDOW[0], 2000))).mean[0]
        assert top < 100 < body


class _Dom(HTMLParser):
    def __init__(self):
        super().__init__()
        self.headings: list[str] = []
        self.images: list[str] = []
        self.scripts = 0
        self.text: list[str] = []
        self._heading = False

    def handle_starttag(self, tag, attrs):
        if tag == "h2":
            self._heading = True
            self.headings.append("")
        elif tag == "img":
            self.images.append(dict(attrs).get("src", ""))
        elif tag == "script":
            self.scripts += 1

    def handle_endtag(self, tag):
        if tag == "h2":
            self._heading = False

    def handle_data(self, data):
        self.text.append(data)
        if self._heading:
            self.headings[-1] += data


def test_the_rendered_page_has_the_headings_images_and_names(report, tmp_path):
    done = run_browser(report, tmp_path / "profile", "--dump-dom")
    assert done.returncode == 0, done.stderr[-2000:]
    dom = _Dom()
    dom.feed(done.stdout)
    assert dom.headings == [h for k, h in HEADINGS.items() if k not in PROCESS_PARTS]
    assert dom.images and all(src.startswith("data:image/") for src in dom.images)
    assert dom.scripts == 0, "a name became a script"
    text = " ".join(dom.text)
    for name in (OIL, STEEL_NAME):
        assert name in text
    assert "licensed professional practice" in text
