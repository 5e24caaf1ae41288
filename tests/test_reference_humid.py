"""Humid air, dew points and the flame temperature of a humid-air flue gas, against outside sources.

* `CoolProp` (HumidAirProp.HAPropsSI, the ASHRAE RP-1485 humid-air model of Herrmann, Kretzschmar
  and Gatley): the humidity ratio of air at 60 % RH, 15 °C, 101.325 kPa. Our model is the ideal
  mixture with IAPWS-IF97 saturation and no enhancement factor; the enhancement factor of real humid
  air at 1 atm is about 1.004 (Hyland and Wexler 1983, from memory), so 0.5 % covers the model
  difference.
* `iapws` (IAPWS-IF97, `_TSat_P` and `_PSat_T`): the water dew point of a humid-air stoichiometric
  methane flue gas, the same formulation, so to 1e-6 K; and the book prints that one figure in its
  combustion sheet, its JSON sidecar and its table notes (one test reads all three).
* `cantera` (the NASA TM-4513 coefficients of nasa_gas.yaml, our nasa1993 set): the flame
  temperature with the humid air at its own 15 °C against 25 °C, the energy balance done in the test.
"""

from __future__ import annotations

import json
import re

import numpy as np
import pytest
from pypdf import PdfReader

import tablegen
from tablegen import cli

FUEL = "CH4"


def run(capsys, *argv):
    code = cli.main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_humidity_ratio_vs_coolprop_haprops():
    """CoolProp HAPropsSI('W', 'T', 288.15, 'P', 101325, 'R', 0.6): within 0.5 % (model difference above)."""
    from CoolProp.HumidAirProp import HAPropsSI
    W_ref = HAPropsSI("W", "T", 288.15, "P", 101325.0, "R", 0.6)
    air = tablegen.substance("air,rh=60%,T=15C,P=101.325kPa")
    ox = air.origin
    assert abs(ox.humidity_ratio - W_ref) <= 0.005 * W_ref
    # the substance's composition is that humidity ratio (mole fraction of water from it and the molar masses)
    y = {c.id: c.mole_fraction for c in air.components}
    M_dry = sum(v * c.M for v, c in zip(y.values(), air.components) if c.id != "H2O") / (1 - y["H2O"])
    W = y["H2O"] / (1 - y["H2O"]) * 18.015 / M_dry
    assert abs(W - ox.humidity_ratio) <= 1e-12 * W


def test_dew_point_form_reads_back_through_iapws():
    """iapws IF97 `_PSat_T`: air,dew=5C holds water at psat(5 °C)/P, and its dew point is 5 °C again."""
    from iapws.iapws97 import _PSat_T
    air = tablegen.substance("air,dew=5C,T=20C,P=95kPa")
    y = {c.id: c.mole_fraction for c in air.components}["H2O"]
    assert abs(y - _PSat_T(278.15) * 1e6 / 95000.0) <= 1e-12
    assert abs(air.dew_point_K - 278.15) <= 1e-6 and air.dew_point_P_Pa == pytest.approx(95000.0, rel=1e-15)
    assert abs(air.origin.relative_humidity - 100 * _PSat_T(278.15) / _PSat_T(293.15)) <= 1e-9


SPEC = """
[document]
title = "Dew point check"
number = "DP-1"
revision = "A"
issue_date = 2026-11-02

[substances.stoich]
name = "Stoichiometric methane flue gas"
combustion = {{ fuel = "CH4", excess_air = 0, oxidant = "air,rh=60%,T=15C", flue_pressure = "{P}" }}

[[tables]]
name = "flue"
substance = "stoich"
grid = {{ segments = [ {{ start = "300 K", stop = "400 K", step = "5 K" }} ] }}
columns = ["T", "cp", "h"]
"""


