"""The pieces together, as a user meets them: the demo book carries charts with a
process overlay and the combustion cautions; a flue gas named on the command line
works in every command that takes a substance."""

import json

import pytest
from pypdf import PdfReader

import tablegen
from tablegen.cli import main


@pytest.fixture(scope="module")
def demo(demo_book):
    return demo_book


def test_demo_book_has_charts_with_an_overlay(demo):
    text = "\n".join(p.extract_text() for p in PdfReader(demo / "kestrel-fen-desk.pdf").pages)
    assert "Temperature-entropy (T-s) chart" in text
    assert "instrument-air compressor IA-1" in text and "2s" in text
    assert "boiler B-2 gas path" in text


def test_combustion_cautions_reach_the_book(demo):
    meta = json.loads((demo / "kestrel-fen-desk.json").read_text())
    joined = " ".join(meta["cautions"])
    for phrase in ("toxic and asphyxiant", "licensed engineering practice"):
        assert phrase in joined
    assert "acid" not in joined          # the demo fuel holds no sulfur
    text = "\n".join(p.extract_text() for p in PdfReader(demo / "kestrel-fen-desk.pdf").pages[:8])
    assert "asphyxiant" in text


def test_demo_flue_gas_is_the_combustion_result():
    # the book's flue gas is the products substance of the fuel at 15 % excess air
    r = tablegen.combustion("CH4=86%±0.4%,C2H6=2.5%±0.1%,C3H8=0.5%±0.05%,CO2=7.5%±0.3%,N2=3.5%±0.2%",
                            "air,rh=70%,T=15C", excess_air=15)
    assert r.air_ratio == pytest.approx(1.15)
    assert r.products.cautions and "asphyxiant" in " ".join(r.products.cautions)


def test_flue_gas_name_in_state_and_process(capsys):
    name = "flue@CH4@excess-air=15"
    assert main(["state", name, "--T", "400K,1500K", "--json"]) == 0
    rows = json.loads(capsys.readouterr().out)
    assert rows[0]["substance"] == name
    assert main(["process", name, "--from", "T=1500K,P=1.05bar", "--heat-to", "420K", "--json"]) == 0
    res = json.loads(capsys.readouterr().out)
    assert res["q"] < 0


def test_book_states_uncertainty_per_column_and_appendix(demo):
    meta = json.loads((demo / "kestrel-fen-desk.json").read_text())
    t = meta["tables"][0]
    assert t["uncertainty"]["coverage_factor"] == 2
    assert any(n.startswith("Uncertainty U (k = 2)") for n in t["notes"])
    assert meta["appendix"] and meta["appendix"][0]["title"] == "Uncertainty of the printed values"


def test_csv_uncertainty_columns_when_asked(tmp_path):
    from tablegen.spec import book as specmod
    src = tmp_path / "u.toml"
    src.write_text('''[document]
title = "U columns"
number = "T-1"
revision = "A"
issue_date = 2026-12-01
max_pressure = "10 bar"
uncertainty_columns = true

[[tables]]
name = "n2"
substance = "N2"
columns = ["T", "cp", "h"]
grid = { segments = [ { start = "300 K", stop = "1500 K", step = "100 K" } ] }
''')
    assert main(["build", str(src), "--out", str(tmp_path / "out"), "--quiet"]) == 0
    lines = [ln for ln in (tmp_path / "out" / "n2.csv").read_text().splitlines() if not ln.startswith("#")]
    head = lines[0].split(",")
    assert "U_cp [kJ/(kg K)]" in head and "U_h [kJ/kg]" in head
    import tablegen.calc.uncertainty as unc
    import numpy as np
    sp = specmod.load(str(src))
    meta = json.loads((tmp_path / "out" / "u.json").read_text())
    dec = {c["key"]: c["decimals"] for c in meta["tables"][0]["columns"]}
    # printed in kJ/(kg K) and kJ/kg: one unit of the last digit is 10^-d kJ
    b = unc.budget(sp.tables[0].substance, sp.tables[0].T_K, ["cp", "h"], P_max_Pa=1e6,
                   printed_step={"cp": 10.0 ** -dec["cp"] * 1e3, "h": 10.0 ** -dec["h"] * 1e3})
    i = head.index("U_cp [kJ/(kg K)]")
    got = np.array([float(r.split(",")[i]) for r in lines[1:]])
    np.testing.assert_allclose(got, b.U("cp") / 1e3, rtol=1e-12)


