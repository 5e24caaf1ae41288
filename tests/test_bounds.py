"""Bounds on everything, one stderr line on every refusal: the regression cases of a hostile test.

Each case once crashed, printed garbage with exit 0, or printed more than one line. The
rule checked is the project's (README, "Commands"; docs/spec.md): bad input prints one
line ``tablegen: <what was wrong>; <what is allowed>``, exits 2 and writes nothing.
Limits are the documented ones (docs/spec.md "Limits and speed", docs/compare.md).
"""

from __future__ import annotations

import json
import os
import textwrap
import warnings
from pathlib import Path

import numpy as np
import pytest

import tablegen
from tablegen import cli
from tablegen.core.errors import InputError, RangeError

ROOT = Path(__file__).resolve().parents[1]

SPEC = textwrap.dedent('''
    [document]
    title = "TITLE"
    number = "BW-9"
    revision = "A"
    issue_date = 2026-11-20
    organisation = "Bittern Wharf boiler house (invented)"
    csv_comments = true

    [[tables]]
    name = "bw-n2"
    substance = "N2"
    columns = ["T", "cp", "h", "Pr", "vr"]
    EXTRA
    grid = GRID
''')


def spec(tmp_path: Path, grid='{ list = ["300 K", "400 K"] }', extra="", title="Bittern Wharf tables",
         name="bw") -> Path:
    p = tmp_path / f"{name}.toml"
    p.write_text(SPEC.replace("GRID", grid).replace("EXTRA", extra).replace("TITLE", title), encoding="utf-8")
    return p


def refused(capsys, argv, *fragments) -> str:
    """Run the command line with warnings as errors; assert exit 2 and one stderr line."""
    with warnings.catch_warnings():
        warnings.simplefilter("error")          # a numpy RuntimeWarning would be a second line
        rc = cli.main([str(a) for a in argv])
    err = capsys.readouterr().err
    assert rc == 2 and err.count("\n") == 1 and err.startswith("tablegen: "), err
    for f in fragments:
        assert f in err, err
    return err


# ---------------------------------------------------------------- extrapolation (item 5)
@pytest.mark.parametrize("T,fragment", [("1e300 K", "T = 1e+300 K is beyond the extrapolation range 100-12000 K"),
                                        ("1e-300 K", "T = 1e-300 K is beyond the extrapolation range")])
def test_extrapolation_is_bounded_to_half_and_twice_the_data_range(tmp_path, capsys, T, fragment):
    p = spec(tmp_path, grid=f'{{ list = ["300 K", "{T}"] }}', extra="extrapolate = true")
    refused(capsys, ["build", p, "--out", tmp_path / "o"], "tables[0].grid: N2: " + fragment)
    assert not (tmp_path / "o").exists()


def test_extrapolated_values_are_finite_and_marked(tmp_path, capsys):
    # N2 data (NASA) end at 6000 K; 11 000 K lies inside twice that
    p = spec(tmp_path, grid='{ list = ["300 K", "11000 K"] }', extra="extrapolate = true")
    assert cli.main(["build", str(p), "--out", str(tmp_path / "o"), "--quiet"]) == 0
    rows = [ln.split(",") for ln in (tmp_path / "o" / "bw-n2.csv").read_text(encoding="utf-8").splitlines()
            if not ln.startswith("#")]
    assert rows[0][-1] == "mark" and rows[2][-1] == "x" and rows[1][-1] == ""
    assert all(np.isfinite(float(c)) for r in rows[1:] for c in r[:-1])


def test_an_extrapolation_that_gives_cp_below_R_is_refused():
    co2 = tablegen.substance("CO2", source="janaf1998")
    with pytest.raises(RangeError, match=r"extrapolated to T = 12000 K the polynomial gives cp <= R"):
        co2.properties([300.0, 12000.0], extrapolate=True)


def test_an_anchor_that_overflows_pr_is_refused(tmp_path, capsys):
    p = spec(tmp_path, extra="anchor = { Pr = 1e308 }")
    refused(capsys, ["build", p, "--out", tmp_path / "o"],
            "tables[0]: N2: Pr or vr would be beyond 1e300 or below 1e-300 with the anchor Pr = 1e+308")


# ---------------------------------------------------------------- spec crashes (item 7)
@pytest.mark.parametrize("seg,key", [('{ start = "300 K", stop = "1e400 K", step = "10 K" }', "stop"),
                                     ('{ start = "300 K", stop = "400 K", step = "1e400 K" }', "step")])
def test_infinite_grid_temperatures_are_one_line(tmp_path, capsys, seg, key):
    p = spec(tmp_path, grid=f"{{ segments = [ {seg} ] }}")
    refused(capsys, ["build", p, "--out", tmp_path / "o"],
            f"tables[0].grid.segments[0].{key}: '1e400 K' is not a finite number")


