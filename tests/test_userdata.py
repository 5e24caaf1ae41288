"""Users' own coefficient data: import, validation, fit and export.

Sources named beside each check:
* NASA TM-4513 (McBride, Gordon & Reno 1993) card layout and the shipped
  copy gasdata/nasa1993.toml of its records;
* NASA/TP-2002-211556 (McBride, Zehe & Gordon 2002) Appendix C layout and the
  shipped copy gasdata/nasa2002-air.toml;
* NIST-JANAF Thermochemical Tables, 4th ed. (Chase 1998), via the `janaf`
  package, for the fits.
The two sample files in tests/data were written from the format descriptions.
"""

from __future__ import annotations

import json
from pathlib import Path

import janaf  # reference library: a missing one is a failure, not a skip
import numpy as np
import scipy.constants
import pytest

from tablegen.cli import main
from tablegen.data.library import library

DATA = Path(__file__).parent / "data"
TM4513 = DATA / "tm4513-sample.dat"
TP2002 = DATA / "tp2002-sample.inp"
T_GRID = "200K,298.15K,500K,999.9K,1000K,1000.1K,1800K,3500K,6000K"


def run(capsys, *argv):
    rc = main(list(argv))
    out, err = capsys.readouterr()
    return rc, out, err


def state(capsys, name, *data, T=T_GRID, extra=()):
    args = ["state", name, "--T", T, "--json", *extra]
    for d in data:
        args += ["--data", str(d)]
    rc, out, err = run(capsys, *args)
    assert rc == 0, err
    return json.loads(out), err


NUMERIC = ("cp", "cv", "k", "h", "u", "s0", "g0", "Pr", "vr", "a", "cp_molar", "h_molar",
           "s0_molar", "g0_molar", "dh298_molar")


def assert_rows_close(a, b, rtol, atol_h=0.0):
    for ra, rb in zip(a, b, strict=True):
        for k in NUMERIC:
            x, y = ra[k], rb[k]
            tol = rtol * abs(y) + (atol_h if k in ("h", "u", "g0", "h_molar", "g0_molar") else 0.0)
            assert abs(x - y) <= tol, (k, ra["T_K"], x, y)


# ------------------------------------------------------------------ reading
def test_tm4513_sample_reproduces_shipped_nasa1993_records(capsys):
    # NASA TM-4513 card layout: line 2 holds a1..a5 of the upper (1000-6000 K)
    # interval; the sample's CO2 line 2 starts with a1 = 4.63659493, which is the
    # upper-interval a1 of the shipped nasa1993 CO2 record.
    lib = library((str(TM4513),))
    shipped = lib.datasets["nasa1993"]
    for sid in ("CO2", "H2O"):
        mine = lib.record(sid)
        assert mine.file == str(TM4513) and mine.dataset == "tm4513-sample"
        ref = shipped.get(sid)
        assert mine.form == "7-coefficient"
        np.testing.assert_array_equal(mine.poly.T_bounds, ref.poly.T_bounds)
        # the sample carries the shipped values' 9 significant digits: exact
        np.testing.assert_allclose(mine.poly.coeffs, ref.poly.coeffs, rtol=1e-15, atol=0)
        assert abs(mine.M - ref.M) <= 1e-12 * ref.M
    assert lib.record("CO2").poly.coeffs[1, 2] == pytest.approx(4.63659493, rel=1e-15)
    rows, err = state(capsys, "CO2", TM4513)
    ref_rows, _ = state(capsys, "CO2", extra=("--source", "nasa1993"))
    assert_rows_close(rows, ref_rows, 1e-12)
    # announced against the record the name resolved to before (its default source)
    before = library().record("CO2")
    assert f"user record 'CO2' replaces the shipped {before.dataset} record 'CO2'" in err


def test_tp2002_sample_reproduces_shipped_nasa2002_record(capsys):
    # NASA/TP-2002-211556 Appendix C layout, three intervals of N2 written from
    # gasdata/nasa2002-air.toml (10 significant digits there and in D16.9 fields).
    lib = library((str(TP2002),))
    mine = lib.record("N2")
    ref = lib.datasets["nasa2002-air"].get("N2")
    assert mine.form == "9-coefficient" and mine.poly.n_intervals == 3
    np.testing.assert_array_equal(mine.poly.T_bounds, ref.poly.T_bounds)
    np.testing.assert_allclose(mine.poly.coeffs, ref.poly.coeffs, rtol=1e-15, atol=0)
    rows, _ = state(capsys, "N2", TP2002, T="300K,1000K,5000K,15000K")
    ref_rows, _ = state(capsys, "N2", T="300K,1000K,5000K,15000K", extra=("--source", "nasa2002-air"))
    assert_rows_close(rows, ref_rows, 1e-12)


