"""The grid convergence index against a published worked example and manufactured sequences.

Source: I. B. Celik, U. Ghia, P. J. Roache, C. J. Freitas, H. Coleman, P. E. Raad, "Procedure
for estimation and reporting of uncertainty due to discretization in CFD applications",
J. Fluids Eng. 130 (2008) 078001, Table 1 (from memory: the first column, the dimensionless
reattachment length on 18 000, 8 000 and 4 500 cells of a two-dimensional grid; the other
columns are not recalled reliably and are not used).
"""

from __future__ import annotations

import math

import pytest

from advisor.errors import AdvisorError
from advisor.studies.convergence import (
    grid_convergence,
    grid_convergence_series,
    recommended_grid,
)


def test_the_published_worked_example():
    # Celik et al. (2008), Table 1, first column (from memory): N1, N2, N3 = 18000, 8000, 4500;
    # φ1, φ2, φ3 = 6.063, 5.972, 5.863; p = 1.53, φ_ext21 = 6.1685, e_a21 = 1.5 %,
    # e_ext21 = 1.7 %, GCI_fine21 = 2.2 %. h = (1/N)^(1/2) in two dimensions.
    sizes = [(1.0 / n) ** 0.5 for n in (18000, 8000, 4500)]
    g = grid_convergence(sizes, [6.063, 5.972, 5.863])
    assert g.ratios[0] == pytest.approx(1.5, rel=1e-12)
    assert g.ratios[1] == pytest.approx(4.0 / 3.0, rel=1e-12)
    # The table rounds to the digits shown: half a unit in the last digit is the tolerance.
    assert abs(g.order - 1.53) <= 0.005
    assert abs(g.extrapolated - 6.1685) <= 0.00005
    assert abs(100 * g.approximate_error - 1.5) <= 0.05
    assert abs(100 * g.extrapolated_error - 1.7) <= 0.05
    assert abs(100 * g.gci_fine - 2.2) <= 0.05
    assert g.behaviour == "monotone" and not g.oscillatory


@pytest.mark.parametrize(
    ("order", "ratios"),
    [(2.0, (2.0, 2.0)), (1.0, (1.5, 4.0 / 3.0)), (1.7, (1.3, 1.9)), (3.2, (2.0, 1.25))],
)
def test_a_manufactured_sequence_gives_back_its_order_and_limit(order, ratios):
    # φ(h) = φ_exact + C·h^p exactly: the iteration must recover p and φ_exact to rounding,
    # including non-uniform ratios (where the sign term q(p) matters).
    exact, constant = 3.75, -0.42
    h1 = 0.01
    sizes = [h1, h1 * ratios[0], h1 * ratios[0] * ratios[1]]
    values = [exact + constant * h**order for h in sizes]
    g = grid_convergence(sizes, values)
    assert g.order == pytest.approx(order, rel=1e-9)
    assert g.extrapolated == pytest.approx(exact, rel=1e-12)
    # The true error of φ1 is C·h1^p; GCI = 1.25·|φ1 − φ_ext|/|φ1|·... bounds it.
    assert g.gci_fine * abs(values[0]) >= abs(values[0] - exact)
    assert g.behaviour == "monotone"


def test_an_oscillating_sequence_is_flagged():
    # φ(h) = 1 + C·(−1)^k·h^p on grids k = 0, 1, 2 with ratio 2: the changes alternate sign.
    sizes = [0.1, 0.2, 0.4]
    values = [1.0 + 0.3 * (-1) ** k * h**2 for k, h in enumerate(sizes)]
    g = grid_convergence(sizes, values)
    assert g.oscillatory
    # With s = −1 the equation reads p = |ln|ε32/ε21| + ln((2^p + 1)/(2^p + 1))|/ln 2, so the
    # apparent order is ln(|ε32/ε21|)/ln 2, computed here directly.
    e21, e32 = values[1] - values[0], values[2] - values[1]
    assert g.order == pytest.approx(math.log(abs(e32 / e21)) / math.log(2.0), rel=1e-9)


