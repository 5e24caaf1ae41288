"""Answers as a field engineer asks for them: the units typed, gauge pressures, flows and power,
the answer first.

Outside sources: scipy.constants (CODATA 2018 R and molar volume, and the exact definitions of the
International Table Btu, the pound, the psi and the mechanical horsepower); ISO 6976 for the
heating value of propane (from memory); the element balance of propane burning in air (common
practice). Everything else checks that the printed figures are the engine's figures, converted.
"""

import json
import math
import re

import pytest
from scipy import constants as C

import tablegen
from tablegen.cli import main

COMPRESSOR = ["process", "air", "--from", "T=15C,P=1.013bar", "--compress-to", "9bar", "--eta", "0.84",
              "--flow", "2.5kg/s"]
US_COMPRESSOR = ["process", "air", "--from", "T=60F,P=14.7psia", "--compress-to", "120psig", "--eta", "0.84"]


def run(capsys, *argv):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def row(text: str, name: str, unit: str) -> list[str]:
    """The cells of a state-table row 'name unit v1 v2 [v2s]'."""
    for line in text.splitlines():
        cells = line.split()
        if len(cells) >= 3 and cells[0] == name and cells[1] == unit:
            return cells[2:]
    raise AssertionError(f"no row {name} [{unit}] in:\n{text}")


# ------------------------------------------------------------------ the compressor of the issue
def test_compressor_answers_in_celsius_and_bar_with_power(capsys):
    code, out, err = run(capsys, *COMPRESSOR)
    assert code == 0, err
    code, js, _ = run(capsys, *COMPRESSOR, "--json")
    d = json.loads(js)
    first = out.splitlines()[0]
    # the answer first: start and end in the units typed, w, and the power at the flow
    assert first.startswith("air 15.0 °C, 1.013 bar -> ")
    assert f"{d['T2_K'] - 273.15:.1f} °C, 9.000 bar" in first
    assert f"w = {d['w']:+.1f} kJ/kg" in first and "at 2.5 kg/s" in first
    # T2 in °C is T2 in K minus 273.15 (the definition of the Celsius scale)
    t_c, t_k = row(out, "T", "°C"), row(out, "T", "K")
    for c, k in zip(t_c, t_k):
        assert float(c) == pytest.approx(float(k) - 273.15, abs=0.0051)
    assert float(t_c[1]) == pytest.approx(d["T2_K"] - 273.15, abs=0.005)
    assert row(out, "P", "bar")[:2] == ["1.0130", "9.0000"]
    # power = w × flow, exactly; hp is the mechanical horsepower (scipy.constants.hp)
    assert d["power"] == d["w"] * 2.5 and d["mass_flow"] == 2.5
    assert d["units"]["power"] == "kW"
    assert f"{d['power']:.1f} kW ({d['power'] * 1e3 / C.hp:.1f} hp) in" in first
    # the volume flows are the ideal-gas volumes of the mass flow at inlet and outlet (scipy R)
    for key, T, P in (("volume_flow_1", d["T1_K"], d["P1_Pa"]), ("volume_flow_2", d["T2_K"], d["P2_Pa"])):
        assert d[key] == pytest.approx(2.5 * C.R * T / (d["M"] * 1e-3 * P), rel=1e-12)


def test_gauge_pressure_with_a_stated_barometer(capsys):
    argv = [*COMPRESSOR[:5], "9barg", *COMPRESSOR[6:], "--barometer", "0.95bar"]
    code, js, err = run(capsys, *argv, "--json")
    assert code == 0, err
    d = json.loads(js)
    assert d["P2_Pa"] == pytest.approx(9.95e5, rel=1e-15)          # 9 barg at 0.95 bar = 9.95 bar absolute
    echo = d["input"]["pressures"][1]
    assert echo["typed"] == "9barg" and echo["gauge_Pa"] == pytest.approx(9e5) and echo["barometer_Pa"] == 95000.0
    assert d["input"]["typed"]["compress-to"] == "9barg" and d["input"]["typed"]["barometer"] == "0.95bar"
    code, out, _ = run(capsys, *argv)
    first = out.splitlines()[0]
    assert "9.000 barg (9.950 bar)" in first and "barometer 0.95 bar" in first
    assert row(out, "P", "barg")[1] == "9.0000" and row(out, "P", "bar")[1] == "9.9500"
    assert "absolute minus barometer 0.95 bar" in out