def test_quiet_silences_the_replacement_notice(capsys, tmp_path):
    f = tmp_path / "co2.dat"
    f.write_text(TM4513.read_text())
    _, err = state(capsys, "CO2", f, T="300K", extra=("--quiet",))
    assert err == ""


def test_data_folder_reads_every_format(capsys, tmp_path):
    (tmp_path / "a.dat").write_text(TM4513.read_text())
    (tmp_path / "b.inp").write_text(TP2002.read_text())
    (tmp_path / "notes.md").write_text("not data")
    lib = library((str(tmp_path),))
    assert lib.record("CO2").file.endswith("a.dat")
    assert lib.record("N2").file.endswith("b.inp")


# ---------------------------------------------------------------- refusals
def _refused(capsys, tmp_path, name, text, *needles):
    f = tmp_path / name
    f.write_text(text)
    rc, out, err = run(capsys, "state", "CO2", "--T", "300K", "--data", str(f))
    assert rc == 2 and out == ""
    line = err.strip()
    assert line.startswith(f"tablegen: {f}:") and "\n" not in line, err
    for n in needles:
        assert n in line, (n, line)
    return line


def _tm_lines():
    return TM4513.read_text().splitlines()


def test_refuses_wrong_column_widths(capsys, tmp_path):
    # NASA TM-4513: 5 E15.8 fields, line number in column 80. Fields widened to 16.
    lines = _tm_lines()
    i = next(k for k, ln in enumerate(lines) if ln.startswith("CO2"))
    fields = [lines[i + 1][15 * k: 15 * k + 15] for k in range(5)]
    lines[i + 1] = "".join(" " + f for f in fields) + "   2"
    _refused(capsys, tmp_path, "wide.dat", "\n".join(lines) + "\n", f":{i + 2}: CO2:", "column")


def test_refuses_a_field_that_spans_two_columns(capsys, tmp_path):
    lines = _tm_lines()
    i = next(k for k, ln in enumerate(lines) if ln.startswith("CO2"))
    ln = lines[i + 2]
    lines[i + 2] = ln[:12] + ln[13:28] + " " + ln[28:]   # shift part of a field left
    msg = _refused(capsys, tmp_path, "shift.dat", "\n".join(lines) + "\n", f":{i + 3}: CO2:")
    assert "column widths" in msg or "not a number" in msg


def test_refuses_non_numeric_field(capsys, tmp_path):
    lines = _tm_lines()
    i = next(k for k, ln in enumerate(lines) if ln.startswith("H2O"))
    lines[i + 1] = " 2.6770378xE+00" + lines[i + 1][15:]
    _refused(capsys, tmp_path, "nan.dat", "\n".join(lines) + "\n", f":{i + 2}: H2O:", "is not a number",
             "2.6770378xE+00")


def test_refuses_missing_line_of_tm4513_record(capsys, tmp_path):
    lines = _tm_lines()
    _refused(capsys, tmp_path, "short.dat", "\n".join(lines[:-1]) + "\n", ": H2O:", "line 4 of the record is missing")


def test_refuses_missing_interval_of_tp2002_record(capsys, tmp_path):
    # NASA/TP-2002-211556: the second line declares 3 intervals; give 2.
    lines = TP2002.read_text().splitlines()[:-3]
    _refused(capsys, tmp_path, "two.inp", "\n".join(lines) + "\n", ": N2:", "interval 3 of 3 is missing")


def test_refuses_non_contiguous_intervals(capsys, tmp_path):
    text = TP2002.read_text().replace("   1000.000   6000.0007", "   1100.000   6000.0007")
    _refused(capsys, tmp_path, "gap.inp", text, ": N2:", "contiguous")


