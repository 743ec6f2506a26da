"""What a person reads from the command line: times in hours, minutes and seconds, a closing
line that names only what was written, and ``show`` in words.

The expected times are our own arithmetic (3 h 10 min = 3·3600 + 10·60 s = 11 400 s); the
run is the quench-bar starter on a coarse mesh for one minute, so its figures come from the
run itself and the checks are on the wording and on agreement with summary.json.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import numpy as np
import pytest

from advisor.casefile.starters import starter_text
from advisor.cli import EXIT_OK, main
from advisor.cli.common import closing_line
from advisor.time_words import duration_text


@pytest.mark.parametrize(
    ("seconds", "words"),
    [
        (3 * 3600 + 10 * 60, "3 h 10 min"),
        (4 * 60 + 12, "4 min 12 s"),
        (38.24, "38.2 s"),
        (0.85, "0.85 s"),
        (18980.0, "5 h 16 min"),  # 316.3 min: "τ = 1.898e+04 s" as a person reads it
        (5 * 3600 + 20, "5 h"),  # 20 s round away at the minute
        (59.96, "1 min"),  # 59.96 s rounds to a whole minute, not "60 s"
        (3599.6, "1 h"),
        (0.0, "0 s"),
        (2.5e-4, "0.25 ms"),
    ],
)
def test_durations_read_as_a_person_reads_them(seconds, words):
    assert duration_text(seconds) == words


def test_no_duration_is_in_scientific_notation():
    for seconds in np.geomspace(1e-7, 1e7, 400):
        text = duration_text(seconds)
        assert not re.search(r"\de[+-]?\d", text), (seconds, text)
        # the parts add back up to the value, to the rounding the unit implies
        parts = dict((unit, float(n)) for n, unit in re.findall(r"([\d.]+) (h|min|s|ms|µs)", text))
        total = (
            3600 * parts.get("h", 0)
            + 60 * parts.get("min", 0)
            + parts.get("s", 0)
            + 1e-3 * parts.get("ms", 0)
            + 1e-6 * parts.get("µs", 0)
        )
        step = 60 if "h" in parts else 1 if "min" in parts else 0.01 * seconds
        assert abs(total - seconds) <= 0.5 * step + 1e-12, (seconds, text)


def test_the_closing_line_names_only_what_was_written():
    folder = Path("out")
    everything = ["summary.json", "report.html", "animation.gif", "fields/temperature_0000.vtu"]
    line = closing_line(folder, [Path(n) for n in everything])
    assert "report.html" in line and "VTK viewer" in line
    plain = closing_line(folder, [Path(n) for n in ("summary.json", "plots/histories.png")])
    assert "report.html" not in plain and "VTK" not in plain and "animation" not in plain
    assert plain.startswith("Wrote 2 files to out/")


@pytest.fixture(scope="module")
def folder(tmp_path_factory):
    base = tmp_path_factory.mktemp("words")
    text = starter_text("quench-bar").replace('mesh_size = "1 mm"', 'mesh_size = "4 mm"')
    text = re.sub(r'end_time = "[^"]*"', 'end_time = "8 min"', text, count=1)
    text += "\n[outputs]\nreport = false\nanimation = false\nvtk = false\n"
    case = base / "bar.toml"
    case.write_text(text, encoding="utf-8")
    return case, base / "bar"


def test_run_then_show_in_words(folder, capsys):
    case, out = folder
    assert main(["run", str(case), "--out", str(out)]) == EXIT_OK
    err = capsys.readouterr().err
    closing = next(line for line in err.splitlines() if line.startswith("Wrote "))
    assert "report.html" not in closing and "VTK" not in closing  # [outputs] said no
    assert not re.search(r"\d\.\d+e[+-]\d", err), err  # no scientific notation for times
    assert main(["show", str(out)]) == EXIT_OK
    shown = capsys.readouterr().out
    summary = json.loads((out / "summary.json").read_text(encoding="utf-8"))
    verdict = summary["verdict"]
    lines = shown.splitlines()
    assert lines[0].startswith(
        f"Verdict: the classical lumped estimate is {verdict['rating'].upper()} for the "
        "slowest point"
    ), lines[0]
    assert f"for {verdict['quantity']}" not in shown  # no internal key ("for slowest")
    assert "Target: 200 °C" in lines
    slowest = summary["time_to_target_s"]["slowest"]
    times = next(line for line in lines if line.startswith("Time to target: "))
    assert times.startswith(f"Time to target: slowest point {duration_text(slowest)}")
    peak = summary["peak_internal_difference_K"]
    assert any(
        line.startswith(f"Peak internal temperature difference: {peak:.3g} K at ")
        for line in lines
    )
    assert "The run: ran to the end time, 8 min" in lines
    assert summary["stop_time_s"] is None


def test_an_existing_folder_is_refused_in_command_line_words(folder, capsys):
    case, out = folder
    if not out.exists():
        assert main(["run", str(case), "--out", str(out), "-q"]) == EXIT_OK
    capsys.readouterr()
    assert main(["run", str(case), "--out", str(out)]) != EXIT_OK
    err = capsys.readouterr().err
    assert "--force" in err and "force=True" not in err


def test_a_skipped_optional_output_is_said_once(folder, tmp_path, capsys, monkeypatch):
    """An output that needs a missing extra (here XDMF without h5py) is skipped with one
    note on the terminal, and the closing line does not count it."""
    import advisor.results_folder

    monkeypatch.setattr(advisor.results_folder, "xdmf_available", lambda: False)
    case, _ = folder
    text = case.read_text(encoding="utf-8").replace("vtk = false", "vtk = true")
    fields_case = tmp_path / "fields.toml"
    fields_case.write_text(text, encoding="utf-8")
    out = tmp_path / "fields"
    assert main(["run", str(fields_case), "--out", str(out)]) == EXIT_OK
    err = capsys.readouterr().err
    notes = [line for line in err.splitlines() if line.startswith("note: ")]
    assert len(notes) == 1 and "xdmf" in notes[0], err
    assert not (out / "fields" / "temperature.xdmf").exists()


def test_a_reader_that_stops_early_is_no_error():
    """`soakwise materials | head -1`: the closed pipe ends the listing quietly, status 0."""
    import subprocess
    import sys

    command = [sys.executable, "-m", "advisor.cli", "materials"]
    listing = subprocess.Popen(command, stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    listing.stdout.close()  # the reader is gone before the first line is written
    status = listing.wait(timeout=60)
    assert listing.stderr.read() == b"" and status == 0
