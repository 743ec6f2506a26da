"""The corrected lumped model's internal resistance with a contact resistance inside the part.

The correction length solves a steady conduction problem with a uniform sink and the exposed
edges as the source (:mod:`fem.correction_length`); R is the exposed face's temperature above
the volume mean per unit of surface flux. For a slab of thickness L, insulated at x = 0 and
exposed at x = L, with one k and ρc and a contact resistance R_c at x = a, the flux at x is
x/L of the surface flux, so the drop from x to L is (L² − x²)/(2kL), plus R_c·a/L for x < a;
its mean over the slab gives

    R = L/(3k) + R_c·a²/L²

(derived here from the definition; the first term is the slab's L/3 of Cotta & Mikhailov's
improved lumped model, 1997, from memory). The field is quadratic on each side of the jump, so
P2 elements give it to round-off.
"""

from __future__ import annotations

import pytest

from fem import Convection, Insulated, Interface, Material, ThermalModel
from fem.correction_length import correction_length
from geometries import Composite, Rectangle

THICKNESS, HEIGHT, K = 0.01, 0.002, 20.0


@pytest.mark.parametrize(("depth", "resistance"), [(0.004, 1e-3), (0.007, 2e-4)])
def test_the_internal_resistance_adds_the_share_of_the_contact(depth, resistance):
    section = Composite(
        (
            Rectangle(
                depth,
                HEIGHT,
                edge_names={"left": "back", "top": "sides", "bottom": "sides", "right": "j"},
                region="inner",
            ),
            Rectangle(
                THICKNESS - depth,
                HEIGHT,
                corner=(depth, 0.0),
                edge_names={"left": "j", "top": "sides", "bottom": "sides", "right": "face"},
                region="outer",
            ),
        )
    ).mesh(0.001)
    steel = Material(K, 5000.0, 800.0)
    model = ThermalModel(
        section,
        steel,
        {"back": Insulated(), "sides": Insulated(), "face": Convection(50.0, 20.0)},
        100.0,
        element_order=2,
        interfaces={"bond": Interface(("inner", "outer"), resistance=resistance)},
    )
    found = correction_length(model, 100.0)
    expected = THICKNESS / (3 * K) + resistance * depth**2 / THICKNESS**2
    assert found.resistance == pytest.approx(expected, rel=1e-9)
