"""The state and species commands as a user runs them: output, JSON keys, errors."""

import json
import subprocess
import sys

import pytest

from tablegen.cli import main


def run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_state_json_has_the_documented_keys(capsys):
    code, out, _ = run(capsys, "state", "CO2", "--T", "25C,1000K", "--P", "10bar", "--json")
    assert code == 0
    rows = json.loads(out)
    assert [r["T_K"] for r in rows] == pytest.approx([298.15, 1000.0])
    need = {"substance", "T_K", "M", "R", "cp", "cv", "k", "h", "u", "s0", "Pr", "vr", "a", "cp_molar",
            "h_molar", "s0_molar", "dh298_molar", "s", "s_molar", "h_datum", "P_ref_Pa", "anchor"}
    assert need <= set(rows[0])
    # unit conventions: kJ/kg and J/mol; s at 10 bar below s° by R ln 10
    assert rows[0]["h"] * 1000 * rows[0]["M"] / 1000 == pytest.approx(rows[0]["h_molar"], rel=1e-12)
    assert rows[1]["s0"] - rows[1]["s"] == pytest.approx(rows[1]["R"] * 2.302585092994046, rel=1e-12)


def test_state_text_table(capsys):
    code, out, _ = run(capsys, "state", "air", "--T", "77F,540R", "--units", "SI", "--T-unit", "K")
    assert code == 0 and "kJ/(kg K)" in out and "298.15" in out and "300.00" in out
    # typed in °F: the answer in °F with °R beside, and US customary units (77 °F = 536.67 °R, exact)
    code, out, _ = run(capsys, "state", "air", "--T", "77F,540R")
    assert code == 0 and "[°F]" in out and "[°R]" in out and "Btu/(lbm °R)" in out
    assert "536.67" in out and "77.00" in out and "540.00" in out


@pytest.mark.parametrize("argv,fragment", [
    (["state", "unobtainium", "--T", "300K"], "unknown substance"),
    (["state", "CO2", "--T", "300"], "has no unit"),
    (["state", "CO2", "--T", "300X"], "unknown unit"),
    (["state", "CO2", "--T", "-300C"], "above 0 K"),
    (["state", "CO2", "--T", "7000K"], "outside the data range"),
    (["state", "CO2", "--T", "300K", "--P", "-1bar"], "--P"),
    (["state", "CO2", "--T", "abc"], "not a number"),
    (["state", "CH4=0.5,N2=0.4", "--T", "300K"], "sum to"),
    (["state", "CO2", "--T", "300K", "--h-datum", "elsewhere"], "--h-datum"),
    (["state", "CO2"], "required"),
    (["nosuchcommand"], "invalid choice"),
])
def test_bad_input_exits_2_with_one_line(capsys, argv, fragment):
    code, out, err = run(capsys, *argv)
    assert code == 2
    assert err.startswith("tablegen: ") and err.count("\n") == 1 and fragment in err
    assert "Traceback" not in err


def test_species_list_and_json(capsys):
    code, out, _ = run(capsys, "species", "--json")
    data = json.loads(out)
    ids = {r["id"] for r in data}
    assert {"CO2", "H2O", "n-C4H10", "n-C6H14"} <= ids and len(data) > 700


def test_help_is_quick_to_import_and_ends_with_an_example():
    res = subprocess.run([sys.executable, "-X", "importtime", "-m", "tablegen", "--help"],
                         capture_output=True, text=True)
    assert res.returncode == 0 and "example:" in res.stdout
    assert "numpy" not in res.stderr  # heavy libraries load only in the commands that need them


@pytest.mark.parametrize("cmd", ["demo", "build", "state", "species", "process", "combust", "compare",
                                 "chart", "fit", "export"])
def test_every_help_ends_with_an_example(capsys, cmd):
    with pytest.raises(SystemExit) as e:
        main([cmd, "--help"])
    assert e.value.code == 0
    out = capsys.readouterr().out.rstrip()
    tail = out[out.rfind("example"):]
    assert out.rfind("example") > 0 and f"tablegen {cmd}" in tail


def test_check_reports_the_jump_at_every_breakpoint(capsys):
    import numpy as np

    from tablegen.data.library import library
    from tablegen.thermo.polynomial import Polynomial
    code, out, _ = run(capsys, "species", "--check", "--json")
    assert code == 0
    jumps = json.loads(out)["breakpoint_jumps"]
    lib = library()
    expected = sum(r.poly.n_intervals - 1 for d in lib.search_order for r in lib.datasets[d].records())
    assert len(jumps) == expected
    # CO2 of TM-4513 at 1000 K, by evaluating each interval's own coefficients there
    j = next(x for x in jumps if x["dataset"] == "nasa1993" and x["id"] == "CO2")
    rec = lib.record("CO2", source="nasa1993")
    lo = Polynomial(np.array([500.0, 2000.0]), rec.poly.coeffs[:1]).evaluate(np.array([1000.0]))
    hi = Polynomial(np.array([500.0, 2000.0]), rec.poly.coeffs[1:2]).evaluate(np.array([1000.0]))
    assert j["cp"] == pytest.approx(abs(hi["cp"][0] - lo["cp"][0]) / abs(lo["cp"][0]), rel=1e-6)