def test_four_grids_give_two_triples_and_a_recommendation():
    # φ = 10 + 40·h² on h = 1, 2, 4, 8 mm: GCI of the finest triple is 1.25·|e_a|/3, small.
    sizes = [1e-3, 2e-3, 4e-3, 8e-3]
    values = [10.0 + 40.0 * h**2 * 1e4 for h in sizes]
    series = grid_convergence_series(list(reversed(sizes)), list(reversed(values)))
    assert [s.sizes[0] for s in series] == [1e-3, 2e-3]
    # Expected GCI of each triple from the manufactured values, computed here.
    for s in series:
        expected = 1.25 * abs((s.values[0] - s.values[1]) / s.values[0]) / 3.0
        assert s.gci_fine == pytest.approx(expected, rel=1e-9)
    # GCI of the triples: 1.25·1.2/10.4/3 = 4.8 % and 1.25·4.8/11.6/3 = 17.2 %.
    assert recommended_grid(series, threshold=0.05).sizes[0] == 1e-3
    assert recommended_grid(series, threshold=0.2).sizes[0] == 2e-3  # the coarsest under 20 %
    assert recommended_grid(series, threshold=1e-6) is None


def test_bad_grids_are_refused():
    with pytest.raises(AdvisorError, match="three or more"):
        grid_convergence([1.0, 2.0], [1.0, 2.0])
    with pytest.raises(AdvisorError, match="grow strictly"):
        grid_convergence([1.0, 1.0, 2.0], [1.0, 2.0, 3.0])
    with pytest.raises(AdvisorError, match="change between grids is zero"):
        grid_convergence([1.0, 2.0, 4.0], [1.0, 1.1, 1.1])


def _runs(sizes, time, peak):
    from advisor.studies.mesh_convergence import GridRun

    return [
        GridRun(
            2 * h, h, 1000, 600, 1.0, {"time_to_target_slowest_s": t, "peak_difference_K": p}, 0.1
        )
        for h, t, p in zip(sizes, time, peak, strict=True)
    ]


def test_the_mesh_every_answer_accepts_is_recommended():
    from advisor.studies.mesh_convergence import mesh_recommendation

    # Manufactured: time = 300 + 2e5·h² s, peak = 80 − 1e5·h² K on h = 1, 2, 4, 8 mm.
    sizes = [1e-3, 2e-3, 4e-3, 8e-3]
    runs = _runs(sizes, [300 + 2e5 * h**2 for h in sizes], [80 - 1e5 * h**2 for h in sizes])
    series, chosen, text = mesh_recommendation(runs, threshold=0.01)
    # GCI of the triple starting at h: 1.25·|φ(h) − φ(2h)|/|φ(h)|/3, computed here; the
    # peak's is the larger: 1.25·0.3/79.9/3 = 0.16 % at 1 mm, 1.25·1.2/79.6/3 = 0.63 % at 2 mm.
    assert series["peak_difference_K"][1].gci_fine == pytest.approx(1.25 * 1.2 / 79.6 / 3)
    assert chosen is runs[1] and text.startswith("Use a mesh size of 4 mm")
    _, chosen, text = mesh_recommendation(runs, threshold=0.004)  # only the finest triple
    assert chosen is runs[0]
    _, chosen, text = mesh_recommendation(runs, threshold=0.001)
    assert chosen is None and "above 0.1 %" in text


def test_meshes_too_alike_and_missing_answers_are_said():
    from advisor.studies.mesh_convergence import mesh_recommendation

    sizes = [1e-3, 1.2e-3, 1.44e-3]  # ratio 1.2, below Celik's 1.3
    runs = _runs(sizes, [300 + 2e5 * h**2 for h in sizes], [80 - 1e5 * h**2 for h in sizes])
    _, chosen, text = mesh_recommendation(runs)
    assert chosen is None and "size ratio of only 1.2" in text
    sizes = [1e-3, 2e-3, 4e-3]
    runs = _runs(sizes, [math.nan] * 3, [80 - 1e5 * h**2 for h in sizes])
    series, chosen, text = mesh_recommendation(runs, threshold=0.05)
    # Exact order 2 and limit 80: the estimated errors 1.25·|φ_i − 80|/80 are 0.16, 0.63 and
    # 2.5 %, so the coarsest mesh is good for 5 % and the middle one for 1 %.
    assert list(series) == ["peak_difference_K"] and chosen is runs[2]
    assert "time_to_target_slowest_s is missing" in text
    assert mesh_recommendation(runs, threshold=0.01)[1] is runs[1]
    assert mesh_recommendation(runs, threshold=0.001)[1] is None
