"""The pieces together, as a user meets them: the demo book carries charts with a
process overlay and the combustion cautions; a flue gas named on the command line
works in every command that takes a substance."""

import json

import pytest
from pypdf import PdfReader

import tablegen
from tablegen.cli import main


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    out = tmp_path_factory.mktemp("demo")
    assert main(["demo", "--out", str(out), "--quiet"]) == 0
    return out


def test_demo_book_has_charts_with_an_overlay(demo):
    text = "\n".join(p.extract_text() for p in PdfReader(demo / "kestrel-fen-desk.pdf").pages)
    assert "Temperature-entropy (T-s) chart" in text
    assert "instrument-air compressor IA-1" in text and "2s" in text
    assert "boiler B-2 gas path" in text


def test_combustion_cautions_reach_the_book(demo):
    meta = json.loads((demo / "kestrel-fen-desk.json").read_text())
    joined = " ".join(meta["cautions"])
    for phrase in ("toxic and asphyxiant", "acid dew point", "licensed engineering practice"):
        assert phrase in joined
    text = "\n".join(p.extract_text() for p in PdfReader(demo / "kestrel-fen-desk.pdf").pages[:8])
    assert "asphyxiant" in text


def test_demo_flue_gas_is_the_combustion_result():
    # the book's flue gas is the products substance of the fuel at 15 % excess air
    r = tablegen.combustion("CH4:0.86,C2H6:0.025,C3H8:0.005,CO2:0.075,N2:0.035", excess_air=15)
    assert r.summary["lambda"] == pytest.approx(1.15)
    assert r.products.cautions and "asphyxiant" in " ".join(r.products.cautions)


def test_flue_gas_name_in_state_and_process(capsys):
    name = "flue@CH4@excess-air=15"
    assert main(["state", name, "--T", "400K,1500K", "--json"]) == 0
    rows = json.loads(capsys.readouterr().out)
    assert rows[0]["substance"] == name
    assert main(["process", name, "--from", "T=1500K,P=1.05bar", "--heat-to", "420K", "--json"]) == 0
    res = json.loads(capsys.readouterr().out)
    assert res["q"] < 0