def test_csv_validity_columns_give_z_and_departure_bounds_against_coolprop(tmp_path):
    """document.validity_columns: the CSV gets Z and the real-gas departure bound of each
    column at max_pressure. Checked against CoolProp's reference equation for nitrogen
    (Span et al. 2000) at 10 bar: Z within the stated uncertainty of the second-virial
    estimate, and the real cp - cp0 inside the stated bound; U itself does not grow."""
    import numpy as np
    import CoolProp.CoolProp as CP
    from tablegen.calc import realgas as rg
    from tablegen.core.constants import R_MOLAR
    src = tmp_path / "v.toml"
    src.write_text("""[document]
title = "Validity columns"
number = "T-2"
revision = "A"
issue_date = 2026-12-01
max_pressure = "10 bar"
validity_columns = true
uncertainty_columns = true

[[tables]]
name = "n2"
substance = "N2"
columns = ["T", "cp", "h"]
grid = { segments = [ { start = "300 K", stop = "1000 K", step = "100 K" } ] }
""")
    assert main(["build", str(src), "--out", str(tmp_path / "out"), "--quiet"]) == 0
    lines = (tmp_path / "out" / "n2.csv").read_text().splitlines()
    head = lines[0].split(",")
    rows = np.array([[float(x) for x in ln.split(",")[:-1]] for ln in lines[1:]])
    col = {h: rows[:, i] for i, h in enumerate(head[:-1])}
    T = col["T [K]"]
    est = rg.virial_mixture(__import__("tablegen").substance("N2").components, T)
    U_Z = est.U_B * 1e6 / (R_MOLAR * T)
    Z_ref = CP.PropsSI("Z", "T", T, "P", np.full_like(T, 1e6), "Nitrogen")
    assert np.all(np.abs(col["Z [-]"] - Z_ref) <= U_Z)
    cp_real = CP.PropsSI("Cpmass", "T", T, "P", np.full_like(T, 1e6), "Nitrogen") / 1e3
    cp0 = CP.PropsSI("Cp0mass", "T", T, "P", np.full_like(T, 1e6), "Nitrogen") / 1e3
    assert np.all(np.abs(cp_real - cp0) <= col["realgas_cp [kJ/(kg K)]"])
    # U is the ideal-gas values' own: far below the 10-bar departure
    assert np.all(col["U_cp [kJ/(kg K)]"] < col["realgas_cp [kJ/(kg K)]"] / 5)
    meta = json.loads((tmp_path / "out" / "n2.csv-metadata.json").read_text())
    names = [c["name"] for c in meta["tableSchema"]["columns"]]
    assert "Z" in names and "realgas_cp" in names


def test_charts_grouped_after_the_tables(tmp_path):
    spec = tmp_path / "g.toml"
    chart = '''
[[tables.charts]]
kind = "ts"
paper = "A4"
T_range = ["300K", "900K"]
pressures = ["1bar", "4bar"]
'''
    spec.write_text('''[document]
title = "Grouped charts"
number = "G-1"
revision = "A"
issue_date = 2026-12-01
chart_placement = "grouped"

[[tables]]
name = "n2"
substance = "N2"
grid = { segments = [ { start = "300 K", stop = "900 K", step = "100 K" } ] }
''' + chart + '''
[[tables]]
name = "co2"
substance = "CO2"
grid = { segments = [ { start = "300 K", stop = "900 K", step = "100 K" } ] }
''' + chart)
    assert main(["build", str(spec), "--out", str(tmp_path / "o"), "--quiet"]) == 0
    pages = [p.extract_text() for p in PdfReader(tmp_path / "o" / "g.pdf").pages]
    table2 = max(i for i, t in enumerate(pages) if "Table 2." in t)
    charts = [i for i, t in enumerate(pages) if "Temperature-entropy (T-s) chart" in t]
    assert len(charts) == 2 and min(charts) > table2
    assert any("Charts" in t for t in pages[:3])


CU_SPEC = '''[document]
title = "Composition uncertainty"
number = "C-1"
revision = "A"
issue_date = 2026-12-01

[substances.gas]
mixture = { CH4 = 0.9, N2 = 0.1 }
fraction_uncertainty = { %s }

[[tables]]
name = "gas"
substance = "gas"
columns = ["T", "cp"]
grid = { segments = [ { start = "300 K", stop = "900 K", step = "100 K" } ] }
'''


