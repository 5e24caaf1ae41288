"""A flue-gas book states everything it was computed from.

The combustion sheet in the PDF, the combustion figures in the JSON sidecar and the CSVW
metadata, cautions filtered by the fuel and printed once, humid air as a substance in every
command, the stated uncertainty of a fuel analysis and a measured O2 carried into λ, the
flue-gas composition and every printed U, and the refusals of bad input.

Outside references: the element balance of methane in air done by hand in the tests (common
practice); the law of propagation of uncertainty, JCGM 100:2008 5.1.2, applied to those closed
forms; ISO 6974 practice for an analysis measured part by part and then normalised (from memory).
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest
from pypdf import PdfReader

import tablegen
from tablegen import cli
from tablegen.calc.burn_result import figure_values

FUEL = "CH4=87%±0.5%,C2H6=6%±0.2%,C3H8=2%±0.1%,N2=3%±0.1%,CO2=2%±0.1%"

BOOK = """
document = {{ title = "Boiler 3 flue-gas tables", number = "B3-FG-01", revision = "A", issue_date = 2026-11-03 }}

[substances.flue]
name = "Boiler 3 flue gas"
combustion = {{ fuel = "{fuel}", {amount}, oxidant = "air,rh=60%,T=15C" }}

[[tables]]
name = "flue-si"
title = "Boiler 3 flue gas, SI"
substance = "flue"
grid = {{ segments = [ {{ start = "300 K", stop = "1500 K", step = "50 K" }} ] }}
columns = ["T", "cp", "h", "s0"]

[[tables.charts]]
kind = "ts"

[[tables]]
name = "flue-us"
title = "Boiler 3 flue gas, US"
substance = "flue"
units = "US"
temperature_units = ["°F"]
grid = {{ segments = [ {{ start = "80 °F", stop = "2000 °F", step = "40 °F" }} ] }}
columns = ["T", "cp", "h"]

