"""The material library spot-checked against its cited sources, the Choi–Okos food model
against CoolProp's own implementation of the same component equations, the range warning
once per run, and ``soakwise materials``.

Values marked "from memory" were not read from the document while writing the test; the
equations of the Eurocodes are coded here from the standards (from memory) and evaluated
independently of the library's tables. Tolerances: the library stores an equation as a table
every 10 or 20 K (every 1 K near the steel's peak), read by linear interpolation: at a table
point the equation's value to rounding, which the checks below use.
"""

from __future__ import annotations

import warnings

import pytest

from advisor.cli import main
from fem import Convection, PropertyRangeWarning, ThermalModel, solids, solve
from geometries import Rectangle, Section


def k_and_c(name: str, celsius: float) -> tuple[float, float]:
    material = solids.material(name)
    c = material.heat_capacity_at(celsius) / material.density
    return float(material.conductivity_at(celsius)), float(c)


@pytest.mark.parametrize("theta", [20.0, 300.0, 650.0, 730.0, 800.0, 1000.0])
def test_structural_carbon_steel_against_en_1993_1_2(theta):
    """EN 1993-1-2:2005, 3.4.1.2-3 (from memory): c = 425 + 0.773θ − 1.69e-3θ² + 2.22e-6θ³
    below 600 °C, 666 + 13002/(738 − θ) to 735, 545 + 17820/(θ − 731) to 900, 650 above;
    λ = 54 − 0.0333θ below 800 °C, 27.3 above."""
    if theta < 600:
        c = 425 + 0.773 * theta - 1.69e-3 * theta**2 + 2.22e-6 * theta**3
    elif theta < 735:
        c = 666 + 13002 / (738 - theta)
    elif theta < 900:
        c = 545 + 17820 / (theta - 731)
    else:
        c = 650.0
    k = 54 - 0.0333 * theta if theta < 800 else 27.3
    assert k_and_c("carbon steel, structural", theta) == pytest.approx((k, c), rel=1e-9)
    assert solids.material("carbon steel, structural").density == 7850.0


def test_the_steel_peak_stores_the_latent_heat_of_the_eurocode_curve():
    """The table's ∫c dT over 700-780 °C against the equations' integral (scipy quad): the
    1 K table holds the peak within 1 %."""
    from scipy.integrate import quad

    def c(theta):
        if theta < 735:
            return 666 + 13002 / (738 - theta)
        return 545 + 17820 / (theta - 731)

    exact = quad(c, 700, 735)[0] + quad(c, 735, 780)[0]
    steel = solids.material("carbon steel, structural")
    stored = float(steel.enthalpy(780.0, 700.0)) / steel.density
    assert stored == pytest.approx(exact, rel=0.01)


@pytest.mark.parametrize("theta", [20.0, 500.0, 1000.0])
def test_austenitic_stainless_against_en_1993_1_2_annex_c(theta):
    """EN 1993-1-2:2005, Annex C (from memory): λ = 14.6 + 0.0127θ,
    c = 450 + 0.280θ − 2.91e-4θ² + 1.34e-7θ³."""
    k = 14.6 + 0.0127 * theta
    c = 450 + 0.280 * theta - 2.91e-4 * theta**2 + 1.34e-7 * theta**3
    assert k_and_c("stainless steel, austenitic", theta) == pytest.approx((k, c), rel=1e-9)


@pytest.mark.parametrize("theta", [20.0, 100.0, 160.0, 300.0, 600.0, 1200.0])
def test_concrete_against_en_1992_1_2(theta):
    """EN 1992-1-2:2004, 3.3 (from memory): upper conductivity limit
    λ = 2 − 0.2451(θ/100) + 0.0107(θ/100)²; dry specific heat 900 to 100 °C, 900 + (θ − 100)
    to 200, 1000 + (θ − 200)/2 to 400, 1100 above. (The table is every 20 K: 160 °C is a
    point; the curve's second difference bounds the error elsewhere.)"""
    k = 2 - 0.2451 * theta / 100 + 0.0107 * (theta / 100) ** 2
    if theta <= 100:
        c = 900.0
    elif theta <= 200:
        c = 900 + (theta - 100)
    elif theta <= 400:
        c = 1000 + (theta - 200) / 2
    else:
        c = 1100.0
    assert k_and_c("concrete, normal-weight", theta) == pytest.approx((k, c), rel=1e-9)


