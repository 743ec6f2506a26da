"""Where does the lumped estimate stop being adequate? A family of square steel bars of
growing size, quenched in the same oil (invented scenario, based on ``quench-bar.toml``):
the design rule is the largest bar for which the lumped time to 200 °C is within 5 % of the
core's. Run ``python examples/sweep_bar_size.py``.
"""

from __future__ import annotations

from _common import run_case_file


def sweep(half_sides_mm=(5, 10, 20, 30, 40), mesh_divisions=12):
    """(half side in mm, Biot number, time error as a fraction) for each bar."""
    rows = []
    for half in half_sides_mm:
        size = f"{half / mesh_divisions:.4g} mm"
        overrides = {
            "section.shape": [
                {
                    "kind": "rectangle",
                    "width": f"{half} mm",
                    "height": f"{half} mm",
                    "region": "bar",
                    "edges": {
                        "left": "symmetry",
                        "bottom": "symmetry",
                        "right": "quenched",
                        "top": "quenched",
                    },
                }
            ],
            "section.mesh_size": size,
            "probes": {"core": ["0 mm", "0 mm"]},
            "run.time_step": "0.5 s",
            "run.end_time": f"{max(10, 0.5 * half)} min",
            "advisor.quantity": "time_to_target",
        }
        result = run_case_file("quench-bar", overrides=overrides)
        rows.append((half, result.biot[0].value, result.verdict.error, result.verdict.rating))
    return rows


if __name__ == "__main__":
    print(" half side   Bi     lumped time error   rating")
    for half, bi, error, rating in sweep():
        print(f"  {half:5.0f} mm  {bi:5.3f}   {100 * error:8.1f} %        {rating}")
