"""``soakwise converge``: a starter case on three meshes, its files read back, and the observed
order and GCI recomputed here from the grids it wrote.

Reference: Celik et al., "Procedure for estimation and reporting of uncertainty due to
discretization in CFD applications", J. Fluids Eng. 130 (2008) 078001, eqs. 1–5 and 10 (from
memory): the apparent order solves p·ln r21 = |ln|ε32/ε21| + ln((r21^p − s)/(r32^p − s))|,
found here by scanning and ``brentq``, independently of the code under test.
"""

from __future__ import annotations

import csv
import json
import math
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from scipy.optimize import brentq

from advisor.casefile.starters import starter_text
from advisor.cli import main

ROOT = Path(__file__).resolve().parents[1]


def celik_order(h, phi) -> float:
    r21, r32 = h[1] / h[0], h[2] / h[1]
    e21, e32 = phi[1] - phi[0], phi[2] - phi[1]
    s = math.copysign(1.0, e32 / e21)

    def residual(p):
        return p * math.log(r21) - abs(
            math.log(abs(e32 / e21)) + math.log((r21**p - s) / (r32**p - s))
        )

    grid = np.geomspace(1e-3, 60, 600)
    values = [residual(p) for p in grid]
    k = next(i for i in range(len(grid) - 1) if values[i] * values[i + 1] <= 0)
    return brentq(residual, grid[k], grid[k + 1], xtol=1e-14)


@pytest.fixture(scope="module")
def converged(tmp_path_factory):
    folder = tmp_path_factory.mktemp("converge")
    case = folder / "bar.toml"
    text = starter_text("quench-bar").replace('end_time = "10 min"', 'end_time = "5 min"')
    case.write_text(text, encoding="utf-8")
    out = folder / "out"
    status = main(["-q", "converge", str(case), "--finest", "2 mm", "--out", str(out)])
    return status, out, case


def test_the_files_say_what_the_grids_give(converged):
    status, out, _ = converged
    assert status == 0
    with (out / "converge.csv").open(encoding="utf-8") as handle:
        rows = list(csv.DictReader(handle))
    assert len(rows) == 3
    sizes = [float(r["mesh_size_m"]) for r in rows]
    assert sizes == pytest.approx([0.002, 0.002 * 2**0.5, 0.004], rel=1e-12)
    h = [float(r["representative_size_m"]) for r in rows]
    triangles = [int(r["triangles"]) for r in rows]
    # h = sqrt(area/N): the quarter bar is 30 mm × 20 mm.
    for hk, n in zip(h, triangles, strict=True):
        assert hk == pytest.approx(math.sqrt(0.03 * 0.02 / n), rel=1e-9)
    summary = json.loads((out / "converge.json").read_text(encoding="utf-8"))
    checked = 0
    for answer, found in summary["convergence"].items():
        phi = [float(r[answer]) for r in rows]
        triple = found[0]
        assert triple["values"] == pytest.approx(phi, rel=1e-12)
        if triple["behaviour"] in ("monotone", "oscillatory", "diverging"):
            p = celik_order(h, phi)
            assert triple["observed_order"] == pytest.approx(p, rel=1e-8)
            r21 = h[1] / h[0]
            gci = 1.25 * abs((phi[0] - phi[1]) / phi[0]) / (r21**p - 1)
            assert triple["gci_fine"] == pytest.approx(gci, rel=1e-8)
            checked += 1
    assert checked == 2  # the time to target and the peak ΔT both changed between meshes
    assert summary["recommendation"].startswith(("Use a mesh size", "Refine further"))
    page = (out / "study.html").read_text(encoding="utf-8")
    assert "Is the mesh fine enough?" in page and "data:image/png;base64," in page


def test_steps_coarsen_with_the_mesh(converged):
    _, out, case = converged
    assert (
        main(
            [
                "-q",
                "converge",
                str(case),
                "--finest",
                "2 mm",
                "--ratio",
                "2",
                "--steps",
                "--out",
                str(out.parent / "steps"),
            ]
        )
        == 0
    )
    with (out.parent / "steps" / "converge.csv").open(encoding="utf-8") as handle:
        steps = [float(r["time_step_s"]) for r in csv.DictReader(handle)]
    # The starter's fixed step of 1 s on the finest mesh, asked doubled with each coarsening;
    # the solver takes the largest step not above the one asked that divides the output
    # interval (so 4 s may become 3 s).
    assert steps[:2] == pytest.approx([1.0, 2.0], rel=1e-12)
    assert 2.0 < steps[2] <= 4.0


def test_an_existing_folder_is_kept_and_bad_options_refused(converged, capsys):
    _, out, case = converged
    assert main(["converge", str(case), "--out", str(out)]) == 2
    assert "exists" in capsys.readouterr().err
    assert main(["converge", str(case), "--meshes", "2", "--out", str(out / "x")]) == 2
    assert "three or more" in capsys.readouterr().err
    assert main(["converge", str(case), "--ratio", "1", "--out", str(out / "y")]) == 2


def test_help_is_fast_and_light():
    # The command's help must not load the solver, pandas or matplotlib.
    code = (
        "import sys; from advisor.cli import build_parser; build_parser(); "
        "print(sorted(m for m in ('pandas', 'matplotlib', 'scipy', 'gmsh') if m in sys.modules))"
    )
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT)
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == "[]"