def test_us_customary_question_gets_a_us_customary_answer(capsys):
    code, out, err = run(capsys, *US_COMPRESSOR)
    assert code == 0, err
    d = json.loads(run(capsys, *US_COMPRESSOR, "--json")[1])
    btu_per_lbm = C.Btu_IT / C.lb                                   # J/kg
    # °F from K by scipy's conversion; psia from Pa by scipy's psi; Btu/lbm from kJ/kg
    T2_F = C.convert_temperature(d["T2_K"], "K", "F")
    assert float(row(out, "T", "°F")[1]) == pytest.approx(T2_F, abs=0.005)
    assert float(row(out, "T", "°R")[1]) == pytest.approx(C.convert_temperature(d["T2_K"], "K", "R"), abs=0.005)
    # 120 psig against the standard atmosphere (14.696 psia): 134.696 psia
    assert d["P2_Pa"] == pytest.approx(120 * C.psi + C.atm, rel=1e-15)
    assert float(row(out, "P", "psia")[1]) == pytest.approx((120 * C.psi + C.atm) / C.psi, abs=0.0005)
    assert row(out, "P", "psig")[1] == "120.000"
    assert float(row(out, "h", "Btu/lbm")[1]) == pytest.approx(d["h2"] * 1e3 / btu_per_lbm, abs=0.0005)
    assert f"w = {d['w'] * 1e3 / btu_per_lbm:+.1f} Btu/lbm" in out.splitlines()[0]
    assert "kJ" not in "\n".join(out.splitlines()[:20])


def test_units_overrides(capsys):
    code, out, _ = run(capsys, *US_COMPRESSOR, "--units", "SI", "--T-unit", "K", "--P-unit", "kPa")
    assert code == 0
    assert "[°F]" not in out and row(out, "T", "K") and row(out, "P", "kPa") and row(out, "h", "kJ/kg")
    assert row(out, "P", "kPag")         # a gauge value was typed: the gauge reading comes along
    code, out, _ = run(capsys, *COMPRESSOR, "--units", "US")
    assert row(out, "T", "°F") and row(out, "P", "psia") and "hp (" in out.splitlines()[0]


@pytest.mark.parametrize("extra,word", [
    (["--flow=-2kg/s"], "negative"),
    (["--flow", "2furlongs/h"], "unknown flow unit"),
    (["--flow", "2.5"], "not a flow"),
    (["--barometer", "0bar"], "barometric pressure"),
    (["--barometer=-1bar"], "barometric pressure"),
    (["--barometer", "1.01325"], "no unit"),
    (["--units", "metric"], "--units"),
    (["--T-unit", "bar"], "--T-unit"),
    (["--P-unit", "K"], "--P-unit"),
])
def test_bad_flow_and_unit_options_exit_2_with_one_line(capsys, extra, word):
    code, out, err = run(capsys, *COMPRESSOR[:-2], *extra)
    assert code == 2 and out == ""
    assert err.startswith("tablegen: ") and err.count("\n") == 1 and word in err


def test_gauge_pressure_below_vacuum_is_refused(capsys):
    code, out, err = run(capsys, "process", "air", "--from", "T=15C,P=1bar", "--throttle-to", "-2barg")
    assert code == 2 and out == "" and err.count("\n") == 1 and "below vacuum" in err
    code, out, err = run(capsys, "process", "air", "--from", "T=15C,P=-2barg", "--heat-to", "50C")
    assert code == 2 and err.count("\n") == 1 and "below vacuum" in err


def test_flows_that_cannot_apply_are_refused(capsys):
    code, _, err = run(capsys, "process", "--incompressible", "water", "--from", "T=20C,P=1bar",
                       "--compress-to", "5bar", "--flow", "10Nm3/h")
    assert code == 2 and "molar mass" in err and err.count("\n") == 1
    code, _, err = run(capsys, "process", "N2", "--from", "T=20C,P=1bar", "--heat-v-to", "100C",
                       "--flow", "1kg/s")
    assert code == 2 and "closed rigid vessel" in err


def test_normal_volume_flow_and_heat_duty(capsys):
    """1000 Nm³/h of N2: the CODATA molar volume at 0 °C and 101.325 kPa (scipy.constants) gives the
    amount; duty = q × flow."""
    code, js, err = run(capsys, "process", "N2", "--from", "T=20C,P=3bar", "--heat-to", "180C",
                        "--flow", "1000Nm3/h", "--json")
    assert code == 0, err
    d = json.loads(js)
    vm = C.physical_constants["molar volume of ideal gas (273.15 K, 101.325 kPa)"][0]
    assert d["mass_flow"] == pytest.approx(1000 / 3600 / vm * d["M"] * 1e-3, rel=1e-9)
    assert d["normal_volume_flow"] * 3600 == pytest.approx(1000, rel=1e-9)
    assert d["heat_duty"] == d["q"] * d["mass_flow"] and d["power"] == 0
    out = run(capsys, "process", "N2", "--from", "T=20C,P=3bar", "--heat-to", "180C", "--flow", "1000Nm3/h")[1]
    shown = re.search(r"; ([0-9.]+) kW in at 1000 Nm³/h$", out.splitlines()[0])
    assert float(shown.group(1)) == pytest.approx(d["heat_duty"], rel=5e-4)      # 4 significant digits


