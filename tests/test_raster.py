"""Field pictures without a figure per frame: the pixel map against matplotlib's own linear
interpolation on triangles, mirrored pictures against their mirror image, colour levels
without bands, and colour-bar ticks written plainly.

The reference for the interpolation is an independent implementation: matplotlib's
``LinearTriInterpolator`` (its own triangle search and plane fits), evaluated in the test at
the pixel centres. A linear interpolant is exact to rounding, so the two agree to 1e-12 on
fields of order one.
"""

from __future__ import annotations

import numpy as np
import pytest
from matplotlib.tri import LinearTriInterpolator, Triangulation

from advisor.whole_part import Mirror, copies, fold, oriented, unfold
from advisor.writers.raster import pixel_centres, pixel_map, whole_extent
from advisor.writers.raster_chrome import UNIFORM_BELOW, plain_ticks


def small_mesh(seed: int = 3) -> tuple[np.ndarray, np.ndarray]:
    """A Delaunay mesh of scattered points in a 30 × 20 mm quarter, with the corners."""
    generator = np.random.default_rng(seed)
    points = generator.uniform([0.0, 0.0], [0.03, 0.02], size=(60, 2))
    corners = np.array([[0, 0], [0.03, 0], [0.03, 0.02], [0, 0.02]], dtype=float)
    points = np.vstack([corners, points])
    triangles = Triangulation(points[:, 0], points[:, 1]).triangles
    return points.T, triangles.T


def test_pixel_values_match_matplotlib_linear_interpolation():
    vertices, triangles = small_mesh()
    field = np.random.default_rng(7).uniform(-1.0, 1.0, vertices.shape[1])
    shape, extent = (57, 83), (-0.001, 0.031, -0.001, 0.021)
    mapped = pixel_map(vertices, triangles, shape, extent)
    reference = LinearTriInterpolator(Triangulation(*vertices, triangles.T), field)
    centres = pixel_centres(shape, extent)
    expected = reference(centres[0], centres[1])
    inside = ~np.ma.getmaskarray(expected)
    ours = np.zeros(inside.size, dtype=bool)
    ours[mapped.pixels] = True
    # every pixel matplotlib finds inside is found, and no pixel outside it
    np.testing.assert_array_equal(ours, inside)
    values = mapped.values(field)
    assert np.max(np.abs(values - expected.data[mapped.pixels])) < 1e-12
    np.testing.assert_allclose(mapped.weights.sum(axis=1), 1.0, atol=1e-14)


def test_a_mirrored_picture_is_its_own_mirror_image():
    # A quarter mesh, mirrored across x = 0 and y = 0: the whole picture must read the same
    # flipped left-right and top-bottom, pixel for pixel.
    vertices, triangles = small_mesh()
    field = np.random.default_rng(11).uniform(0.0, 1.0, vertices.shape[1])
    mirrors = (Mirror((0.0, 0.0), (1.0, 0.0)), Mirror((0.0, 0.0), (0.0, 1.0)))
    extent = whole_extent(vertices, mirrors)
    assert extent == pytest.approx((-0.03, 0.03, -0.02, 0.02), abs=1e-15)
    shape = (64, 96)
    mapped = pixel_map(vertices, triangles, shape, extent, mirrors)
    picture = np.full(shape[0] * shape[1], np.nan)
    picture[mapped.pixels] = mapped.values(field)
    picture = picture.reshape(shape)
    assert np.isfinite(picture).mean() > 0.95  # the whole rectangle is shown
    np.testing.assert_array_equal(np.isnan(picture), np.isnan(picture[:, ::-1]))
    np.testing.assert_allclose(picture, picture[:, ::-1], atol=1e-12, equal_nan=True)
    np.testing.assert_allclose(picture, picture[::-1, :], atol=1e-12, equal_nan=True)
    # the top-right quadrant is the modelled piece itself
    direct = pixel_map(vertices, triangles, (32, 48), (0.0, 0.03, 0.0, 0.02))
    quadrant = np.full(32 * 48, np.nan)
    quadrant[direct.pixels] = direct.values(field)
    np.testing.assert_allclose(
        picture[:32, 48:], quadrant.reshape(32, 48), atol=1e-12, equal_nan=True
    )


def test_folding_undoes_unfolding_across_inclined_lines():
    # An eighth of a square (cuts x = 0, y = 0, then y = x): every copy folds back.
    mirrors = (
        Mirror((0.0, 0.0), (1.0, 0.0)),
        Mirror((0.0, 0.0), (0.0, 1.0)),
        Mirror((0.0, 0.0), (1.0, -1.0)),
    )
    piece = np.array([[0.01, 0.004], [0.002, 0.0015]]).T  # below y = x, in x, y >= 0
    every = unfold(piece, mirrors)
    assert len(every) == 8 == copies(mirrors, axisymmetric=False)
    for copy in every:
        np.testing.assert_allclose(fold(copy, mirrors), piece, atol=1e-15)
    # the eight copies of a point are distinct (the square's symmetry group has 8 elements)
    assert len({tuple(np.round(c[:, 0], 12)) for c in every}) == 8


def test_mirror_lines_turn_to_the_piece_and_refuse_a_crossing():
    vertices = np.array([[0.0, 0.01, 0.01], [0.0, 0.0, 0.02]])
    turned = oriented((Mirror((0.0, 0.0), (-1.0, 0.0)),), vertices, 1e-9)
    assert turned[0].normal == (1.0, 0.0)
    with pytest.raises(ValueError, match="both sides of the mirror line"):
        oriented((Mirror((0.005, 0.0), (1.0, 0.0)),), vertices, 1e-9)
    assert copies((Mirror((0.0, 0.0), (1.0, 0.0)),), axisymmetric=True) == 1  # the axis


@pytest.mark.parametrize(
    "low, high",
    [(60.0, 850.0), (25.16, 25.23), (1e6, 1e6 + 0.5), (-40.0, -39.2), (0.0, 0.0042)],
)
def test_colour_bar_ticks_are_plain_numbers_at_their_places(low, high):
    # matplotlib's own formatter writes 1e6 + 0.5 with an offset ("+1e6"); ours does not.
    ticks = plain_ticks(low, high, 400)
    assert len(ticks) >= 2
    for fraction, label in ticks:
        assert "e" not in label.lower() and "+" not in label
        assert 0.0 <= fraction <= 1.0
        assert float(label) == pytest.approx(low + fraction * (high - low), abs=1e-9 * high)
    labels = [label for _, label in ticks]
    assert len(set(labels)) == len(labels)


def test_a_range_below_the_threshold_is_said_to_be_uniform():
    assert plain_ticks(60.0, 60.0 + 1e-7, 300) == ((0.5, "uniform at 60.00 °C"),)
    assert UNIFORM_BELOW == 1e-3
    assert len(plain_ticks(60.0, 60.0 + 2e-3, 300)) >= 1
    assert "uniform" not in plain_ticks(60.0, 60.0 + 2e-3, 300)[0][1]
