"""The state and species commands as a user runs them: output, JSON keys, errors."""

import json
import re
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


# ---------------------------------------------------------------- messages a user acts on
OUT_OF_RANGE = """
[document]
title = "Tern Marsh cold box"
number = "TM-3"
revision = "A"
issue_date = 2026-09-01

[[tables]]
name = "n2-cold"
substance = "N2"
grid = { segments = [ { start = "150 K", stop = "300 K", step = "50 K" } ] }
"""


def _options_named(message: str) -> list:
    return re.findall(r"(?<![\w-])--[a-z][a-z-]*", message)


def test_refusal_outside_the_data_range_names_what_the_build_takes_and_it_works(capsys, tmp_path):
    """build refuses a temperature below the data range naming the spec key and an option
    build has; following either gives the book, the rows beyond the data marked x and the
    document control block saying who allowed it (common practice of document control)."""
    p = tmp_path / "cold.toml"
    p.write_text(OUT_OF_RANGE, encoding="utf-8")
    code, out, err = run(capsys, "build", str(p), "--out", str(tmp_path / "a"))
    assert code == 2 and err.count("\n") == 1 and not (tmp_path / "a").exists()
    assert "extrapolate = true" in err and _options_named(err) == ["--extrapolate"]
    with pytest.raises(SystemExit):
        main(["build", "--help"])
    assert "--extrapolate" in capsys.readouterr().out
    code, out, err = run(capsys, "build", str(p), "--out", str(tmp_path / "a"), "--extrapolate")
    assert code == 0
    rows = (tmp_path / "a" / "n2-cold.csv").read_text(encoding="utf-8").splitlines()
    assert [r.split(",")[-1] for r in rows[1:]] == ["x", "", "", ""]     # 150 K below the 200 K of the data
    from pypdf import PdfReader
    first = " ".join(PdfReader(str(tmp_path / "a" / "cold.pdf")).pages[0].extract_text().split())
    assert "Extrapolation allowed in every table (tablegen build --extrapolate)" in first
    assert json.loads((tmp_path / "a" / "cold.json").read_text(encoding="utf-8"))["spec"]["document"][
        "extrapolate_all"] is True
    # the spec key the message names does it too, and the document says which table asked
    p.write_text(OUT_OF_RANGE.replace('substance = "N2"', 'substance = "N2"\nextrapolate = true'),
                 encoding="utf-8")
    code, out, err = run(capsys, "build", str(p), "--out", str(tmp_path / "b"))
    assert code == 0
    first = " ".join(PdfReader(str(tmp_path / "b" / "cold.pdf")).pages[0].extract_text().split())
    assert "Extrapolation allowed in table 1 (spec key extrapolate)" in first


def test_every_command_names_only_an_extrapolation_option_it_has(capsys):
    """A refusal outside the data range names the command's own option, or none: state names
    --extrapolate and it works; chart (which never extrapolates) and process name none."""
    from tablegen.cli import COMMANDS, make_parser
    for name, _, _ in COMMANDS:
        sub = make_parser(name)._subparsers._group_actions[0].choices[name]
        opt = sub.get_default("extrapolate_option")
        if opt is not None:
            assert opt in sub.format_help(), name
    code, out, err = run(capsys, "state", "CO2", "--T", "150K")
    assert code == 2 and _options_named(err) == ["--extrapolate"]
    code, out, err = run(capsys, "state", "CO2", "--T", "150K", "--extrapolate")
    assert code == 0 and "150" in out
    from tablegen.core.errors import DataRangeError
    e = DataRangeError("CO2: T = 150 K is outside the data range 200-6000 K", "200 to 6000 K")
    assert "extrapolate=True" in str(e)                      # the Python API's keyword
    assert str(e.offering(None)) == "CO2: T = 150 K is outside the data range 200-6000 K; allowed: 200 to 6000 K"


def test_a_notice_is_said_once_per_run(capsys, tmp_path):
    """A note true of every table (a user record replacing a shipped one) appears once in a
    build and once in a comparison of the book, and notice() drops a repeated text."""
    from tablegen.commands import common
    common.hold_notices()
    for text in ("note: a", "note: a", "note: b"):
        common.notice(None, text)
    common.release_notices(True)
    assert capsys.readouterr().err.splitlines() == ["note: a", "note: b"]
    user = tmp_path / "co2.toml"
    assert main(["export", "CO2", "--format", "toml", "--id", "CO2", "--out", str(user), "--quiet"]) == 0
    p = tmp_path / "two.toml"
    head = OUT_OF_RANGE.split("[[tables]]")[0]
    p.write_text(head + "".join(f"""
[[tables]]
name = "co2-{n}"
substance = "CO2"
grid = {{ segments = [ {{ start = "300 K", stop = "400 K", step = "50 K" }} ] }}
""" for n in "ab"), encoding="utf-8")
    for argv in (["build", str(p), "--out", str(tmp_path / "o")],
                 ["compare", str(p), str(tmp_path / "o"), "--out", str(tmp_path / "c")]):
        code, out, err = run(capsys, *argv, "--data", str(user))
        assert code == 0, err
        lines = err.splitlines()
        assert sum("replaces the shipped" in ln for ln in lines) == 1 and len(lines) == len(set(lines))


def test_files_that_exist_are_counted_and_the_first_named(capsys, tmp_path):
    """'2 files already exist (first: ...)': the count and the first name, in plural."""
    argv = ["chart", "N2", "--kind", "ts", "--format", "both", "--out", str(tmp_path), "--quiet"]
    assert main(argv) == 0
    code, out, err = run(capsys, *argv)
    assert code == 2 and re.match(r"tablegen: 2 files already exist \(first: \S+\); pass --force", err)


def test_a_humid_oxidant_is_not_called_dry(capsys):
    """Air at 60 % relative humidity is humid air: the combust answer must not call it dry."""
    code, out, err = run(capsys, "combust", "--fuel", "CH4", "--excess-air", "15",
                         "--oxidant", "air,rh=60%,T=25C")
    assert code == 0 and "RH 60" in out and "dry air, RH" not in out