# ------------------------------------------------------------------ the answer first, notes once
def test_brief_prints_only_the_answer_line(capsys):
    full = run(capsys, *COMPRESSOR)[1]
    code, out, _ = run(capsys, *COMPRESSOR, "--brief")
    assert code == 0 and out.count("\n") == 1 and out == full.splitlines()[0] + "\n"


def test_method_comparison_only_on_request(capsys):
    assert "method comparison" not in run(capsys, *COMPRESSOR)[1]
    out = run(capsys, *COMPRESSOR, "--compare")[1]
    assert "method comparison" in out and "power law, k at 298.15 K" in out
    assert "comparison" in json.loads(run(capsys, *COMPRESSOR, "--json")[1])     # always in the JSON


def test_mixing_note_only_with_verbose_and_once_in_help(capsys):
    for argv in (COMPRESSOR, ["state", "air", "--T", "15C"]):
        code, out, err = run(capsys, *argv)
        assert code == 0 and "mixing term" not in out + err
        code, out, err = run(capsys, *argv, "--verbose")
        assert (out + err).count("mixing term") == 1
    for cmd in ("process", "state"):
        with pytest.raises(SystemExit):
            main([cmd, "--help"])
        assert capsys.readouterr().out.count("mixing term") == 1


# ------------------------------------------------------------------ enthalpy datum
def test_sensible_datum_by_default_and_formation_on_request(capsys):
    """h = 0 at 0 °C by default (the rule of tablegen.thermo.substance.default_datum); the formation
    datum on request; differences of h (the work) are the same on both (common practice)."""
    from tablegen.thermo.substance import Datum, default_datum
    assert default_datum() == Datum("sensible", 273.15, 0.0)
    assert default_datum(reacting=True) == Datum("formation")
    base = ["process", "methane", "--from", "T=0C,P=1bar", "--compress-to", "4bar", "--json"]
    sens = json.loads(run(capsys, *base)[1])
    form = json.loads(run(capsys, *base, "--h-datum", "formation")[1])
    assert abs(sens["h1"]) <= 1e-12 and "sensible" in sens["h_datum"]
    ch4 = tablegen.substance("methane")
    assert form["h1"] == pytest.approx(float(ch4.properties(273.15)["h"]) / 1e3, rel=1e-12)
    assert form["h1"] < -4000          # the formation datum of methane: about -4.7 MJ/kg
    assert sens["w"] == pytest.approx(form["w"], rel=1e-12)
    rows = json.loads(run(capsys, "state", "methane", "--T", "0C,25C", "--json")[1])
    assert abs(rows[0]["h"]) <= 1e-12 and rows[1]["h"] > 0


# ------------------------------------------------------------------ state
def test_state_in_the_units_typed(capsys):
    code, out, _ = run(capsys, "state", "air", "--T", "15C,307C")
    assert code == 0 and "[°C]" in out and "[K]" in out
    lines = [ln.split() for ln in out.splitlines() if ln.strip().startswith(("15.00", "307.00"))]
    assert [ln[1] for ln in lines] == ["288.15", "580.15"]
    code, out, _ = run(capsys, "state", "air", "--T", "60F", "--P", "120psig")
    assert "[°F]" in out and "[Btu/lbm]" in out and "120.000 psig (134.696 psia, barometer 14.6959 psia)" in out
    rows = json.loads(run(capsys, "state", "air", "--T", "60F", "--P", "120psig", "--barometer", "14.2psia",
                           "--json")[1])
    r = rows[0]
    assert r["P_Pa"] == pytest.approx(134.2 * C.psi, rel=1e-14)
    assert r["input"] == {"T": "60F", "P": "120psig", "P_gauge_Pa": pytest.approx(120 * C.psi),
                          "barometer_Pa": pytest.approx(14.2 * C.psi), "P_gauge_unit": "psig"}
    assert r["units"]["h"] == "kJ/kg" and r["units"]["T_K"] == "K"


# ------------------------------------------------------------------ combustion
PROPANE = ["combust", "--fuel", "propane", "--excess-air", "20", "--flow", "50kg/h"]
#: ISO 6976, net (inferior) calorific value of propane at 25 °C, molar basis, kJ/mol (from memory),
#: with the molar mass of propane, 44.097 g/mol (ISO 6976, from memory).
ISO6976_HI_C3H8_25C = 2043.11
M_C3H8 = 44.097


