"""Unit spellings and exact conversion factors (International Yard and Pound
Agreement 1959, International Table Btu, CGPM definitions of bar and atm)."""

import pytest

from tablegen.core.errors import UnitError
from tablegen.core.units import quantity, temperature_K, unit


@pytest.mark.parametrize("text,factor", [
    ("kJ/(kg K)", 1e3), ("kJ/kg-K", 1e3), ("kJ/(kg·K)", 1e3), ("kJ/kgK", 1e3), ("kJ/kg/K", 1e3),
    ("Btu/lbm", 2326.0),                 # exact: 1055.05585262 J / 0.45359237 kg
    ("Btu/(lbm R)", 4186.8),             # exact, the IT calorie per gram kelvin
    ("kJ/kmol", 1.0), ("psia", 6894.757293168361), ("atm", 101325.0), ("bar", 1e5),
    ("kJ/m3", 1e3), ("kJ/(m³ K)", 1e3), ("Btu/ft3", 1055.05585262 / 0.3048 ** 3),
])
def test_spellings_and_exact_factors(text, factor):
    assert unit(text).factor == pytest.approx(factor, rel=1e-15)


def test_temperatures():
    assert temperature_K("77F") == pytest.approx(298.15, rel=1e-15)
    assert temperature_K("540R") == pytest.approx(300.0, rel=1e-15)
    assert temperature_K("-40C") == pytest.approx(233.15, rel=1e-15)
    assert quantity("-40F", "temperature") == pytest.approx(233.15, rel=1e-15)   # -40 °F = -40 °C
    with pytest.raises(UnitError, match="no unit"):
        temperature_K("300")
    with pytest.raises(UnitError, match="above 0 K"):
        temperature_K("-300C")
    with pytest.raises(UnitError, match="not temperature"):
        quantity("1bar", "temperature")


# ------------------------------------------------------- US customary factors, gauge pressures, flows
def test_customary_factors_match_scipy_constants():
    """scipy.constants (CODATA and the exact definitions of the customary units) as the outside source."""
    from scipy import constants as c

    from tablegen.core import units as U
    assert U.BTU == pytest.approx(c.Btu_IT, rel=1e-15)
    assert U.PSI == pytest.approx(c.psi, rel=1e-15)
    assert U.LBM == pytest.approx(c.lb, rel=1e-15)
    assert U.HP == pytest.approx(c.hp, rel=1e-15)          # mechanical horsepower, 745.69987... W
    assert U.INCH == pytest.approx(c.inch, rel=1e-15) and U.FT == pytest.approx(c.foot, rel=1e-15)
    for text, factor in [("Btu/lbm", c.Btu_IT / c.lb), ("Btu/(lbm R)", c.Btu_IT / c.lb / (5 / 9)),
                         ("psia", c.psi), ("hp", c.hp), ("Btu/h", c.Btu_IT / 3600),
                         ("MMBtu/h", 1e6 * c.Btu_IT / 3600), ("lb/h", c.lb / 3600), ("lb/s", c.lb),
                         ("t/h", 1000 / 3600), ("kg/h", 1 / 3600), ("ft3/min", c.foot ** 3 / 60),
                         ("m3/h", 1 / 3600), ("hPa", 100.0), ("kmol/h", 1000 / 3600),
                         ("lbmol/h", c.lb * 1000 / 3600)]:
        assert unit(text).factor == pytest.approx(factor, rel=1e-14), text


def test_normal_and_standard_volume_flows():
    """Nm³ at 0 °C, 101.325 kPa: the CODATA molar volume of an ideal gas (scipy.constants); standard ft³
    at 60 °F and 14.696 psia (common practice in the US gas industry): 379.5 ft³/lbmol, the figure of
    the trade (from memory), here from scipy's R and unit definitions."""
    from scipy import constants as c
    vm = c.physical_constants["molar volume of ideal gas (273.15 K, 101.325 kPa)"][0]   # m³/mol
    assert unit("Nm3/h").factor == pytest.approx(1 / vm / 3600, rel=1e-9)
    T_s = c.convert_temperature(60.0, "F", "K")
    v_s = c.R * T_s / (14.696 * c.psi)                                                   # m³/mol
    assert unit("SCFM").factor == pytest.approx(1 / v_s * c.foot ** 3 / 60, rel=1e-9)
    assert v_s * c.lb * 1000 / c.foot ** 3 == pytest.approx(379.5, rel=2e-4)


def test_gauge_pressure_against_the_barometer():
    from tablegen.core.units import barometer_Pa, parse_pressure, pressure_Pa
    assert pressure_Pa("9barg", barometer_Pa=0.95e5) == pytest.approx(9.95e5, rel=1e-15)
    p = parse_pressure("120 psig", barometer_Pa=barometer_Pa("14.696psia"))
    assert p.gauge == "psig" and p.unit.symbol == "psia" and p.Pa == pytest.approx(134.696 * 6894.757293168361)
    assert p.gauge_Pa == pytest.approx(120 * 6894.757293168361, rel=1e-12)
    assert pressure_Pa("0kPag", barometer_Pa=barometer_Pa(None)) == 101325.0   # default: 1 standard atmosphere
    assert pressure_Pa("1.013bar(g)", barometer_Pa=1e5) == pytest.approx(2.013e5)
    with pytest.raises(UnitError, match="below vacuum"):
        pressure_Pa("-2barg", "--compress-to", barometer_Pa=101325.0)
    with pytest.raises(UnitError, match="gauge"):
        pressure_Pa("9barg")                           # no barometer applies: refused, never guessed
    with pytest.raises(UnitError, match="gauge"):
        unit("psig", "pressure")


@pytest.mark.parametrize("text,word", [("0bar", "from 0.3"), ("-1bar", "from 0.3"), ("1.01325", "no unit"),
                                       ("950bar", "from 0.3"), ("1barg", "absolute"), ("abc", "not a number")])
def test_barometer_refusals(text, word):
    from tablegen.core.units import barometer_Pa
    with pytest.raises(UnitError) as e:
        barometer_Pa(text)
    assert word in str(e.value)


def test_flows():
    from tablegen.core.units import parse_flow
    f = parse_flow("2.5kg/s")
    assert f.kg_per_s == 2.5 and f.text == "2.5 kg/s"
    assert parse_flow("9 t/h").mass_kg_per_s(None) == pytest.approx(2.5, rel=1e-15)
    assert parse_flow("36 kmol/h").mass_kg_per_s(28.0) == pytest.approx(0.28, rel=1e-14)
    for bad, word in [("-3kg/s", "negative"), ("3 furlongs/h", "unknown flow unit"), ("3", "not a flow"),
                      ("3bar", "unknown flow unit")]:
        with pytest.raises(UnitError, match=word):
            parse_flow(bad)
    with pytest.raises(UnitError, match="molar mass"):
        parse_flow("100Nm3/h").mass_kg_per_s(None)