def test_refuses_cp_going_negative(capsys, tmp_path):
    lines = _tm_lines()
    i = next(k for k, ln in enumerate(lines) if ln.startswith("CO2"))
    # a2 of the upper interval made negative: cp/R < 0 near 6000 K
    lines[i + 1] = lines[i + 1][:15] + "-2.74131991E-03" + lines[i + 1][30:]
    _refused(capsys, tmp_path, "neg.dat", "\n".join(lines) + "\n", f":{i + 1}: CO2:", "cp goes negative")


@pytest.mark.parametrize("what,old,new", [
    ("s°", "-4.90249341E+04-1.93534855E+00", "-4.90249341E+04-1.83534855E+00"),   # b2 upper
    ("h", "-4.90249341E+04-1.93534855E+00", "-4.89249341E+04-1.93534855E+00"),   # b1 upper
])
def test_refuses_a_breakpoint_jump(capsys, tmp_path, what, old, new):
    text = TM4513.read_text()
    assert old in text
    msg = _refused(capsys, tmp_path, "jump.dat", text.replace(old, new), ": CO2:",
                   f"{what} jumps by", "breakpoint 1000 K")
    assert "allowed: 0.0001" in msg


def test_refuses_molar_mass_inconsistent_with_elements(capsys, tmp_path):
    text = TM4513.read_text().replace(" 44.009000000 1", " 45.009000000 1")
    _refused(capsys, tmp_path, "mw.dat", text, ": CO2:", "does not match its elements")


def test_refuses_toml_user_record_with_jump(capsys, tmp_path):
    rc, out, _ = run(capsys, "export", "CO2", "--source", "nasa1993", "--format", "toml")
    assert rc == 0
    bad = out.replace("-49024.9341", "-48924.9341")
    assert bad != out
    _refused(capsys, tmp_path, "jump.toml", bad, ": CO2:", "h jumps by")


def test_species_check_reports_every_refusal(capsys, tmp_path):
    good = tmp_path / "good.dat"
    good.write_text(TM4513.read_text())
    bad = tmp_path / "bad.dat"
    bad.write_text(TM4513.read_text().replace("-1.93534855E+00", "-1.83534855E+00"))
    short = tmp_path / "short.inp"
    short.write_text("\n".join(TP2002.read_text().splitlines()[:-3]) + "\n")
    rc, out, _ = run(capsys, "species", "--check", "--data", str(good), "--data", str(bad), "--data", str(short))
    assert rc == 2
    assert f"error: {bad}:" in out and "s° jumps by" in out
    assert f"error: {short}:" in out and "missing" in out
    assert "2 errors" in out
    rc, out, _ = run(capsys, "species", "--check", "--data", str(good))
    assert rc == 0 and "0 errors" in out


# ------------------------------------------------------------------ export
FLUE = "CO2=0.09,H2O=0.18,N2=0.7,O2=0.021,Ar=0.009"   # invented boiler flue gas


@pytest.mark.parametrize("name", ["air", FLUE, "flue@CH4@excess-air=15%"])
def test_exported_mixture_round_trips_through_toml_to_1e9(capsys, tmp_path, name):
    # Round trip of the exact collapsed polynomial: state of the imported record
    # equals state of the mixture to 1e-9 relative (toml keeps every bit).
    import tablegen
    f = tmp_path / "mix.toml"
    rc, _, err = run(capsys, "export", name, "--format", "toml", "--id", "TESTMIX", "--out", str(f))
    assert rc == 0, err
    a, _ = state(capsys, "TESTMIX", f, T="200K,300K,999K,1000K,1001K,2500K,6000K")
    b, _ = state(capsys, name, T="200K,300K,999K,1000K,1001K,2500K,6000K")
    assert_rows_close(a, b, 1e-9, atol_h=1e-9)
    text = f.read_text()
    assert "composition" in text and "mixing_entropy_over_R" in text
    for _, ds, cite in tablegen.substance(name).sources:
        assert cite in text and ds in text