def test_propane_burner_heat_input_and_flue_gas_flow(capsys):
    code, js, err = run(capsys, *PROPANE, "--json")
    assert code == 0, err
    d = json.loads(js)
    f = d["flow"]
    m = 50 / 3600
    assert f["fuel_mass_flow"] == pytest.approx(m, rel=1e-15)
    # heat input = LHV × fuel flow (kW); LHV within 0.1 % of ISO 6976 (the tolerance of the ISO checks
    # in test_burn: calorimetry against the enthalpies of formation of the data)
    assert f["heat_input_lhv"] == pytest.approx(d["lhv_mass"] * 1e3 * m, rel=1e-14)
    assert f["heat_input_lhv"] == pytest.approx(ISO6976_HI_C3H8_25C / M_C3H8 * 1e3 * m, rel=1e-3)
    assert f["heat_input_hhv"] == pytest.approx(d["hhv_mass"] * 1e3 * m, rel=1e-14)
    # flue gas from the element balance (common practice): C3H8 + 5λ O2 in air of the shipped
    # composition -> 3 CO2 + 4 H2O + 5(λ-1) O2 + the air's N2 and Ar; normal m³ by the CODATA
    # molar volume at 0 °C and 101.325 kPa (scipy.constants)
    lam, y_O2, y_N2, y_Ar = 1.2, 0.2096, 0.7812, 0.0092
    air = 5 * lam / y_O2
    wet = 3 + 4 + 5 * (lam - 1) + air * (y_N2 + y_Ar)
    vm = C.physical_constants["molar volume of ideal gas (273.15 K, 101.325 kPa)"][0]
    n_fuel = m / (tablegen.substance("propane").M * 1e-3)
    assert f["flue_gas_volume_flow_wet"] == pytest.approx(wet * n_fuel * vm, rel=1e-6)
    assert f["flue_gas_volume_flow_dry"] == pytest.approx((wet - 4) * n_fuel * vm, rel=1e-6)
    assert f["flue_gas_mass_flow_wet"] == pytest.approx(d["flue_gas_mass_wet_per_kg"] * m, rel=1e-14)
    # the text shows the same figures, MMBtu/h from scipy's Btu
    out = run(capsys, *PROPANE)[1]
    mmbtu = f["heat_input_lhv"] * 1e3 * 3600 / (1e6 * C.Btu_IT)
    assert re.search(rf"heat input, LHV basis\s+{f['heat_input_lhv']:.1f} kW\s+{mmbtu:.3f} MMBtu/h", out)
    assert f"{f['flue_gas_volume_flow_wet'] * 3600:.1f} m³/h" in out


def test_combust_answers_in_fahrenheit_when_asked_in_fahrenheit(capsys):
    argv = ["combust", "--fuel", "methane", "--excess-air", "15", "--ref-temperature", "60F"]
    out = run(capsys, *argv)[1]
    d = json.loads(run(capsys, *argv, "--json")[1])
    dew_F = C.convert_temperature(d["dew_point_K"], "K", "F")
    assert f"{dew_F:.1f} °F" in out and "60.00 °F" in out and "°C" not in out.replace("°C)", "")
    out = run(capsys, *argv, "--T-unit", "C")[1]
    assert f"{d['dew_point_K'] - 273.15:.1f} °C ({d['dew_point_K']:.1f} K)" in out


def test_combust_flow_refusals(capsys):
    for extra, word in ((["--flow=-50kg/h"], "negative"), (["--flow", "50kg"], "unknown flow unit")):
        code, out, err = run(capsys, *PROPANE[:-2], *extra)
        assert code == 2 and out == "" and err.count("\n") == 1 and word in err


# ------------------------------------------------------------------ specs
SPEC = """
[document]
title = "Gauge test"
number = "T-1"
revision = "A"
issue_date = 2026-01-01
{doc}

[[tables]]
name = "air"
substance = "air"
grid = {{ list = ["300 K", "400 K"] }}
columns = ["T", "cp"]
"""


def _spec(tmp_path, doc):
    from tablegen.spec import book as S
    p = tmp_path / "g.toml"
    p.write_text(SPEC.format(doc=doc), encoding="utf-8")
    return S.load(p)


def test_spec_gauge_pressures_and_barometer(tmp_path):
    from tablegen.core.errors import SpecError
    s = _spec(tmp_path, 'barometer = "0.95 bar"\nmax_pressure = "9 barg"')
    assert s.document.max_pressure_Pa == pytest.approx(9.95e5) and s.normalised["document"]["barometer_Pa"] == 95000.0
    s = _spec(tmp_path, 'max_pressure = "9 barg"')          # default barometer 1.01325 bar
    assert s.document.max_pressure_Pa == pytest.approx(9e5 + 101325.0)
    assert "barometer_Pa" not in s.normalised["document"]   # older specs keep their fingerprint
    for doc, word in (('barometer = "0 bar"', "barometer"), ('barometer = "1 barg"', "absolute"),
                      ('max_pressure = "-2 barg"', "below vacuum"),
                      ('reference = { name = "x", T = "15 C", P = "0 barg" }', "gauge")):
        with pytest.raises(SpecError, match=word):
            _spec(tmp_path, doc)