@pytest.mark.parametrize(
    "name, kelvin, k, c, rho",
    [
        # Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed. (from memory)
        ("copper, oxygen-free", 400.0, 393.0, 397.0, 8933.0),  # Table A.1, pure copper
        ("copper, oxygen-free", 1000.0, 352.0, 451.0, 8933.0),
        ("low-alloy steel 1Cr-0.5Mo", 600.0, 39.1, 575.0, 7858.0),  # Table A.1
        ("alumina, polycrystalline", 400.0, 26.4, 940.0, 3970.0),  # Table A.2
        ("alumina, polycrystalline", 1000.0, 7.85, 1225.0, 3970.0),
    ],
)
def test_tabulated_entries_against_incropera(name, kelvin, k, c, rho):
    assert k_and_c(name, kelvin - 273.15) == pytest.approx((k, c), rel=1e-9)
    assert solids.material(name).density == rho


@pytest.mark.parametrize(
    "name, celsius, k, c, rho",
    [
        # Mills, Recommended Values of Thermophysical Properties for Selected Commercial
        # Alloys (2002) (from memory)
        ("titanium alloy Ti-6Al-4V", 500.0, 12.6, 651.0, 4420.0),
        ("nickel alloy 718", 600.0, 20.2, 530.0, 8190.0),
        # ASM Handbook Vol. 2 (1990), at 25 °C (from memory)
        ("aluminium alloy 6061-T6", 25.0, 167.0, 896.0, 2700.0),
        ("aluminium alloy 7075-T6", 25.0, 130.0, 960.0, 2810.0),
        # Sarvar, Poole & Witting (1990), FR-4 conductivity (from memory)
        ("FR-4, in-plane", 25.0, 0.81, None, 1850.0),
        ("FR-4, through-thickness", 25.0, 0.29, None, 1850.0),
    ],
)
def test_alloys_and_laminate_against_their_sources(name, celsius, k, c, rho):
    got_k, got_c = k_and_c(name, celsius)
    assert got_k == pytest.approx(k, rel=1e-9)
    if c is not None:
        assert got_c == pytest.approx(c, rel=1e-9)
    assert solids.material(name).density == rho


def test_carbon_steel_rows_are_no_longer_swapped():
    """Incropera et al., 6th ed., Table A.1 at 300 K (as recalled): plain carbon steel 7854
    kg/m³, 60.5 W/(m·K); AISI 1010 7832 kg/m³, 63.9 W/(m·K); both 434 J/(kg·K)."""
    plain, aisi = solids.material("carbon steel, plain"), solids.material("carbon steel AISI 1010")
    assert (plain.density, plain.conductivity, plain.specific_heat) == (7854.0, 60.5, 434.0)
    assert (aisi.density, aisi.conductivity, aisi.specific_heat) == (7832.0, 63.9, 434.0)


def test_names_used_by_case_files_and_starters_still_resolve():
    import sys
    from pathlib import Path

    if sys.version_info >= (3, 11):
        import tomllib
    else:  # pragma: no cover - Python 3.10
        import tomli as tomllib

    root = Path(__file__).resolve().parents[1]
    names = set()
    for path in [*root.glob("examples/*.toml"), *root.glob("advisor/casefile/starters/*.toml")]:
        data = tomllib.loads(path.read_text(encoding="utf-8"))
        tables = [data.get("material", {}), *data.get("materials", {}).values()]
        names |= {t["solid"] for t in tables if "solid" in t}
    assert names  # the starters use the library
    for name in names:
        assert solids.material(name).name == name