@pytest.mark.parametrize("fmt,digits", [("tm-4513", 9), ("tp-2002", 10)])
def test_exported_mixture_card_keeps_the_digits_of_its_fields(capsys, tmp_path, fmt, digits):
    # TM-4513 E15.8 fields written 1PE15.8 hold 9 significant digits, the
    # TP-2002-211556 D16 fields 10: each coefficient read back within half a unit
    # of its last digit.
    f = tmp_path / f"mix.{fmt}"
    # components from the 7-coefficient NASA TM-4513 set, which both formats hold
    rc, _, err = run(capsys, "export", "air", "--source", "nasa1993", "--format", fmt, "--id", "AIRREC",
                     "--out", str(f))
    assert rc == 0, err
    import tablegen
    exact = tablegen.substance("air", source="nasa1993").poly
    rec = library((str(f),)).record("AIRREC")
    np.testing.assert_array_equal(rec.poly.T_bounds, exact.T_bounds)
    tol = 0.5 * 10.0 ** (1 - digits) * np.abs(exact.coeffs) * (1 + 1e-12)
    assert np.all(np.abs(rec.poly.coeffs - exact.coeffs) <= tol)
    assert abs(rec.M - tablegen.substance("air", source="nasa1993").M) <= 1e-8


def test_export_refuses_tm4513_cards_for_a_nine_coefficient_polynomial(capsys):
    rc, out, err = run(capsys, "export", "N2", "--source", "nasa2002-air", "--format", "tm-4513")
    assert rc == 2 and out == ""
    assert "9-coefficient" in err and "tp-2002 or toml" in err


def test_export_refuses_tm4513_cards_when_breakpoints_do_not_fit(capsys):
    # n-hexane of the shipped nuig2015 set breaks at 1394 K, not 1000 K.
    rc, out, err = run(capsys, "export", "n-C6H14", "--source", "nuig2015", "--format", "tm-4513")
    assert rc == 2 and out == ""
    assert "1000 K" in err and "tp-2002 or toml" in err


def test_export_keeps_an_existing_file_without_force(capsys, tmp_path):
    f = tmp_path / "keep.toml"
    f.write_text("mine")
    rc, _, err = run(capsys, "export", "CO2", "--format", "toml", "--out", str(f))
    assert rc == 2 and "--force" in err and f.read_text() == "mine"
    rc, _, _ = run(capsys, "export", "CO2", "--format", "toml", "--out", str(f), "--force")
    assert rc == 0 and "[[species]]" in f.read_text()


# --------------------------------------------------------------------- fit
JANAF = [("C-095", "CO2", -393.522), ("H-064", "H2O", -241.826), ("N-023", "N2", 0.0)]


def janaf_csv(path, index, with_h_s=True):
    """NIST-JANAF 4th ed. rows 200-6000 K (janaf package) as a CSV of the shared convention."""
    df = janaf.Table(index).df
    T = df["T(K)"].to_numpy()
    m = (T >= 200) & (T <= 6000)
    cols = [T[m], df["Cp"].to_numpy()[m], df["H-H(Tr)"].to_numpy()[m], df["S"].to_numpy()[m]]
    head = "T [K],cp_molar [J/(mol K)]" + (",dh298_molar [kJ/mol],s0_molar [J/(mol K)]" if with_h_s else "")
    lines = [f"# source: NIST-JANAF Thermochemical Tables, 4th ed., table {index} (janaf package)", head]
    for row in zip(*cols):
        lines.append(",".join(repr(float(x)) for x in (row if with_h_s else row[:2])))
    path.write_text("\n".join(lines) + "\n")
    return cols


@pytest.mark.parametrize("index,formula,dfH", JANAF)
def test_fit_reproduces_nist_janaf_s_and_h_within_reported_residuals(capsys, tmp_path, index, formula, dfH):
    csv = tmp_path / f"{formula}.csv"
    T, cp, H, S = janaf_csv(csv, index)
    out = tmp_path / f"{formula}-fit.toml"
    rc, _, err = run(capsys, "fit", str(csv), "--form", "9-coefficient", "--formula", formula, "--id", f"J{formula}",
                     f"--h298={dfH}kJ/mol", "--format", "toml", "--out", str(out))
    assert rc == 0, err
    assert "largest residuals" in err
    import tomllib
    res = tomllib.loads(out.read_text())["species"][0]["fit_residuals"]
    rows, _ = state(capsys, f"J{formula}", out, T=",".join(f"{float(t)!r}K" for t in T))
    s = np.array([r["s0_molar"] for r in rows])
    dh = np.array([r["dh298_molar"] for r in rows])
    cpf = np.array([r["cp_molar"] for r in rows])
    # reported residuals, plus 1e-9 relative for the JSON and temperature round trip
    assert np.max(np.abs(s - S)) <= res["s_max_J_per_molK"] * (1 + 1e-9) + 1e-9 * np.max(S)
    assert np.max(np.abs(dh - H * 1000)) <= res["h_max_J_per_mol"] * (1 + 1e-9) + 1e-9 * np.max(np.abs(H * 1000))
    assert np.max(np.abs(cpf - cp) / cp) <= res["cp_max_rel"] * (1 + 1e-9)
    # and the fit is good: within the 0.1 % cp target; JANAF's S° carries 3 decimals
    assert res["cp_max_rel"] <= 1e-3