def test_dew_point_of_humid_stoichiometric_methane_flue_gas_vs_iapws_in_sheet_json_and_notes(tmp_path, capsys):
    """iapws IF97 `_TSat_P` at the water partial pressure y_H2O P: the engine to 1e-6 K; the PDF's
    combustion sheet, the sidecar and the table notes (CSVW and JSON) carry that one figure."""
    from iapws.iapws97 import _TSat_P
    P = 98000.0
    spec = tmp_path / "dp.toml"
    spec.write_text(SPEC.format(P="98 kPa"), encoding="utf-8")
    code, out, err = run(capsys, "build", str(spec), "--out", str(tmp_path / "out"))
    assert code == 0, err
    meta = json.loads((tmp_path / "out" / "dp.json").read_text(encoding="utf-8"))
    sub = meta["substances"][0]
    y = sub["combustion"]["products_wet"]["H2O"]
    T_ref = _TSat_P(y * P / 1e6)
    # JSON: full precision
    assert abs(sub["dew_point"]["T_K"] - T_ref) <= 1e-6 and sub["dew_point"]["P_Pa"] == P
    assert sub["combustion"]["figures"]["dew_point_K"]["value"] == sub["dew_point"]["T_K"]
    printed = f"{T_ref:.2f} K ({T_ref - 273.15:.2f} °C) at 98 kPa"
    # PDF: the combustion sheet, listed in the contents
    text = "\n".join(p.extract_text() for p in PdfReader(str(tmp_path / "out" / "dp.pdf")).pages)
    sheet = text[text.index("Combustion sheet: Stoichiometric methane flue gas\nDefines"):]
    assert printed in re.sub(r"\s+", " ", sheet[sheet.index("Water dew point"):][:300])
    # table notes, in the JSON and in the CSVW metadata beside the CSV
    note = next(n for n in meta["tables"][0]["notes"] if n.startswith("c water dew point"))
    assert printed in note
    csvw = json.loads((tmp_path / "out" / "flue.csv-metadata.json").read_text(encoding="utf-8"))
    assert note in csvw["rdfs:comment"]
    prop = {p["schema:propertyID"]: p for p in csvw["schema:additionalProperty"]}
    assert prop["dew_point_K"]["schema:value"] == sub["dew_point"]["T_K"]
    # rows at or below it carry the mark c, the others none (CSV mark column)
    lines = (tmp_path / "out" / "flue.csv").read_text(encoding="utf-8").splitlines()
    for line in lines[1:]:
        T, mark = float(line.split(",")[0]), line.split(",")[-1]
        assert ("c" in mark) == (T <= T_ref)


def _cantera_products_T(prod: dict, H_J_per_kmol_products: float) -> float:
    import cantera as ct
    species = {s.name: s for s in ct.Species.list_from_file("nasa_gas.yaml")}
    gas = ct.Solution(thermo="ideal-gas", species=[species[n] for n in prod])
    gas.TPX = 1500.0, ct.one_atm, prod
    gas.HP = H_J_per_kmol_products / gas.mean_molecular_weight, ct.one_atm
    return gas.T


def test_flame_temperature_uses_the_air_temperature_given_energy_balance_with_cantera():
    """cantera, nasa_gas.yaml (the TM-4513 coefficients, our nasa1993 set): the humid air enters at its
    own 15 °C unless told otherwise; the products then hold less enthalpy than with the air at 25 °C by
    the air's sensible enthalpy n_ox [h(25 °C) - h(15 °C)], and the flame is that much cooler. Tolerance
    0.01 K: same coefficients, both solvers converge far below it."""
    import cantera as ct
    ox_text = "air,rh=60%,T=15C"
    cold = tablegen.combustion(FUEL, ox_text, excess_air=0, source="nasa1993")
    warm = tablegen.combustion(FUEL, ox_text, excess_air=0, T_oxidant_K=298.15, source="nasa1993")
    assert cold.flame.T_oxidant_K == 288.15 and cold.flame.T_oxidant_source == "stated with the oxidant"
    assert warm.flame.T_oxidant_K == 298.15 and warm.flame.T_oxidant_source == "as given"
    ox = cold.oxidant
    species = {s.name: s for s in ct.Species.list_from_file("nasa_gas.yaml")}
    air = ct.Solution(thermo="ideal-gas", species=[species[n] for n in ox.composition])
    n_ox = 2.0 / ox.y_O2                                     # kmol oxidant per kmol CH4, λ = 1
    air.TPX = 298.15, ct.one_atm, dict(ox.composition)
    h25 = air.enthalpy_mole
    air.TPX = 288.15, ct.one_atm, dict(ox.composition)
    h15 = air.enthalpy_mole
    prod = dict(cold.flue_gas.mole_fractions_wet)
    n_prod = sum(cold.moles_per_kg.values()) * cold.fuel.M * 1e-3   # kmol products per kmol CH4
    gas = ct.Solution(thermo="ideal-gas", species=[species[n] for n in prod])
    gas.TPX = warm.flame.T_adiabatic_K, ct.one_atm, prod
    H_warm = gas.enthalpy_mole * n_prod                      # J per kmol CH4, products at the warm flame
    T_cold = _cantera_products_T(prod, (H_warm - n_ox * (h25 - h15)) / n_prod)
    assert abs(cold.flame.T_adiabatic_K - T_cold) <= 0.01
    assert warm.flame.T_adiabatic_K - cold.flame.T_adiabatic_K > 5.0
