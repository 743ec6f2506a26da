"""Cases no lumped model applies to (only fixed temperatures, prescribed fluxes and insulated
edges) run through the command line and report the field, with the advisor's answer that no
lumped model applies instead of an error.

References, computed here: the plane wall whose faces are suddenly held at T_s, centre
temperature (T − T_s)/(T0 − T_s) = Σ over odd n of (4/(nπ))·sin(nπ/2)·exp(−(nπ/L)²·α·t)
(Carslaw & Jaeger, Conduction of Heat in Solids, 2nd ed., §3.3, from memory); and the first
law for an insulated part heated by a constant flux q on an edge of length b: its mean
temperature rises by q·b·t/(ρ·c·A).
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np

from advisor.cli import EXIT_OK, main
from advisor.results_folder import MARKER

CASE = """title = "{title}"

[section]
mesh_size = "1 mm"

[[section.shape]]
kind = "rectangle"
width = "20 mm"
height = "5 mm"
edges = {{ left = "faces", right = "{right}", top = "sides", bottom = "sides" }}
region = "wall"

[material]
conductivity = "40 W/(m*K)"
density = "7850 kg/m^3"
specific_heat = "520 J/(kg*K)"

[boundaries.faces]
{faces}

[boundaries.sides]
insulated = true
{heated}
[initial]
temperature = "100 degC"

[probes]
centre = ["10 mm", "2.5 mm"]

[run]
end_time = "5 s"
time_step = "0.025 s"
output_interval = "1 s"
"""

ALPHA = 40.0 / (7850.0 * 520.0)  # m²/s


def histories(folder: Path) -> dict[str, np.ndarray]:
    import csv

    with open(folder / "histories.csv", newline="", encoding="utf-8") as stream:
        rows = list(csv.reader(stream))
    return {name: np.array([float(r[i]) for r in rows[1:]]) for i, name in enumerate(rows[0])}


def run(tmp_path: Path, capsys, text: str) -> tuple[Path, str]:
    case = tmp_path / "wall.toml"
    case.write_text(text, encoding="utf-8")
    out = tmp_path / "out"
    assert main(["run", str(case), "--out", str(out)]) == EXIT_OK
    return out, capsys.readouterr().err


def check_folder(out: Path) -> dict:
    summary = json.loads((out / "summary.json").read_text(encoding="utf-8"))
    assert summary["lumped_model"]["applies"] is False
    assert "exchanges heat" in summary["lumped_model"]["reason"]
    listed = set(json.loads((out / MARKER).read_text(encoding="utf-8"))["files"])
    on_disk = {p.relative_to(out).as_posix() for p in out.rglob("*") if p.is_file()}
    assert on_disk == listed  # the marker lists every file, so --force may replace it
    assert {"summary.json", "histories.csv", "fields/temperature.pvd"} <= on_disk
    return summary


def test_a_wall_with_fixed_faces_reports_the_field(tmp_path, capsys):
    text = CASE.format(title="fixed faces", right="faces", faces='fixed = "20 degC"', heated="")
    out, err = run(tmp_path, capsys, text)
    assert "No lumped model applies" in err
    check_folder(out)
    found = histories(out)
    t = found["time [s]"][-1]
    decay = ALPHA * t / 0.02**2  # the Fourier number on the wall's thickness
    series = sum(
        4 / (n * math.pi) * math.sin(n * math.pi / 2) * math.exp(-((n * math.pi) ** 2) * decay)
        for n in range(1, 200, 2)
    )
    exact = 20.0 + 80.0 * series
    # P1 elements of 1 mm on a 20 mm wall: the error is O(h²), about (1/20)² ~ 0.3 % of the
    # 80 K drive; 0.025 s Crank-Nicolson steps add far less. Allowed: 1 % of the drive.
    assert abs(found["probe centre [degC]"][-1] - exact) < 0.01 * 80.0


def test_an_insulated_part_heated_by_a_flux_reports_the_field(tmp_path, capsys):
    text = CASE.format(
        title="flux",
        right="heated",
        faces="insulated = true",
        heated='\n[boundaries.heated]\nflux = "50 kW/m^2"\n',
    )
    out, err = run(tmp_path, capsys, text)
    assert "No lumped model applies" in err
    check_folder(out)
    found = histories(out)
    t = found["time [s]"]
    rise = 50e3 * 0.005 * t / (7850.0 * 520.0 * 0.02 * 0.005)  # first law, K
    # The scheme conserves energy to round-off (its heat balance is exact for a constant
    # flux): the mean follows the first law to 1e-9 K.
    np.testing.assert_allclose(found["mean [degC]"], 100.0 + rise, atol=1e-9)


def test_check_and_show_answer_a_case_of_the_field_alone(tmp_path, capsys):
    """`check` says no lumped model applies instead of refusing; `show` reads the folder's
    summary and gives the field's end state in the units of the run."""
    text = CASE.format(title="fixed faces", right="faces", faces='fixed = "20 degC"', heated="")
    out, _ = run(tmp_path, capsys, text)
    case = tmp_path / "wall.toml"
    assert case.is_file()
    assert main(["check", str(case)]) == EXIT_OK
    assert "No lumped model applies" in capsys.readouterr().err
    assert main(["show", str(out)]) == EXIT_OK
    shown = capsys.readouterr().out.splitlines()
    summary = json.loads((out / "summary.json").read_text(encoding="utf-8"))
    assert shown[0].startswith("No lumped model applies:")
    assert f"(mean {summary['final']['mean_degC']:.4g} °C)" in shown[1]