def test_fit_tm4513_cards_round_trip_through_import(capsys, tmp_path):
    csv = tmp_path / "co2.csv"
    janaf_csv(csv, "C-095", with_h_s=False)
    out = tmp_path / "co2.dat"
    rc, _, err = run(capsys, "fit", str(csv), "--form", "7-coefficient", "--formula", "CO2", "--id", "CO2FIT",
                     "--h298=-393.522kJ/mol", "--s298", "213.795J/(mol K)", "--target-cp", "0.01",
                     "--out", str(out))
    assert rc == 0, err
    rec = library((str(out),)).record("CO2FIT")
    assert rec.form == "7-coefficient" and list(rec.poly.T_bounds) == [200.0, 1000.0, 6000.0]
    # s°(298.15 K) anchored to the JANAF value (NIST-JANAF C-095: 213.795 J/(mol K));
    # 9 printed digits of b2 ~ 10 limit the agreement to ~1e-8 R
    rows, _ = state(capsys, "CO2FIT", out, T="298.15K", extra=("--h-datum", "formation"))
    assert abs(rows[0]["s0_molar"] - 213.795) <= 1e-6
    assert abs(rows[0]["h_molar"] + 393522.0) <= 1e-3


def test_fit_refuses_a_poor_fit_with_the_reason(capsys, tmp_path):
    # one 1000 K breakpoint cannot meet 0.1 % on CO2 from 200 to 6000 K in 7 terms
    csv = tmp_path / "co2.csv"
    janaf_csv(csv, "C-095")
    rc, out, err = run(capsys, "fit", str(csv), "--form", "7-coefficient", "--formula", "CO2")
    assert rc == 2 and out == ""
    assert "misses its residual target" in err and "1000 K breakpoint" in err


def test_fit_refuses_too_few_points(capsys, tmp_path):
    csv = tmp_path / "few.csv"
    csv.write_text("T [K],cp_molar [J/(mol K)]\n300,29.1\n400,29.3\n500,29.6\n")
    rc, out, err = run(capsys, "fit", str(csv), "--form", "9-coefficient", "--formula", "N2", "--s298", "191.6J/(mol K)")
    assert rc == 2 and out == "" and "refused" in err


def test_fit_names_the_bad_cell(capsys, tmp_path):
    csv = tmp_path / "bad.csv"
    csv.write_text("# a comment\nT [K],cp [kJ/(kg K)]\n300,1.04\n400,one\n")
    rc, out, err = run(capsys, "fit", str(csv), "--form", "9-coefficient", "--formula", "N2")
    assert rc == 2 and out == ""
    assert f"{csv}:4:" in err and "'one' is not a number" in err


def test_fit_mass_basis_cp_uses_the_molar_mass_of_the_formula(capsys, tmp_path):
    # cp [kJ/(kg K)] x M (IUPAC weights, gasdata/atomic-weights.toml) = cp_molar
    T, cp, H, S = janaf_csv(tmp_path / "ref.csv", "N-023", with_h_s=False)
    M = 2 * 14.007
    mass = tmp_path / "mass.csv"
    mass.write_text("T [K],cp [kJ/(kg K)]\n" + "".join(f"{float(t)!r},{float(c) / M!r}\n" for t, c in zip(T, cp)))
    outs = []
    for f in (tmp_path / "ref.csv", mass):
        rc, out, err = run(capsys, "fit", str(f), "--form", "9-coefficient", "--formula", "N2",
                           "--s298", "191.609J/(mol K)", "--format", "toml", "--quiet")
        assert rc == 0, err
        outs.append(out)
    import tomllib
    a, b = (np.array(tomllib.loads(o)["species"][0]["coefficients"]) for o in outs)
    np.testing.assert_allclose(a, b, rtol=1e-9, atol=1e-12 * np.max(np.abs(a)))