def test_deep_nesting_and_huge_files_are_refused_before_parsing(tmp_path, capsys):
    deep = tmp_path / "deep.toml"
    deep.write_text("[document]\nx = " + "[" * 5000 + "]" * 5000 + "\n", encoding="utf-8")
    refused(capsys, ["build", deep], "deep.toml:2: arrays or inline tables nested more than 16 deep")
    huge = tmp_path / "huge.toml"
    huge.write_text("# padding\n" * 500_000, encoding="utf-8")       # 5 MB
    refused(capsys, ["build", huge], "huge.toml: 5000000 bytes; a TOML file may have at most 4194304 bytes")
    # a string holding brackets is not nesting
    ok = spec(tmp_path, title="[[[[[[[[[[[[[[[[[[[[ rig ]]]]]]]]]]]]]]]]]]]]")
    assert cli.main(["build", str(ok), "--out", str(tmp_path / "ok"), "--quiet"]) == 0


def test_a_deep_user_data_file_is_refused_in_one_line(tmp_path, capsys):
    f = tmp_path / "deep-data.toml"
    f.write_text('[dataset]\nid = "deep"\ncitation = "x"\nnote = ' + "[" * 3000 + "]" * 3000 + "\n",
                 encoding="utf-8")
    refused(capsys, ["state", "N2", "--T", "300K", "--data", f], "arrays or inline tables nested more than 16")


# ---------------------------------------------------------------- one line only (item 8)
def test_fit_refusal_is_one_line_without_the_note(tmp_path, capsys):
    csv = tmp_path / "cp.csv"
    csv.write_text("T [K],cp_molar [J/(mol K)]\n300,29.1\n400,one\n", encoding="utf-8")
    refused(capsys, ["fit", csv, "--form", "9-coefficient", "--formula", "N2"], "'one' is not a number")


def test_export_to_a_folder_says_it_is_a_folder(tmp_path, capsys):
    refused(capsys, ["export", "CO2", "--format", "toml", "--out", tmp_path, "--force"],
            f"{tmp_path} is a folder; give the path of a file")


def test_demo_into_a_file_is_one_line_before_any_progress(tmp_path, capsys):
    f = tmp_path / "plain"
    f.write_text("x")
    err = refused(capsys, ["demo", "--out", f], "is a file, not a folder")
    assert "demo spec" not in err


# ---------------------------------------------------------------- smaller ones (item 9)
def test_a_spec_named_dots_is_refused_and_writes_nowhere(tmp_path, capsys, monkeypatch):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "...toml").write_text(SPEC.replace("GRID", '{ list = ["300 K"] }').replace("EXTRA", "")
                                      .replace("TITLE", "t"), encoding="utf-8")
    refused(capsys, ["build", "...toml"], "gives the book name '..'", "starting with a letter or digit")
    assert os.listdir(tmp_path) == ["...toml"]


@pytest.mark.parametrize("char", ["\u0085", "\u2028", "\u2029", "\u202e", "\u2066", "\x7f"])
def test_line_breaking_and_direction_controls_are_refused_in_titles(tmp_path, capsys, char):
    # Unicode Standard Annex #9 (bidirectional controls) and the Unicode line separators
    p = spec(tmp_path, title=f"Bittern\\u{ord(char):04X}Wharf")      # a TOML escape
    refused(capsys, ["build", p, "--out", tmp_path / "o"], "document.title: must be one line of text",
            f"U+{ord(char):04X}")


def test_formula_text_is_neutralised_for_semicolon_spreadsheets_too(tmp_path):
    # OWASP "CSV injection": a cell starting with = + - @ is a formula (common practice)
    p = spec(tmp_path, title="=1;=2,+3")
    assert cli.main(["build", str(p), "--out", str(tmp_path / "o"), "--quiet"]) == 0
    import re
    for line in (tmp_path / "o" / "bw-n2.csv").read_text(encoding="utf-8").splitlines():
        if line.startswith("#"):
            for piece in re.split(r"[,;]", line):
                assert not piece.lstrip().startswith(("=", "+", "-", "@")), line
    assert "'=1;'=2,'+3" in (tmp_path / "o" / "bw-n2.csv").read_text(encoding="utf-8")


def test_source_date_epoch_does_not_change_the_bytes(tmp_path, monkeypatch):
    p = spec(tmp_path)
    assert cli.main(["build", str(p), "--out", str(tmp_path / "a"), "--quiet"]) == 0
    assert cli.main(["chart", "N2", "--kind", "ts", "--out", str(tmp_path / "ca"), "--quiet"]) == 0
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1234567890")
    assert cli.main(["build", str(p), "--out", str(tmp_path / "b"), "--quiet"]) == 0
    assert cli.main(["chart", "N2", "--kind", "ts", "--out", str(tmp_path / "cb"), "--quiet"]) == 0
    assert os.environ["SOURCE_DATE_EPOCH"] == "1234567890"        # left as it was
    for a, b in (("a", "b"), ("ca", "cb")):
        names = sorted(os.listdir(tmp_path / a))
        assert names == sorted(os.listdir(tmp_path / b))
        for n in names:
            assert (tmp_path / a / n).read_bytes() == (tmp_path / b / n).read_bytes(), n


