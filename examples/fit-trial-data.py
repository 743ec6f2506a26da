"""Make fit-trial-measured.csv: the invented trial of fit-trial.toml, computed by soakwise with
a known coefficient, with noise added and rounded as a data logger would record it.

    python examples/fit-trial-data.py            # rewrites examples/fit-trial-measured.csv

The true coefficient (TRUE_COEFFICIENT) is what ``soakwise fit`` should find within its band.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
TRUE_COEFFICIENT = "250 W/(m^2*K)"
NOISE = 0.5  # K, one standard deviation, like a thermocouple's random error
SEED = 2026
LOG_INTERVAL = 5.0  # s
RESOLUTION = 0.1  # K: the logger's last digit


def readings(case_path: Path = HERE / "fit-trial.toml", mesh_size: str = "1 mm"):
    """(times s, {probe: readings °C}) of the trial."""
    from advisor.casefile.case import load_case
    from fem import solve

    overrides = {
        "boundaries.surface.convection.coefficient": TRUE_COEFFICIENT,
        "section.mesh_size": mesh_size,
    }
    case = load_case(case_path, overrides)
    end = case.end_time
    solution = solve(case.model(), end, time_step=0.25, output_times=(end,))
    times = np.arange(0.0, end + LOG_INTERVAL / 2, LOG_INTERVAL)
    noise = np.random.default_rng(SEED)
    logged = {}
    for name, history in solution.probes.items():
        exact = np.interp(times, solution.times, history)
        noisy = exact + noise.normal(0.0, NOISE, times.size)
        logged[name] = np.round(noisy / RESOLUTION) * RESOLUTION
    return times, logged


def write(path: Path = HERE / "fit-trial-measured.csv") -> None:
    times, logged = readings()
    names = list(logged)
    lines = [
        "# Invented trial (see fit-trial.toml): computed by soakwise with h = "
        f"{TRUE_COEFFICIENT}, noise {NOISE} K (seed {SEED}), rounded to {RESOLUTION} K",
        "time [s]," + ",".join(f"{name} [degC]" for name in names),
    ]
    for i, t in enumerate(times):
        lines.append(f"{t:g}," + ",".join(f"{logged[n][i]:.1f}" for n in names))
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")


if __name__ == "__main__":
    write()