# ------------------------------------------------------ writer/reader identities
from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

from tablegen.data import formats  # noqa: E402
from tablegen.core.errors import DataError  # noqa: E402

# exponents of two digits: a field holds one significant digit fewer at |exponent| >= 100
_coef = st.floats(min_value=-1e12, max_value=1e12, allow_nan=False).filter(lambda x: x == 0 or abs(x) > 1e-90)


@settings(max_examples=25, deadline=None)
@given(st.lists(_coef, min_size=9, max_size=9), st.lists(_coef, min_size=9, max_size=9),
       st.floats(min_value=0.0001, max_value=60.0))
def test_tp2002_fields_hold_ten_significant_digits(a, b, count):
    # NASA/TP-2002-211556 D16 fields: written with 10 significant digits, read back
    # within half a unit of the 10th digit (identity of the format, no source needed).
    rec = {"id": "X", "elements": {"C": count}, "M": 12.011 * count, "T_bounds_K": [200.0, 1000.0, 6000.0],
           "coefficients": [a, b], "h_formation_J_per_mol": 0.0}
    try:
        text = formats.write_tp2002(rec)
    except DataError:
        # refused only when the field would round the count to a whole number
        assert abs(count - round(count)) < 0.5e-4 and count != round(count)
        return
    got, _ = formats.read_tp2002(text, "mem")
    raw = got[0].raw
    for row_in, row_out in zip([a, b], raw["coefficients"]):
        for x, y in zip(row_in, row_out):
            assert abs(x - y) <= 5e-10 * abs(x) * (1 + 1e-9)
    # the count is read back within the resolution its field states
    n = raw["elements"]["C"]
    assert abs(n - count) <= max(raw["_checks"]["count_resolution"]["C"], 1e-12) * (1 + 1e-9)


@settings(max_examples=25, deadline=None)
@given(st.lists(_coef, min_size=7, max_size=7), st.lists(_coef, min_size=7, max_size=7),
       _coef.filter(lambda x: abs(x) < 1e9))
def test_tm4513_fields_hold_nine_significant_digits(lo, up, h):
    # NASA TM-4513 E15.8 fields written 1PE15.8: 9 significant digits.
    rec = {"id": "X", "elements": {"N": 2}, "M": 28.014, "T_bounds_K": [200.0, 1000.0, 6000.0],
           "coefficients": [lo, up], "h298_over_R_K": h}
    got, _ = formats.read_tm4513(formats.write_tm4513(rec), "mem")
    raw = got[0].raw
    for row_in, row_out in zip([lo, up], raw["coefficients"]):
        for x, y in zip(row_in, row_out):
            assert abs(x - y) <= 5e-9 * abs(x) * (1 + 1e-9)
    assert abs(raw["_checks"]["h298_over_R_K"] - h) <= 5e-9 * abs(h) * (1 + 1e-9)


def test_user_data_folder_from_environment(monkeypatch, tmp_path):
    # $TABLEGEN_DATA names the user data folder; its records win and are announced.
    from tablegen.data.library import Library
    (tmp_path / "site.dat").write_text(TM4513.read_text())
    monkeypatch.setenv("TABLEGEN_DATA", str(tmp_path))
    lib = Library(())
    assert lib.record("H2O").file == str(tmp_path / "site.dat")
    assert any("user record 'H2O' replaces the shipped" in m for m in lib.messages)
    # Library.record and defaults unchanged for names the user data lack
    assert lib.record("N2").dataset == library().record("N2").dataset


def test_exact_id_wins_over_case_insensitive_match():
    # NASA TM-4513 holds both CS (carbon monosulfide) and Cs (caesium), CS2 and Cs2;
    # a name spelled exactly as an id must not fall on the other one.
    lib = library()
    assert lib.record("CS").elements == {"C": 1, "S": 1}
    assert lib.record("Cs").elements == {"Cs": 1}
    assert lib.record("CS2").elements == {"C": 1, "S": 2}
    assert lib.record("Cs2").elements == {"Cs": 2}


