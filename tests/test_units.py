"""Unit spellings and exact conversion factors (International Yard and Pound
Agreement 1959, International Table Btu, CGPM definitions of bar and atm)."""

import pytest

from tablegen.errors import UnitError
from tablegen.units import quantity, temperature_K, unit


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