def test_user_facing_sources_say_what_and_where_not_how_recalled():
    for name, entry in solids.ENTRIES.items():
        text = entry.material.source
        assert "memory" not in text
        if entry.valid_range is not None:
            low, high = entry.valid_range
            assert f"{low:.0f} to {high:.0f} °C" in text, name


# -- foods by Choi & Okos -------------------------------------------------------------------


@pytest.mark.parametrize(
    "component, coolprop",
    [
        ("water", "FoodWater"),
        ("ice", "FoodIce"),
        ("protein", "FoodProtein"),
        ("fat", "FoodFat"),
        ("carbohydrate", "FoodCarbohydrate"),
        ("fibre", "FoodFiber"),
        ("ash", "FoodAsh"),
    ],
)
def test_choi_okos_components_against_coolprop(component, coolprop):
    """CoolProp's incompressible Food* fluids implement the Choi–Okos component equations
    (Choi & Okos 1986, in the ASHRAE Handbook's form); k, ρ and c agree to rounding of the
    coefficients (1e-4) at -20 and -5 °C (ice) or 0.5, 20 and 60 °C (the others)."""
    props = pytest.importorskip("CoolProp.CoolProp", reason="CoolProp (correlations extra)")
    from fem.food_properties import component as value

    temperatures = (-20.0, -5.0) if component == "ice" else (0.5, 20.0, 60.0)
    for t in temperatures:
        reference = [
            props.PropsSI(key, "T", t + 273.15, "P", 101325.0, f"INCOMP::{coolprop}")
            for key in ("L", "D", "C")
        ]
        ours = [value(component, q, t) for q in ("conductivity", "density", "specific_heat")]
        assert ours == pytest.approx(reference, rel=1e-4)


def test_lean_beef_above_freezing_is_the_mixture_of_its_components():
    """At 20 °C: ρ = 1/Σ(x/ρ_i), k = Σ(x/ρ_i)ρ k_i (parallel model), c = Σ x c_i, with the
    component values from CoolProp's Food* fluids (independent of the code under test); the
    library's enthalpy slope and k at 20 °C within 0.5 % (interpolation of its tables)."""
    props = pytest.importorskip("CoolProp.CoolProp", reason="CoolProp (correlations extra)")
    fractions = {"Water": 0.735, "Protein": 0.225, "Fat": 0.030, "Ash": 0.010}

    def food(kind, key):
        return props.PropsSI(key, "T", 293.15, "P", 101325.0, f"INCOMP::Food{kind}")

    rho = 1 / sum(x / food(kind, "D") for kind, x in fractions.items())
    k = sum(x / food(kind, "D") * rho * food(kind, "L") for kind, x in fractions.items())
    c = sum(x * food(kind, "C") for kind, x in fractions.items())
    beef = solids.material("lean beef")
    assert float(beef.conductivity_at(20.0)) == pytest.approx(k, rel=5e-3)
    slope = float(beef.enthalpy(21.0, 19.0)) / 2.0 / beef.density
    assert slope == pytest.approx(c, rel=5e-3)
    assert 0.4 < k < 0.6 and 3400 < c < 3800  # lean meat near 0.5 W/(m K), 3.5 kJ/(kg K)