def test_whole_tp2002_data_file_skips_what_is_not_a_gas_polynomial(capsys):
    # Layout of a whole NASA/TP-2002-211556 data file (header, gas and condensed
    # records, END markers, a zero-interval reactant): only the gas record loads.
    f = DATA / "tp2002-thermo-file.inp"
    lib = library((str(f),))
    ds = lib.datasets["tp2002-thermo-file"]
    assert ds.ids == ["N2"]
    np.testing.assert_allclose(ds.get("N2").poly.coeffs, lib.datasets["nasa2002-air"].get("N2").poly.coeffs,
                               rtol=1e-15, atol=0)
    assert any("skipped 2 record(s)" in m and "N2(L)" in m for m in lib.messages)


def test_replacement_notice_names_the_record_a_name_resolved_to():
    # The notice is worked out without building records; it must agree with
    # Library.record (identity of the library's own lookup rule).
    lib = library()
    names = ["CO2", "H2O", "N2", "carbon dioxide", "water", "n-butane", "CS", "Cs2", "Ar", "n-C6H14", "OH"]
    for n in names:
        r = lib.record(n)
        assert lib._resolves_to(n) == (r.dataset, r.id), n
    assert lib._resolves_to("no-such-gas") is None


def test_printed_heat_of_formation_is_compared_with_the_polynomial(capsys, tmp_path):
    # A heat of formation that disagrees with h(298.15 K) of the coefficients is
    # a copying slip: noted (not refused), naming file, line and record.
    rc, out, _ = run(capsys, "export", "CO2", "--source", "nasa1993", "--format", "toml")
    bad = out.replace("h_formation_298_J_per_mol = -393507", "h_formation_298_J_per_mol = -383507")
    assert rc == 0 and bad != out
    f = tmp_path / "hf.toml"
    f.write_text(bad)
    _, err = state(capsys, "CO2", f, T="300K")
    assert f"{f}:" in err and "CO2: heat of formation given in the record" in err


#: Argon typed by hand in the TM-4513 card layout, in the report's own E15.8 style
#: (0.dddddddd, 8 significant digits), from the shipped nasa1993 Ar record (one
#: interval, so both card intervals carry it; H(298.15)/R = 0 for an element).
#: Columns:  1-18 name, 19-24 date, 25-44 formula, 45 phase, 46-65 T range, 66-79 M, 80 line number.
AR_CARD = """\
AR                L 6/88AR  1    0    0    0G   200.000  6000.000     39.94800 1
 0.25000000E+01 0.00000000E+00 0.00000000E+00 0.00000000E+00 0.00000000E+00    2
-0.74537500E+03 0.43796749E+01 0.25000000E+01 0.00000000E+00 0.00000000E+00    3
 0.00000000E+00 0.00000000E+00-0.74537500E+03 0.43796749E+01 0.00000000E+00    4
"""


def test_hand_typed_tm4513_card_matches_shipped_argon(capsys, tmp_path):
    # Reader checked against a card typed by hand (not made by our writer):
    # NASA TM-4513 layout; values of gasdata/nasa1993.toml Ar to 8 digits.
    f = tmp_path / "argon.dat"
    f.write_text(AR_CARD)
    rec = library((str(f),)).record("Ar")
    ref = library().datasets["nasa1993"].get("Ar")
    assert rec.file == str(f) and rec.elements == {"Ar": 1}
    assert list(rec.poly.T_bounds) == [200.0, 1000.0, 6000.0]
    for row in rec.poly.coeffs:
        assert np.all(np.abs(row - ref.poly.coeffs[0]) <= 5e-8 * np.abs(ref.poly.coeffs[0]))
    a, _ = state(capsys, "Ar", f, T="200K,1000K,6000K")
    b, _ = state(capsys, "Ar", T="200K,1000K,6000K", extra=("--source", "nasa1993"))
    for ra, rb in zip(a, b):
        assert ra["cp_molar"] == pytest.approx(rb["cp_molar"], rel=1e-15)
        # b2 printed to 8 digits: s° differs by at most 5e-8 x 4.38 x R
        assert abs(ra["s0_molar"] - rb["s0_molar"]) <= 5e-8 * 4.3796749 * scipy.constants.R * (1 + 1e-6)