def test_every_data_file_enters_the_fingerprint(tmp_path):
    cards = tmp_path / "site-cards.dat"        # CO2 and H2O records; the book uses N2 only
    cards.write_text((ROOT / "tests" / "data" / "tm4513-sample.dat").read_text(), encoding="utf-8")

    def fingerprint(out):
        p = spec(tmp_path, extra="").read_text(encoding="utf-8").replace(
            "[[tables]]", '[data]\nfiles = ["site-cards.dat"]\n\n[[tables]]', 1)
        (tmp_path / "bw.toml").write_text(p, encoding="utf-8")
        assert cli.main(["build", str(tmp_path / "bw.toml"), "--out", str(tmp_path / out), "--quiet"]) == 0
        meta = json.loads((tmp_path / out / "bw.json").read_text(encoding="utf-8"))
        return meta["fingerprint"]["sha256"], {d["name"] for d in meta["data_files"]}

    first, listed = fingerprint("one")
    assert "site-cards.dat" in listed
    with cards.open("a", encoding="utf-8") as f:
        f.write("! one more comment line: no record changes, the bytes do\n")
    assert fingerprint("two")[0] != first


def test_the_api_refuses_text_shapes_and_complex_numbers_with_a_value_error():
    n2 = tablegen.substance("N2")
    with warnings.catch_warnings():
        warnings.simplefilter("error")          # a ComplexWarning would mean the imaginary part was dropped
        for call, text in ((lambda: n2.properties("300 K"), "temperatures must be real numbers in K, got str"),
                           (lambda: n2.properties([300.0, 400.0], P=[1e5, 2e5, 3e5]),
                            "N2: 3 pressures for 2 temperatures; give one pressure, or one per temperature"),
                           (lambda: n2.T_from("h", ["abc"]), "values of h must be real numbers"),
                           (lambda: n2.properties(300.0 + 1e-3j), "temperatures must be real numbers in K, got complex"),
                           (lambda: n2.properties(np.array([300.0 + 0j])), "got complex128 values"),
                           (lambda: n2.properties([[300.0], [400.0, 500.0]]), "temperatures must be real numbers")):
            with pytest.raises(InputError, match=text.replace("(", r"\(").replace(")", r"\)")) as e:
                call()
            assert isinstance(e.value, ValueError)
    assert n2.properties(np.float32(300.0))["cp"] == pytest.approx(n2.properties(300.0)["cp"])


# ---------------------------------------------------------------- compare (item 6)
def test_compare_refuses_infinite_cells_and_tolerances_in_one_line(tmp_path, capsys):
    ref = tmp_path / "ref.csv"
    ref.write_text("T [K],cp [kJ/(kg K)]\n300,1e999\n", encoding="utf-8")
    refused(capsys, ["compare", "N2", ref, "--out", tmp_path / "o"],
            "ref.csv:2: cell '1e999' in column 'cp' is beyond the range of a double")
    ref.write_text("T [K],cp [kJ/(kg K)]\n300,1.04\n400,0e999\n", encoding="utf-8")
    rc = cli.main(["compare", "N2", str(ref), "--out", str(tmp_path / "z"), "--quiet"])
    assert rc in (0, 1)                     # a zero with a huge exponent is a finite number
    capsys.readouterr()
    for tol, text in (("cp=1e308kJ/(kg K)", "an absolute tolerance is at most"),
                      ("cp=1000%", "a relative tolerance is at most 100 %")):
        refused(capsys, ["compare", "N2", ref, "--out", tmp_path / "o", "--tolerance", tol], text)
    assert not (tmp_path / "o").exists()


def test_compare_references_are_bounded_in_rows_and_bytes(tmp_path, capsys):
    from tablegen.calc.compare_reference import MAX_REFERENCE_BYTES, MAX_REFERENCE_ROWS
    ref = tmp_path / "long.csv"
    ref.write_text("T [K],cp [kJ/(kg K)]\n" + "300,1.04\n" * (MAX_REFERENCE_ROWS + 1), encoding="utf-8")
    refused(capsys, ["compare", "N2", ref, "--out", tmp_path / "o"],
            f"more than {MAX_REFERENCE_ROWS} data rows")
    big = tmp_path / "big.csv"
    with big.open("w", encoding="utf-8") as f:
        f.write("T [K],cp [kJ/(kg K)]\n")
        f.truncate(MAX_REFERENCE_BYTES + 1)
    refused(capsys, ["compare", "N2", big, "--out", tmp_path / "o"],
            f"{MAX_REFERENCE_BYTES + 1} bytes; a reference table may have at most")
