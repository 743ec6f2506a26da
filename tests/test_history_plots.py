"""The histories figure as a person reads it: times in hours, minutes and seconds, τ per stage
of a stepped coefficient, the recommended model drawn, and labels that cross no curve and are
not clipped.

The time constants are checked against the classical lumped time constant τ = ρ·c·V/(h·A)
(Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, 6th ed., §5.1, eq. 5.7, from
memory), computed here by hand for a rectangle: V = w·H per metre of depth, A = 2(w + H).
Label extents come from matplotlib's own renderer; the curves are sampled pixel by pixel in
the test, independently of the placement code.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from advisor import assess
from advisor.time_words import duration_text
from advisor.writers.history_plots import (
    energy_figure,
    history_figure,
    internal_difference_figure,
    lumped_error_figure,
)
from fem import Convection, Material, ThermalModel, solve
from fem.schedules import Steps
from geometries import Rectangle

WIDTH, HEIGHT = 0.04, 0.02  # m, an invented bar
CONDUCTIVITY, DENSITY, SPECIFIC_HEAT = 15.0, 7900.0, 500.0  # invented stainless-like values
FIRST_H, SECOND_H, SWITCH = 400.0, 60.0, 300.0  # W/(m²·K), W/(m²·K), s


def bar(coefficient) -> ThermalModel:
    section = Rectangle(WIDTH, HEIGHT).mesh(0.002)
    water = Convection(heat_transfer_coefficient=coefficient, ambient=20.0)
    return ThermalModel(
        section,
        Material(CONDUCTIVITY, DENSITY, SPECIFIC_HEAT),
        boundaries={side: water for side in ("left", "right", "top", "bottom")},
        initial_temperature=500.0,
    )


def hand_time_constant(h: float) -> float:
    """ρ·c·V/(h·A) for the rectangle per metre of depth, s."""
    return DENSITY * SPECIFIC_HEAT * WIDTH * HEIGHT / (h * 2 * (WIDTH + HEIGHT))


@pytest.fixture(scope="module")
def stepped():
    model = bar(Steps((0.0, SWITCH), (FIRST_H, SECOND_H)))
    return assess(solve(model, end_time=3600.0, time_step=10.0), target=100.0)


@pytest.fixture(scope="module")
def steady():
    # Bi = h·(V/A)/k = 900·0.00667/15 = 0.4: the classical estimate misses the slowest point
    # and a fitted model is recommended.
    model = bar(900.0)
    return assess(solve(model, end_time=1800.0, time_step=5.0), target=60.0, tolerance=0.05)


def labels(figure):
    return [(axes, text) for axes in figure.axes for text in axes.texts if text.get_text().strip()]


def curve_pixels(axes) -> np.ndarray:
    """The axes' lines in display pixels, linearly interpolated every half pixel."""
    out = []
    for line in axes.get_lines():
        xy = line.get_transform().transform(np.column_stack(line.get_data()))
        for a, b in zip(xy[:-1], xy[1:], strict=True):
            n = max(2, int(2 * np.hypot(*(b - a))) + 1)
            s = np.linspace(0.0, 1.0, n)[:, None]
            out.append(a + s * (b - a))
        out.append(xy)
    return np.vstack(out)


def assert_clear(figure):
    figure.draw_without_rendering()
    renderer = figure.canvas.get_renderer()
    for axes, text in labels(figure):
        box = text.get_window_extent(renderer)
        frame = axes.get_window_extent(renderer)
        pixels = curve_pixels(axes)
        inside = (
            (pixels[:, 0] > box.x0)
            & (pixels[:, 0] < box.x1)
            & (pixels[:, 1] > box.y0)
            & (pixels[:, 1] < box.y1)
        )
        assert not inside.any(), f"{text.get_text()!r} crosses a curve"
        assert frame.x0 <= box.x0 and box.x1 <= frame.x1, f"{text.get_text()!r} is clipped"
        assert frame.y0 <= box.y0 and box.y1 <= frame.y1, f"{text.get_text()!r} is clipped"