def test_default_decimals_follow_the_uncertainty(tmp_path):
    """No thrown-away precision: where the spec sets no digits, half a unit of the last
    printed digit stays at or below U/4 (U: the data part, as the budget's digit rule) at every
    row (tablegen.calc.uncertainty.digits_for rule)."""
    import numpy as np

    import tablegen.calc.uncertainty as unc
    src = tmp_path / "d.toml"
    src.write_text(CU_SPEC.replace("fraction_uncertainty = { %s }\n", ""))
    assert main(["build", str(src), "--out", str(tmp_path / "o"), "--quiet"]) == 0
    meta = json.loads((tmp_path / "o" / "d.json").read_text())
    d = {c["key"]: c["decimals"] for c in meta["tables"][0]["columns"]}["cp"]
    assert {c["key"]: c["decimals"] for c in meta["spec"]["tables"][0]["columns"]}["cp"] == "auto"
    mix = tablegen.mixture({"CH4": 0.9, "N2": 0.1})
    U = unc.budget(mix, np.arange(300.0, 901.0, 100.0), ["cp"]).U("cp", "data") / 1e3   # kJ/(kg K)
    assert 0.5 * 10.0 ** -d <= U.min() / 4 * (1 + 1e-12)
    assert 0.5 * 10.0 ** -(d - 1) > U.min() / 4      # one digit fewer would throw precision away


def test_fraction_uncertainty_reaches_the_budget(tmp_path):
    import numpy as np

    import tablegen.calc.uncertainty as unc
    src = tmp_path / "cu.toml"
    src.write_text(CU_SPEC % "CH4 = 0.01, N2 = 0.01")
    assert main(["build", str(src), "--out", str(tmp_path / "o"), "--quiet"]) == 0
    meta = json.loads((tmp_path / "o" / "cu.json").read_text())
    band = meta["tables"][0]["uncertainty"]["keys"]["cp"]["bands"][0]
    mix = tablegen.mixture({"CH4": 0.9, "N2": 0.1})
    b = unc.budget(mix, np.arange(300.0, 901.0, 100.0), ["cp"], composition_u={"CH4": 0.01, "N2": 0.01},
                   printed_step={"cp": 0.1})
    assert band["components"]["composition"] == pytest.approx(b.to_json()["keys"]["cp"]["bands"][0]
                                                              ["components"]["composition"], rel=1e-9)
    assert meta["spec"]["substances"]["gas"]["fraction_uncertainty"]["u"] == {"CH4": 0.01, "N2": 0.01}


def test_fraction_uncertainty_of_a_non_component_is_refused(tmp_path, capsys):
    src = tmp_path / "bad.toml"
    src.write_text(CU_SPEC % "CO2 = 0.01")
    assert main(["build", str(src), "--out", str(tmp_path / "o")]) == 2
    err = capsys.readouterr().err
    assert "substances.gas.fraction_uncertainty.CO2" in err and not (tmp_path / "o").exists()


def test_chart_of_combustion_products_shows_their_cautions(tmp_path):
    assert main(["chart", "flue@CH4@excess-air=15", "--kind", "ts", "--format", "pdf", "--out", str(tmp_path),
                 "--quiet"]) == 0
    pdf = next(tmp_path.glob("*.pdf"))
    text = " ".join(p.extract_text() for p in PdfReader(pdf).pages)
    assert "toxic and asphyxiant" in " ".join(text.split())


def test_state_and_process_print_the_cautions_of_combustion_products(capsys):
    name = "flue@CH4@excess-air=15"
    assert main(["state", name, "--T", "400K"]) == 0
    out = capsys.readouterr().out
    assert "caution: Flue gas is toxic and asphyxiant" in out
    assert main(["state", name, "--T", "400K", "--json"]) == 0
    assert any("asphyxiant" in c for c in json.loads(capsys.readouterr().out)[0]["cautions"])
    assert main(["process", name, "--from", "T=600K,P=1bar", "--heat-to", "420K", "--json"]) == 0
    assert any("asphyxiant" in c for c in json.loads(capsys.readouterr().out)["cautions"])