def test_lean_beef_latent_heat_is_that_of_its_freezable_water():
    """From −40 to 20 °C the enthalpy rises by the latent heat of the water frozen at −40 °C,
    x_ice = (x_w − 0.4 x_p)(1 − T_f/T) (Tchigeov's equation, ASHRAE Handbook, Refrigeration,
    ch. 19; from memory), plus the sensible heat; the sensible part is bounded by the frozen and
    unfrozen mixtures' specific heats (2 and 3.6 kJ/(kg K), from the test above and Choi–Okos),
    so the rise lies between L x_ice + 60 K · 2 and L x_ice + 60 K · 3.7 kJ/kg."""
    x_ice = (0.735 - 0.4 * 0.225) * (1 - (-1.7) / (-40.0))
    latent = 333.6e3 * x_ice
    beef = solids.material("lean beef")
    rise = float(beef.enthalpy(20.0, -40.0)) / beef.density
    assert latent + 60 * 2.0e3 < rise < latent + 60 * 3.7e3
    # ASHRAE's enthalpy of lean beef from −40 to 20 °C is about 330-370 kJ/kg (from memory)
    assert 300e3 < rise < 400e3


# -- the range, once per run ----------------------------------------------------------------


def _small_run(name: str, start: float, fluid: float):
    mesh = Section(
        Rectangle(
            0.02, 0.01, edge_names=dict.fromkeys(("bottom", "right", "top", "left"), "outside")
        )
    ).mesh(0.005)
    model = ThermalModel(mesh, solids.material(name), {"outside": Convection(50.0, fluid)}, start)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        solution = solve(model, 600.0, time_step=20.0)
    range_warnings = [w for w in caught if issubclass(w.category, PropertyRangeWarning)]
    return solution, range_warnings


def test_leaving_the_range_warns_once_per_run():
    """7075-T6 data cover 25-300 °C: a part cooled from 400 °C to air at 20 °C leaves them at
    both ends; the run's checks carry one note for it (a note on the inputs, not a failed
    check of the run's accuracy), and no warning is raised per step."""
    solution, per_step = _small_run("aluminium alloy 7075-T6", 400.0, 20.0)
    lines = [w for w in solution.checks.notes if "aluminium alloy 7075-T6" in w]
    assert len(lines) == 1 and "25 to 300 °C" in lines[0]
    assert not [w for w in solution.checks.warnings if "library" in w]
    assert per_step == []
    assert solution.stats.steps >= 30  # many steps, one line


def test_staying_inside_the_range_does_not_warn():
    solution, per_step = _small_run("aluminium alloy 7075-T6", 250.0, 40.0)
    assert solution.checks.notes == ()
    assert per_step == []


# -- soakwise materials ----------------------------------------------------------------------


def test_materials_lists_names_with_ranges(capsys):
    assert main(["materials"]) == 0
    out = capsys.readouterr().out
    for name, entry in solids.ENTRIES.items():
        line = next(line for line in out.splitlines() if line.startswith(name + " "))
        assert entry.range_words() in line


def test_materials_name_prints_a_table_and_a_plot(tmp_path, capsys):
    from PIL import Image

    plot = tmp_path / "steel.png"
    assert main(["materials", "carbon steel, structural", "--plot", str(plot)]) == 0
    out = capsys.readouterr().out
    rows = [line.split() for line in out.splitlines() if line.strip()[:1].isdigit()]
    temperatures = [float(row[0]) for row in rows]
    assert temperatures[0] == 20.0 and temperatures[-1] == 1200.0
    k_20, c_20 = float(rows[0][1]), float(rows[0][2])
    assert k_20 == pytest.approx(54 - 0.0333 * 20, rel=1e-3)  # EN 1993-1-2, shown to 4 digits
    assert c_20 == pytest.approx(425 + 0.773 * 20 - 1.69e-3 * 400 + 2.22e-6 * 8000, rel=1e-3)
    with Image.open(plot) as picture:
        assert picture.format == "PNG" and picture.size[0] > 400


def test_materials_name_errors(capsys):
    assert main(["materials", "carbon steel"]) == 2
    err = capsys.readouterr().err
    assert "'carbon steel, plain'" in err and "soakwise materials" in err
    assert main(["materials", "potato", "--plot", "potato.svg"]) == 2
    assert "ending in .png" in capsys.readouterr().err


def test_docstring_example_of_the_library():
    import doctest

    result = doctest.testmod(solids)
    assert result.attempted > 0 and result.failed == 0