def test_a_stepped_coefficient_gives_tau_per_stage(stepped):
    figure = history_figure(stepped)
    legend = [t.get_text() for t in figure.axes[0].get_legend().get_texts()]
    classical = next(t for t in legend if t.startswith("classical lumped"))
    first, second = hand_time_constant(FIRST_H), hand_time_constant(SECOND_H)
    assert classical.startswith(
        f"classical lumped, τ = {duration_text(first)}, then {duration_text(second)} "
        f"from t = {duration_text(SWITCH)}"
    ), classical
    assert "e+" not in " ".join(legend)


def test_labels_cross_no_curve_and_are_not_clipped(stepped, steady):
    for assessment in (stepped, steady):
        for make in (
            history_figure,
            internal_difference_figure,
            lumped_error_figure,
            energy_figure,
        ):
            figure = make(assessment)
            assert labels(figure), "the figure has no labels to check"
            assert_clear(figure)


def test_the_recommended_model_is_drawn(steady):
    verdict = steady.verdict
    assert verdict.rating != "adequate", verdict  # the scenario is chosen so
    figure = history_figure(steady)
    legend = [t.get_text() for t in figure.axes[0].get_legend().get_texts()]
    recommended = [t for t in legend if "(recommended)" in t]
    if verdict.recommended is None:
        assert not recommended and "field" in verdict.advice
    else:
        assert recommended, legend
        words = {"two-node": "two-node", "fitted exponential": "single exponential"}
        assert words.get(verdict.recommended, verdict.recommended) in recommended[0]


def test_the_target_label_names_the_target(stepped):
    figure = history_figure(stepped)
    texts = [t.get_text() for _, t in labels(figure)]
    assert "target 100 °C" in texts
    peak = stepped.peak_internal_difference_time
    assert any(duration_text(peak) in t for t in texts)
    assert math.isfinite(peak)


def test_the_energy_ledger_is_of_the_whole_part():
    """A quarter of the bar, declared four copies, draws the whole bar's energy: at the end
    it has given off ρ·c·A·(T_end − T_0) per metre of depth of the full section (the
    energy balance of the whole bar, computed here from its mean temperature)."""
    from dataclasses import replace

    from fem import Insulated

    quarter = Rectangle(
        WIDTH / 2, HEIGHT / 2, edge_names={"left": "symmetry", "bottom": "symmetry"}
    ).mesh(0.002)
    quarter = replace(quarter, facts=replace(quarter.facts, symmetry_multiplier=4))

    water = Convection(heat_transfer_coefficient=400.0, ambient=20.0)
    model = ThermalModel(
        quarter,
        Material(CONDUCTIVITY, DENSITY, SPECIFIC_HEAT),
        boundaries={"symmetry": Insulated("symmetry"), "right": water, "top": water},
        initial_temperature=500.0,
    )
    solution = solve(model, end_time=600.0, time_step=10.0)
    figure = energy_figure(assess(solution))
    ledger = figure.axes[0]
    stored = next(line for line in ledger.get_lines() if line.get_label() == "stored in the part")
    unit = ledger.get_ylabel()
    scale = {"kJ": 1e3, "MJ": 1e6, "GJ": 1e9}[unit.split("(")[1].split()[0]]
    mean_end = solution.mean[-1]
    whole = DENSITY * SPECIFIC_HEAT * WIDTH * HEIGHT * (mean_end - 500.0)  # J per metre
    assert stored.get_ydata()[-1] * scale == pytest.approx(whole, rel=1e-6)
    assert "4 copies" in ledger.get_title(loc="left")


def test_the_lumped_error_plot_draws_the_recommended_model(steady):
    verdict = steady.verdict
    assert verdict.recommended in ("two-node", "fitted exponential"), verdict  # chosen so
    axes = lumped_error_figure(steady).axes[0]
    curves = {line.get_label(): line.get_ydata() for line in axes.get_lines()}
    quantity = {"slowest": "slowest point", "mean": "field mean"}[verdict.quantity]
    drawn = [label for label in curves if label.endswith(f"vs {quantity} (recommended)")]
    assert len(drawn) == 1, list(curves)
    # the curve's largest gap is the error the advice quotes for the recommended model
    quoted = steady.errors[f"{verdict.recommended} vs {verdict.quantity}"].fraction
    assert np.abs(curves[drawn[0]]).max() == pytest.approx(100 * quoted, rel=1e-6)
    assert 100 * quoted <= 100 * verdict.tolerance