[[tables]]
name = "intake"
title = "Combustion air"
substance = "air,rh=60%,T=15C"
grid = {{ segments = [ {{ start = "250 K", stop = "400 K", step = "10 K" }} ] }}
columns = ["T", "cp", "h"]
"""


def run(capsys, *argv):
    code = cli.main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def build(tmp_path, capsys, fuel=FUEL, amount='o2_dry = "3.5%±0.2%"', name="b3"):
    spec = tmp_path / f"{name}.toml"
    spec.write_text(BOOK.format(fuel=fuel, amount=amount), encoding="utf-8")
    out = tmp_path / f"out-{name}"
    code, o, err = run(capsys, "build", str(spec), "--out", str(out))
    assert code == 0, err
    text = "\n".join(p.extract_text() for p in PdfReader(str(out / f"{name}.pdf")).pages)
    meta = json.loads((out / f"{name}.json").read_text(encoding="utf-8"))
    return out, re.sub(r"\s+", " ", text), meta


@pytest.fixture(scope="module")
def b3(tmp_path_factory):
    tmp = tmp_path_factory.mktemp("b3")
    spec = tmp / "b3.toml"
    spec.write_text(BOOK.format(fuel=FUEL, amount='o2_dry = "3.5%±0.2%"'), encoding="utf-8")
    assert cli.main(["build", str(spec), "--out", str(tmp / "out"), "--quiet"]) == 0
    text = "\n".join(p.extract_text() for p in PdfReader(str(tmp / "out" / "b3.pdf")).pages)
    meta = json.loads((tmp / "out" / "b3.json").read_text(encoding="utf-8"))
    return tmp / "out", re.sub(r"\s+", " ", text), meta


# ---------------------------------------------------------------- the sheet
def test_the_book_states_the_fuel_the_air_the_amount_and_the_results(b3):
    out, text, meta = b3
    contents = text[text.index("Contents"):text.index("How to read these tables Each")]
    assert "Combustion sheet: Boiler 3 flue gas" in contents
    sheet = text[text.index("Combustion sheet: Boiler 3 flue gas Defines"):]
    for phrase in ("C2H6", "C3H8", "RH 60 % at 15 °C and 101.325 kPa", "Humidity ratio", "measured flue-gas O2 3.5 % ± 0.2 %",
                   "excess air", "Stoichiometric", "per normal m³ fuel", "Flue-gas composition",
                   "Water dew point", "LHV", "HHV", "per kmol", "Adiabatic flame temperature",
                   "fuel at 25 °C (the default), oxidant at 15 °C (stated with the oxidant)",
                   "Uncertainty from the stated inputs", "Cautions for this fuel"):
        assert phrase in sheet, phrase
    r = tablegen.combustion(FUEL, "air,rh=60%,T=15C", o2_dry=3.5, o2_uncertainty=0.2)
    assert f"λ = {r.air_ratio:.4f} ± {r.uncertainty.U('lambda'):.4f}" in sheet
    assert f"{r.heating_values.lhv_J_per_kg / 1e6:.3f} ± {r.uncertainty.U('lhv_mass'):.3f}" in sheet
    # the JSON sidecar: the inputs as given and every figure at full precision
    sub = meta["substances"][0]
    c = sub["combustion"]
    assert c["fuel"]["as_given"]["values"]["C2H6"] == 0.06 and c["fuel"]["uncertainty_k2"]["C2H6"] == 0.002
    assert c["oxidant"]["relative_humidity_percent"] == 60 and c["oxidant"]["temperature_K"] == 288.15
    assert c["amount_given"] == {"key": "o2_dry", "value": 3.5, "U_k2": 0.2, "unit": "%"}
    assert c["figures"]["lambda"]["value"] == r.air_ratio
    assert c["figures"]["lambda"]["U_k2"] == r.uncertainty.U("lambda")
    assert c["figures"]["t_adiabatic_K"]["value"] == r.flame.T_adiabatic_K
    # and the spec the fingerprint covers holds them too
    spec_sub = meta["spec"]["substances"]["flue"]["combustion"]
    assert spec_sub["fuel"]["as_given"]["values"]["C2H6"] == 0.06 and spec_sub["oxidant"]["humidity_ratio"] > 0
    # the sidecar of a book with a humid air and an uncertain combustion passes its documented schema,
    # checked by the jsonschema package (Draft 2020-12, an independent validator)
    import jsonschema
    schema = json.loads((Path(__file__).parents[1] / "docs" / "book-json-schema.json").read_text(encoding="utf-8"))
    jsonschema.Draft202012Validator(schema).validate(meta)
    # the CSVW metadata of each table of the gas: the same figures, in the units of the JSON
    s = figure_values(r)
    for name in ("flue-si", "flue-us"):
        csvw = json.loads((out / f"{name}.csv-metadata.json").read_text(encoding="utf-8"))
        props = {p["schema:propertyID"]: p["schema:value"] for p in csvw["schema:additionalProperty"]}
        assert props["lambda"] == s["lambda"] and props["lhv_mass"] == s["lhv_mass"]
        assert props["products_wet.CO2"] == s["products_wet"]["CO2"]


def test_one_dew_point_everywhere_and_a_labelled_line_on_the_T_s_chart(b3):
    out, text, meta = b3
    T = meta["substances"][0]["dew_point"]["T_K"]
    shown = f"{T:.2f} K ({T - 273.15:.2f} °C) at 101.325 kPa"
    assert text.count(shown) >= 4       # substance section, sheet, two table notes
    assert f"water dew point {T:.1f} K at 1.013 bar: condensation below" in text          # the chart line
    appendix = text[text.index("Appendix A."):]
    assert f"water dew point {shown}" in appendix
    assert "may condense below about" not in text
    # the how-to-read page explains the mark
    assert "c at or below the water dew point of the gas: water may condense at this temperature; ideal-gas" in text


def test_the_uncertainty_of_the_inputs_reaches_every_table_and_the_appendix_names_it(b3):
    out, text, meta = b3
    for t in meta["tables"][:2]:
        comps = {c for b in t["uncertainty"]["keys"]["cp"]["bands"] for c in b["components"]}
        assert {"composition: measured O2 (dry)", "composition: fuel CH4", "composition: fuel C2H6"} <= comps
    appendix = text[text.index("Appendix A."):]
    assert "measured O2 (dry): cp" in appendix and "fuel C2H6: cp" in appendix
    assert "intake" not in [t["name"] for t in meta["tables"] if "composition: fuel CH4" in json.dumps(t)]


def test_cautions_are_printed_once_and_referenced_from_the_tables(b3):
    out, text, meta = b3
    assert "acid" not in text.lower() and "acid" not in json.dumps(meta["cautions"]).lower()
    assert "hydrogen" not in " ".join(meta["cautions"]).lower()
    toxic = [c for c in meta["cautions"] if "toxic and asphyxiant: keep it out" in c]
    assert len(toxic) == 1 and toxic[0].startswith("C") and "Applies to: Boiler 3 flue gas" in toxic[0]
    assert text.count("keep it out of occupied spaces") == 1
    cid = toxic[0].split(".", 1)[0]
    for t in meta["tables"][:2]:
        assert cid in t["cautions"] and any(cid in n for n in t["notes"])
    assert meta["tables"][2]["cautions"] == []


def test_a_sulfur_bearing_fuel_gets_the_acid_dew_point_caution_and_hydrogen_its_own(tmp_path, capsys):
    out, text, meta = build(tmp_path, capsys, fuel="CH4=0.97,H2S=0.01,H2=0.02", amount="excess_air = 15",
                            name="sour")
    joined = " ".join(meta["cautions"])
    assert "acid dew point" in joined and "The fuel contains sulfur" in joined
    assert "The fuel contains hydrogen (H2 2 % by volume)" in joined and "invisible" in joined
    assert text.count("acid dew point (sulfuric acid condensing)") == 1
    sweet = tablegen.combustion("CH4=0.98,N2=0.02", excess_air=15)
    assert not any("sulfur" in c or "acid" in c or "hydrogen" in c for c in sweet.cautions)
    assert "S to SO2" not in sweet.cautions[0]


# ---------------------------------------------------------------- humid air everywhere
def test_humid_air_is_a_substance_in_every_command(tmp_path, capsys):
    text = "air,rh=60%,T=15C"
    code, out, err = run(capsys, "state", text, "--T", "5C,15C", "--json")
    assert code == 0, err
    rows = json.loads(out)
    assert rows[0]["condensing"] and not rows[1]["condensing"]
    assert rows[0]["dew_point_K"] == tablegen.substance(text).dew_point_K
    code, out, err = run(capsys, "process", text, "--from", "T=15C,P=1bar", "--compress-to", "8bar", "--eta", "0.8")
    assert code == 0 and "water dew point of this gas" in out
    code, out, err = run(capsys, "process", "air,rh=80%,T=25C", "--from", "T=400K,P=8bar", "--heat-to", "30C")
    assert code == 0 and "caution: state 2" in out and "water condenses there" in out
    code, out, err = run(capsys, "chart", text, "--out", str(tmp_path / "ch"))
    assert code == 0, err
    code, out, err = run(capsys, "export", text, "--format", "toml", "--id", "HUMID", "--out", str(tmp_path / "h.toml"))
    assert code == 0, err
    # one syntax with combust --oxidant: the same composition
    r = tablegen.combustion("CH4", text, excess_air=10)
    sub = tablegen.substance(text)
    assert {c.id: c.mole_fraction for c in sub.components} == pytest.approx(r.oxidant.composition, rel=1e-15)


# ---------------------------------------------------------------- propagation against closed forms
def _lambda_of_dry_o2(y, a):
    """CH4 in dry air of O2 fraction a at dry flue O2 y: element balance by hand,
    y (1 + 2λ(1-a)/a + 2(λ-1)) = 2(λ-1)  ->  λ = (2 - y) / (2 - 2y/a)."""
    return (2 - y) / (2 - 2 * y / a)


def test_lambda_uncertainty_from_a_measured_o2_matches_the_closed_form():
    """JCGM 100:2008 5.1.2 on the closed form above: U(λ) = |dλ/dy| U(y)."""
    a = 0.2096
    r = tablegen.combustion("CH4", "air", o2_dry=3.5, o2_uncertainty=0.2)
    y, U = 0.035, 0.002
    assert abs(r.air_ratio - _lambda_of_dry_o2(y, a)) <= 1e-12
    d = (-(2 - 2 * y / a) + (2 - y) * 2 / a) / (2 - 2 * y / a) ** 2     # dλ/dy, quotient rule
    assert abs(r.uncertainty.U("lambda") - abs(d) * U) <= 1e-6 * abs(d) * U


def test_flue_co2_uncertainty_from_the_fuel_analysis_matches_the_closed_form():
    """CH4 x ± U with N2 the balance, dry air at λ = 1.2: dry CO2 = x / D with
    D = 1 + 2xλ(1-a)/a + 2x(λ-1) (element balance by hand). The analysis is measured part by part
    and normalised afterwards (ISO 6974 practice, from memory), so raising CH4 by δ moves the
    normalised x by δ(1 - x): U(y) = |dy/dx| (1 - x) U (JCGM 100:2008 5.1.2)."""
    a, lam, x, U = 0.2096, 1.2, 0.9, 0.01
    r = tablegen.combustion("CH4=0.9±0.01,N2=0.1", "air", air_ratio=lam)
    k = 2 * lam * (1 - a) / a + 2 * (lam - 1)
    D = 1 + k * x
    assert abs(r.flue_gas.mole_fractions_dry["CO2"] - x / D) <= 1e-14
    dy = (D - x * k) / D ** 2
    assert abs(r.uncertainty.products["dry"]["CO2"] - abs(dy) * (1 - x) * U) <= 1e-6 * abs(dy) * (1 - x) * U


def test_flue_name_and_spec_table_carry_the_o2_uncertainty(capsys, tmp_path):
    name = "flue@CH4=0.9±0.01,N2=0.1@o2-dry=3%±0.2%"
    sub = tablegen.substance(name)
    assert sub.origin.uncertainty is not None and sub.origin.amount_given.U_k2 == 0.2
    from tablegen.calc import flue
    s2 = flue.substance_from_spec({"fuel": {"composition": {"CH4": 90, "N2": 10}, "uncertainty": {"CH4": "1%"}},
                                   "o2_dry": "3%±0.2%"}, "tables[0].substance")
    assert s2.origin.uncertainty.U("lambda") == pytest.approx(sub.origin.uncertainty.U("lambda"), rel=1e-9)


# ---------------------------------------------------------------- the combust text
def test_combust_names_the_humid_air_and_both_inlet_temperatures(capsys):
    code, out, err = run(capsys, "combust", "--fuel", "CH4", "--excess-air", "12", "--oxidant", "air,rh=60%,T=15C")
    assert code == 0, err
    assert "oxidant: humid air, RH 60 % at 15 °C and 101.325 kPa" in out and "dry air, RH" not in out
    assert "fuel at 25 °C (the default), oxidant at 15 °C (stated with the oxidant)" in out
    code, out, err = run(capsys, "combust", "--fuel", "CH4", "--excess-air", "12", "--oxidant", "air,rh=60%,T=15C",
                         "--oxidant-temperature", "300C")
    assert "oxidant at 300 °C (as given)" in out


# ---------------------------------------------------------------- bad input
@pytest.mark.parametrize("argv, says", [
    (["combust", "--fuel", "CH4", "--excess-air", "10", "--oxidant", "air,rh=120%,T=15C"], "outside 0 to 100 %"),
    (["combust", "--fuel", "CH4", "--excess-air", "10", "--oxidant", "air,rh=-1%,T=15C"], "outside 0 to 100 %"),
    (["combust", "--fuel", "CH4", "--excess-air", "10", "--oxidant", "air,w=-2g/kg"], "is negative"),
    (["combust", "--fuel", "CH4", "--excess-air", "10", "--oxidant", "air,dew=20C,T=15C"], "above the air temperature"),
    (["combust", "--fuel", "CH4", "--o2-dry", "3.5%±4%"], "larger than the O2 itself"),
    (["combust", "--fuel", "CH4", "--o2-dry", "3.5±0.2"], "with '%' on both"),
    (["combust", "--fuel", "CH4=87%±90%,N2=13%", "--excess-air", "10"], "makes its fraction negative"),
    (["combust", "--fuel", "CH4=87%±0.5,N2=13%", "--excess-air", "10"], "write CH4=87%±0.5%"),
    (["state", "air,rh=120%,T=15C", "--T", "300K"], "outside 0 to 100 %"),
    (["state", "CH4=0.9±0.01,N2=0.1", "--T", "300K"], "read only in fuel analyses"),
])
def test_bad_input_is_one_line_exit_2(capsys, argv, says):
    code, out, err = run(capsys, *argv)
    assert code == 2 and out == "" and len(err.strip().splitlines()) == 1 and says in err
    assert err.startswith("tablegen: ") and "; " in err


@pytest.mark.parametrize("fuel, amount, says", [
    ("CH4=87%±90%,N2=13%", "excess_air = 10", "makes its fraction negative"),
    ("CH4", 'o2_dry = "3.5%±4%"', "larger than the O2 itself"),
])
def test_bad_input_in_a_spec_writes_nothing(tmp_path, capsys, fuel, amount, says):
    spec = tmp_path / "bad.toml"
    spec.write_text(BOOK.format(fuel=fuel, amount=amount), encoding="utf-8")
    code, out, err = run(capsys, "build", str(spec), "--out", str(tmp_path / "out"))
    assert code == 2 and len(err.strip().splitlines()) == 1 and says in err
    assert not (tmp_path / "out").exists() or not any((tmp_path / "out").iterdir())
