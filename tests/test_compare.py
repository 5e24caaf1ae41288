"""QA comparison: reading references, alignment, judging, report, exit status.

External references: the NIST-JANAF Thermochemical Tables, 4th edition
(M. W. Chase, J. Phys. Chem. Ref. Data Monograph 9, 1998), read through the
`janaf` package. The agreement figure used for them (0.5 % in cp, and so in
H - H(298.15 K) and s° which are integrals of cp) is the order of the spread
between independent ideal-gas evaluations (JANAF against the Gurvich/TPIS
tables behind NASA TM-4513) for small molecules up to 3000 K: from memory,
see docs/compare.md. It is the tool's documented default tolerance.
"""

from __future__ import annotations

import csv
import io
import json
import re

import numpy as np
import scipy.constants
import pytest

from tablegen import cli
from tablegen.book.qa_report import OUT_MARK
from tablegen.calc.compare import compare
from tablegen.calc.compare_reference import read_reference
from tablegen.calc.compare_tolerance import parse_tolerance
from tablegen.core.units import unit

import janaf  # a test dependency (pyproject [test]): missing, it is a failure, not a skip

#: NIST-JANAF table index of each species (phase 'ref' for the elements' gas
#: reference states, 'g' otherwise), found with janaf.search / janaf.db.
JANAF_INDEX = {"N2": "N-023", "O2": "O-029", "H2": "H-050", "Ar": "Ar-001",
               "CO": "C-093", "CO2": "C-095"}
BAND_K = (200.0, 3000.0)     # engineering-table band; our data start at 200 K


def janaf_rows(species, band=BAND_K):
    df = janaf.Table(index=JANAF_INDEX[species]).df
    T = df["T(K)"].to_numpy()
    m = (T >= band[0]) & (T <= band[1])
    return T[m], df["Cp"].to_numpy()[m], df["S"].to_numpy()[m], df["H-H(Tr)"].to_numpy()[m]


def write_janaf_csv(path, species, band=BAND_K):
    """JANAF columns as printed (3 decimals): Cp, S in J/(mol K), H-H(Tr) in kJ/mol."""
    T, cp, S, H = janaf_rows(species, band)
    lines = [f"# NIST-JANAF Thermochemical Tables, 4th ed., {species} ({JANAF_INDEX[species]})",
             "T [K],cp_molar [J/(mol K)],s0_molar [J/(mol K)],dh298_molar [kJ/mol]"]
    lines += [f"{t:g},{c:.3f},{s:.3f},{h:.3f}" for t, c, s, h in zip(T, cp, S, H)]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


def run(argv, capsys):
    rc = cli.main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return rc, out, err


# ------------------------------------------------------- NIST-JANAF references
@pytest.mark.parametrize("species", sorted(JANAF_INDEX))
def test_nist_janaf_tables_pass_at_documented_agreement(species, tmp_path, capsys):
    """NIST-JANAF 4th ed. (janaf package) against NASA TM-4513 data: within the documented 0.5 %."""
    ref = write_janaf_csv(tmp_path / f"janaf-{species}.csv", species)
    # the documented defaults: cp 0.5 %; H-H298 and s° 0.5 % of their change since 298.15 K
    # plus 10 J/mol and 0.02 J/(mol K) (the differences at 298.15 K itself)
    # --source nasa1993: the independent evaluation (the default sources of several species
    # are refits of these very JANAF tables, gasdata/defaults.toml)
    rc, out, err = run(["compare", species, ref, "--out", tmp_path / "o", "--json", "--source", "nasa1993"],
                       capsys)
    s = json.loads(out)
    assert rc == 0, s["out_of_tolerance"][:3]
    tol = {c["key"]: c["tolerance"] for c in s["columns"]}
    assert tol["cp_molar"]["relative"] == 0.005 and tol["cp_molar"]["origin"] == "default"
    assert tol["s0_molar"]["relative_to_change_from_298.15K"] == 0.005
    assert tol["s0_molar"]["absolute"] == pytest.approx(0.02)
    assert tol["dh298_molar"]["absolute"] == pytest.approx(0.010)       # kJ/mol, the column's unit
    assert s["verdict"] == "pass" and s["cells_out_of_tolerance"] == 0
    assert s["cells_compared"] == 3 * len(janaf_rows(species)[0])
    assert {c["key"] for c in s["columns"]} == {"cp_molar", "s0_molar", "dh298_molar"}
    for name in ("report.pdf", "deviations.csv", "summary.json"):
        assert (tmp_path / "o" / name).stat().st_size > 0


def test_nist_janaf_tighter_than_agreement_fails(tmp_path, capsys):
    """NIST-JANAF CO2: NASA TM-4513 and JANAF differ by more than 0.05 % in cp, so this must fail."""
    ref = write_janaf_csv(tmp_path / "janaf-CO2.csv", "CO2")
    rc, out, _ = run(["compare", "CO2", ref, "--out", tmp_path / "o", "--json", "--source", "nasa1993",
                      "--tolerance", "cp_molar=0.05%"], capsys)
    assert rc == 1
    assert json.loads(out)["columns"][0]["stats"]["n_out"] > 0


def test_nist_janaf_whitespace_table_in_other_units(tmp_path, capsys):
    """NIST-JANAF CO2 as a whitespace text table in °C, kJ/(kmol K) and J/mol: converted, same verdict."""
    T, cp, S, H = janaf_rows("CO2")
    lines = ["# NIST-JANAF CO2 (C-095), temperatures in degrees Celsius",
             "T [°C]   cp_molar [kJ/(kmol K)]   s0_molar [kJ/(kmol K)]   dh298_molar [J/mol]"]
    lines += [f"{t - 273.15:.2f}  {c:.3f}  {s:.3f}  {h * 1000:.0f}" for t, c, s, h in zip(T, cp, S, H)]
    ref = tmp_path / "co2.txt"
    ref.write_text("\n".join(lines) + "\n", encoding="utf-8")
    rc, out, _ = run(["compare", "CO2", ref, "--out", tmp_path / "o", "--json"], capsys)
    s = json.loads(out)
    assert rc == 0
    assert s["reference"]["layout"] == "whitespace" and s["reference"]["T_unit"] == "°C"
    r = read_reference(ref)
    assert np.allclose(r.T_K, T, rtol=0, atol=1e-9)               # °C -> K exactly (offset 273.15)
    assert np.allclose(r.column("dh298_molar").values_si, np.round(H * 1000), atol=1e-9)


def test_nist_janaf_corrupted_cells_fail_with_exactly_those_marked(tmp_path, capsys):
    """NIST-JANAF N2 with three corrupted cells: exit 1 and exactly those cells marked (JSON, CSV, PDF)."""
    ref = write_janaf_csv(tmp_path / "janaf-N2.csv", "N2")
    text = ref.read_text().splitlines()
    bad = {}                                      # line number -> (column, new text)
    for n, line in enumerate(text, start=1):
        cells = line.split(",")
        if cells[0] == "1000":                    # cp +1.5 % (tolerance 0.5 %)
            cells[1] = f"{float(cells[1]) * 1.015:.3f}"; bad[n] = "cp_molar"
        elif cells[0] == "1500":                  # s° +3 J/(mol K) (tolerance about 1.2)
            cells[2] = f"{float(cells[2]) + 3:.3f}"; bad[n] = "s0_molar"
        elif cells[0] == "2000":                  # H-H298 -0.5 kJ/mol (tolerance about 0.28)
            cells[3] = f"{float(cells[3]) - 0.5:.3f}"; bad[n] = "dh298_molar"
        text[n - 1] = ",".join(cells)
    corrupted = tmp_path / "janaf-N2-corrupted.csv"
    corrupted.write_text("\n".join(text) + "\n", encoding="utf-8")
    out_dir = tmp_path / "o"
    rc, out, _ = run(["compare", "N2", corrupted, "--out", out_dir, "--json"], capsys)
    s = json.loads(out)
    assert rc == 1 and s["verdict"] == "fail" and s["exit_status"] == 1
    assert {(c["line"], c["column"]) for c in s["out_of_tolerance"]} == set(bad.items())

    rows = list(csv.reader(io.StringIO((out_dir / "deviations.csv").read_text(encoding="utf-8"))))
    head = rows[0]
    for r in rows[1:]:                   # every value cell reads back as a number (RFC 4180, full precision)
        for h, v in zip(head, r):
            if v and not h.endswith((".status [-]", "extrapolated [-]")):
                float(v)
    marked = set()
    for r in rows[1:]:
        for j, h in enumerate(head):
            if h.endswith(".status [-]") and r[j] == "OUT":
                marked.add((int(r[0]), h.split(".")[0]))
    assert marked == set(bad.items())

    assert pdf_marked_cells(out_dir / "report.pdf") == set(bad.items())


def pdf_marked_cells(pdf_path) -> set:
    """(file line, column key) of every ✗ in the PDF listing, from text positions."""
    import pypdf
    found = set()
    for page in pypdf.PdfReader(str(pdf_path)).pages:
        if "Side-by-side listing" not in page.extract_text():
            continue
        items = []
        page.extract_text(visitor_text=lambda t, cm, tm, fd, fs: items.append((t, tm[4], tm[5])))
        heads = sorted((x, re.match(r"(\w+) \[", t).group(1)) for t, x, y in items
                       if re.match(r"^\w+ \[[^\]]*\]$", t.strip()) and not t.startswith("T ["))
        lines_at = {}
        for t, x, y in items:
            if re.fullmatch(r"\d+", t.strip()) and x < 70:
                lines_at[round(y, 1)] = int(t)
        for t, x, y in items:
            if t.strip() == OUT_MARK and round(y, 1) in lines_at:
                key = [k for hx, k in heads if hx < x][-1]
                found.add((lines_at[round(y, 1)], key))
    return found


# ------------------------------------------------------------- alignment
def state_rows(capsys, substance, T, *extra):
    """State rows on the datum compare uses by default (formation) unless extra names one."""
    datum = [] if "--h-datum" in extra else ["--h-datum", "formation"]
    rc = cli.main(["state", substance, "--T", ",".join(f"{t:g}K" for t in T), "--json", *datum, *extra])
    out, _ = capsys.readouterr()
    assert rc == 0
    return json.loads(out)


def test_pr_scaled_to_another_anchor_aligns_by_the_scale_used(tmp_path, capsys):
    """A handbook-style Pr/vr anchored at Pr = 2.5, vr = 0.4 (298.15 K): the fitted scales are 2.5 and 0.4."""
    T = np.arange(250.0, 2001.0, 50.0)
    rows = state_rows(capsys, "air", T, "--anchor", "T=298.15K,Pr=2.5,vr=0.4")
    ref = tmp_path / "air-pr.csv"
    ref.write_text("T [K],Pr [-],vr [-]\n" + "".join(
        f"{r['T_K']:g},{r['Pr']:.7g},{r['vr']:.7g}\n" for r in rows), encoding="utf-8")
    rc, out, _ = run(["compare", "air", ref, "--out", tmp_path / "a", "--json",
                      "--align", "Pr=scale", "--align", "vr=scale"], capsys)
    s = json.loads(out)
    assert rc == 0
    al = {a["column"]: a for a in s["alignments"]}
    # printed to 7 significant figures: each value within 5e-7 relative, so the fit too
    assert al["Pr"]["kind"] == "scale" and abs(al["Pr"]["value"] / 2.5 - 1) < 5e-7
    assert abs(al["vr"]["value"] / 0.4 - 1) < 5e-7
    # without alignment the scaled columns fail everywhere ...
    rc, out, _ = run(["compare", "air", ref, "--out", tmp_path / "b", "--json"], capsys)
    assert rc == 1 and json.loads(out)["cells_out_of_tolerance"] == 2 * T.size
    # ... and with the matching anchor they pass without any fit
    rc, _, _ = run(["compare", "air", ref, "--out", tmp_path / "c", "--anchor", "T=298.15K,Pr=2.5,vr=0.4"], capsys)
    assert rc == 0


def test_enthalpy_offset_recovers_a_datum_shift(tmp_path, capsys):
    """h on a sensible datum (h(0 °C) = 0) against the formation datum: offset = -h_formation-datum(0 °C)."""
    T = np.arange(300.0, 1501.0, 100.0)
    sens = state_rows(capsys, "CO2", T, "--h-datum", "sensible:0C")
    form = state_rows(capsys, "CO2", [273.15])
    ref = tmp_path / "co2-h.csv"
    ref.write_text("T [K],h [kJ/kg]\n" + "".join(f"{r['T_K']:g},{r['h']!r}\n" for r in sens), encoding="utf-8")
    rc, out, _ = run(["compare", "CO2", ref, "--out", tmp_path / "o", "--json", "--align", "h=offset",
                      "--tolerance", "h=1e-6kJ/kg"], capsys)
    s = json.loads(out)
    assert rc == 0
    assert s["alignments"][0]["value"] == pytest.approx(-form[0]["h"], rel=1e-12)


# ----------------------------------------------------------- self comparison
KEYS_UNITS = [("cp", "kJ/(kg K)"), ("cv", "kJ/(kg K)"), ("k", "-"), ("h", "kJ/kg"), ("u", "kJ/kg"),
              ("s0", "kJ/(kg K)"), ("g0", "kJ/kg"), ("Pr", "-"), ("vr", "-"), ("a", "m/s"),
              ("cp_molar", "J/(mol K)"), ("h_molar", "J/mol"), ("s0_molar", "J/(mol K)"),
              ("dh298_molar", "J/mol")]


@pytest.mark.parametrize("substance,extra", [("CO2", []), ("air", ["--h-datum", "sensible:0C"]),
                                             ("CH4=0.9,C2H6=0.06,N2=0.04", ["--p-ref", "1atm"])])
def test_own_values_as_reference_give_zero_deviation(substance, extra, tmp_path, capsys):
    """The state output in the shared CSV convention compared with its own substance: zero deviation."""
    import tablegen
    # inside the substance's range (the natural-gas mixture's ethane record, a refit of the
    # reference equation's ideal-gas part, ends at 1500 K)
    T_max = min(3000.0, tablegen.substance(substance).T_max)
    T = np.concatenate([np.arange(200.0, T_max + 1.0, 100.0), [298.15]])
    rows = state_rows(capsys, substance, T, *extra)
    ref = tmp_path / "own.csv"
    ref.write_text("# made by tablegen state\n" + ",".join(["T [K]"] + [f"{k} [{u}]" for k, u in KEYS_UNITS]) + "\n"
                   + "".join(",".join([repr(r["T_K"])] + [repr(r[k]) for k, _ in KEYS_UNITS]) + "\n" for r in rows),
                   encoding="utf-8")
    # 1e-12 relative: the kJ <-> J conversions of the state output round in the last bits of float64
    tol = [a for k, _ in KEYS_UNITS for a in ("--tolerance", f"{k}=1e-10%")]
    rc, out, _ = run(["compare", substance, ref, "--out", tmp_path / "o", "--json", *extra, *tol], capsys)
    s = json.loads(out)
    assert rc == 0, s["out_of_tolerance"][:2]
    for c in s["columns"]:
        ref_vals = np.array([r[c["key"]] for r in rows])
        # the only difference is the kJ <-> J conversion: a few ulp of float64
        assert c["stats"]["max_abs"] <= 1e-15 * np.max(np.abs(ref_vals)), (c["key"], c["stats"]["max_abs"])


# ------------------------------------------------------------------ reports
def test_report_bytes_are_reproducible(tmp_path, capsys):
    """Same input, same bytes: the PDF, CSV and JSON of two runs are identical."""
    ref = write_janaf_csv(tmp_path / "janaf-CO.csv", "CO")
    for d in ("a", "b"):
        assert run(["compare", "CO", ref, "--out", tmp_path / d], capsys)[0] == 0
    for name in ("report.pdf", "deviations.csv", "summary.json"):
        assert (tmp_path / "a" / name).read_bytes() == (tmp_path / "b" / name).read_bytes()
    text = (tmp_path / "a" / "report.pdf").read_bytes()
    assert b"/Helvetica" not in text          # only the embedded DejaVu faces
    import pypdf
    pages = pypdf.PdfReader(str(tmp_path / "a" / "report.pdf")).pages
    first = pages[0].extract_text()
    assert "PASS" in first and "agreement with the given reference only" in first
    assert f"page 1 of {len(pages)}" in first


def test_listing_holds_every_reference_cell_in_row_order(tmp_path, capsys):
    """The listing pages (drawn in batched text objects) read back, by position, as every
    row's temperature and reference cells of the NIST-JANAF 4th ed. CO table, in row order."""
    import pypdf
    ref = write_janaf_csv(tmp_path / "janaf-CO.csv", "CO")
    assert run(["compare", "CO", ref, "--out", tmp_path / "a"], capsys)[0] == 0
    lines = []
    for page in pypdf.PdfReader(str(tmp_path / "a" / "report.pdf")).pages:
        if "Side-by-side listing" in page.extract_text():
            lines += page.extract_text(extraction_mode="layout").splitlines()
    rows = [r.split(",") for r in ref.read_text(encoding="utf-8").splitlines()[2:]]
    k = 0
    for r in rows:
        while k < len(lines) and not (lines[k].split()[1:2] == [r[0]]):
            k += 1
        assert k < len(lines), f"row T = {r[0]} missing from the listing"
        words = lines[k].split()
        assert [w.replace("\u2212", "-") for w in words[2::3]] == r[1:], (r, words)
        k += 1


def test_extrapolated_rows_are_marked(tmp_path, capsys):
    """Rows beyond the data range are refused, or with --extrapolate compared and marked."""
    ref = tmp_path / "hot.csv"
    ref.write_text("T [K],cp_molar [J/(mol K)]\n1000,32.697\n6500,38.9\n", encoding="utf-8")
    rc, _, err = run(["compare", "N2", ref, "--out", tmp_path / "o"], capsys)
    assert rc == 2 and f"{ref}:3:" in err and "6500" in err and "--extrapolate" in err
    assert not (tmp_path / "o").exists()
    rc, out, _ = run(["compare", "N2", ref, "--out", tmp_path / "o", "--extrapolate", "--json",
                      "--tolerance", "cp_molar=5%"], capsys)
    assert json.loads(out)["extrapolated_rows"] == [3]


# --------------------------------------------------------------- bad input
BAD = [
    ("missing", None, "not found"),
    ("unknown key", "T [K],cp_mass [kJ/(kg K)]\n300,1.0\n", ":1: unknown column key 'cp_mass'"),
    ("unit mismatch", "T [K],cp [kJ/kg]\n300,1.0\n", ":1: column 'cp': unit 'kJ/kg' is a specific energy unit"),
    ("no unit", "T [K],cp\n300,1.0\n", ":1: header cell 'cp' is not in the form key [unit]"),
    ("below range", "T [K],cp [kJ/(kg K)]\n300,1.0\n150,1.0\n", ":3: T = 150 K is outside the data range"),
    ("not a number", "# a note\nT [C],cp [kJ/(kg K)]\n25,1.0x\n", ":3: cell '1.0x' in column 'cp' is not a number"),
    ("ragged", "T [K],cp [kJ/(kg K)]\n300,1.0,2\n", ":2: 3 cells, but the header names 2 columns"),
    ("no T", "cp [kJ/(kg K)],h [kJ/kg]\n1.0,2\n", ":1: no temperature column"),
    ("only gaps", "T [K],cp [kJ/(kg K)]\n300,-\n400,\n", ": the compared columns hold no values"),
    ("twice", "T [K],cp [kJ/(kg K)],cp [kJ/(kg K)]\n300,1,1\n", ":1: column 'cp [kJ/(kg K)]' appears twice"),
    ("unclosed quote", "T [K],cp [kJ/(kg K)],mark\n300,1.04,\"x\n400,1.04,\n", ":2: a quote opened in this row is never closed"),
]


@pytest.mark.parametrize("what,content,message", BAD, ids=[b[0] for b in BAD])
def test_bad_reference_exits_2_with_one_line_naming_file_and_line(what, content, message, tmp_path, capsys):
    ref = tmp_path / "ref.csv"
    if content is not None:
        ref.write_text(content, encoding="utf-8")
    rc, out, err = run(["compare", "N2", ref, "--out", tmp_path / "o"], capsys)
    assert rc == 2 and out == ""
    assert err.count("\n") == 1 and err.startswith(f"tablegen: {ref}")
    assert message in err
    assert not (tmp_path / "o").exists()


BAD_OPTIONS = [
    (["--tolerance", "cp=abc"], "--tolerance 'cp=abc'"),
    (["--tolerance", "h=1"], "column 'h' is not compared"),
    (["--tolerance", "cp=0.1kJ/kg"], "specific energy unit"),
    (["--align", "cp=offset"], "cp cannot be aligned"),
    (["--align", "Pr=offset"], "Pr aligns by scale"),
    (["--columns", "cp,h"], "'h' is not a column of"),
    (["--table", "x"], "--table applies to a spec file"),
]


@pytest.mark.parametrize("opts,message", BAD_OPTIONS, ids=[o[1][:20] for o in BAD_OPTIONS])
def test_bad_options_exit_2(opts, message, tmp_path, capsys):
    ref = tmp_path / "ref.csv"
    ref.write_text("T [K],cp [kJ/(kg K)],Pr [-]\n300,1.04,1.0\n", encoding="utf-8")
    rc, _, err = run(["compare", "N2", ref, "--out", tmp_path / "o", *opts], capsys)
    assert rc == 2 and err.count("\n") == 1 and message in err, err
    assert not (tmp_path / "o").exists()


def test_existing_output_needs_force(tmp_path, capsys):
    ref = write_janaf_csv(tmp_path / "janaf-Ar.csv", "Ar")
    assert run(["compare", "Ar", ref, "--out", tmp_path / "o"], capsys)[0] == 0
    before = (tmp_path / "o" / "report.pdf").read_bytes()
    rc, _, err = run(["compare", "Ar", ref, "--out", tmp_path / "o"], capsys)
    assert rc == 3 and "--force" in err and err.count("\n") == 1     # an output problem, not bad input
    assert (tmp_path / "o" / "report.pdf").read_bytes() == before
    assert run(["compare", "Ar", ref, "--out", tmp_path / "o", "--force"], capsys)[0] == 0


SPEC = """
[document]
title = "Harrow Moss boiler house: QA copy"
number = "HMB-QA-0042"
revision = "A"
issue_date = 2026-11-02
units = "both"
reference = "standard-15C"

[[tables]]
name = "air-both"
substance = "air"
datum = { kind = "sensible", T = "0 °C" }
temperature_units = ["°C", "K"]
columns = ["T", "cp", "h", "cp_mean_h", "s0", "cp_mean_s", "Pr", "vr", "k", "a"]
grid = { segments = [ { start = "0 °C", stop = "1200 °C", step = "25 °C" } ] }

[[tables]]
name = "co2-molar"
substance = "CO2"
basis = "molar"
units = "SI"
P_ref = "1 atm"
anchor = { T = "0 °C", Pr = 1.0, vr = 1.0 }
columns = ["T", "cp", "h", "s0", "g0", "cp_mean_h", "Pr", "vr"]
grid = { segments = [ { start = "250 K", stop = "3000 K", step = "50 K" } ] }

[[tables]]
name = "flue-vol"
substance = "CO2=0.09,H2O=0.16,N2=0.72,O2=0.03"
basis = "volumetric"
datum = { kind = "sensible", T = "15 °C" }
temperature_units = ["°C"]
columns = ["T", "cp", "h", "s0", "cp_mean_h", "cp_mean_s", "k"]
grid = { segments = [ { start = "15 °C", stop = "1500 °C", step = "15 °C" } ] }
"""


def build_spec(tmp_path, capsys):
    spec = tmp_path / "harrow-moss.toml"
    spec.write_text(SPEC, encoding="utf-8")
    rc, _, err = run(["build", spec, "--out", tmp_path / "book"], capsys)
    assert rc == 0, err
    return spec


@pytest.mark.parametrize("table", ["air-both", "co2-molar", "flue-vol"])
def test_built_table_csv_against_its_own_spec_gives_zero_deviation(table, tmp_path, capsys):
    """A table book's CSV (tablegen build) compared with its spec table: zero deviation in every column,
    SI and US columns alike, mean cp recomputed here independently of the book's code."""
    spec = build_spec(tmp_path, capsys)
    csv_path = tmp_path / "book" / f"{table}.csv"
    rc, out, err = run(["compare", spec, csv_path, "--table", table, "--out", tmp_path / "o", "--json"], capsys)
    s = json.loads(out)
    assert rc == 0, s["out_of_tolerance"][:2]
    ref = read_reference(csv_path)
    assert len(s["columns"]) == len(ref.columns) >= 7       # every column compared, none skipped
    for c in s["columns"]:
        scale = max(abs(float(x)) for x in ref.columns_of(c["key"])[0].text if x)
        # the CSV holds the book's doubles (shortest round trip); only unit conversions
        # and the independent mean-cp evaluation differ, in the last bits of float64
        assert c["stats"]["max_abs"] <= 1e-12 * scale, (c["key"], c["unit"], c["stats"]["max_abs"])


def test_built_table_needs_its_datum_to_match(tmp_path, capsys):
    """The CO2 table is on P° = 1 atm with Pr = 1 at 0 °C: against plain CO2 its s° and Pr fail,
    with the same datum options they pass, and --align recovers the entropy offset R ln(1.01325)."""
    spec = build_spec(tmp_path, capsys)
    csv_path = tmp_path / "book" / "co2-molar.csv"
    rc, out, _ = run(["compare", "CO2", csv_path, "--out", tmp_path / "a", "--json"], capsys)
    bad = {c["column"] for c in json.loads(out)["out_of_tolerance"]}
    assert rc == 1 and {"s0_molar", "Pr", "vr"} <= bad
    rc, _, _ = run(["compare", "CO2", csv_path, "--out", tmp_path / "b", "--p-ref", "1atm",
                    "--anchor", "T=0C,Pr=1,vr=1", "--columns", "s0_molar,Pr,vr,cp_molar"], capsys)
    assert rc == 0
    rc, out, _ = run(["compare", "CO2", csv_path, "--out", tmp_path / "c", "--json", "--columns", "s0_molar",
                      "--align", "s0_molar=offset", "--tolerance", "s0_molar=1e-9J/(mol K)"], capsys)
    assert rc == 0
    # s°(1 atm) = s°(1 bar) - R ln(101325/100000), R from CODATA 2018
    assert json.loads(out)["alignments"][0]["value"] == pytest.approx(-scipy.constants.R * np.log(1.01325), rel=1e-9)
    rc, _, err = run(["compare", spec, csv_path, "--out", tmp_path / "d"], capsys)
    assert rc == 2 and "--table" in err and "air-both" in err
    rc, _, err = run(["compare", spec, csv_path, "--table", "co2-molar", "--p-ref", "1atm",
                      "--out", tmp_path / "e"], capsys)
    assert rc == 2 and "spec table carries its own" in err


def test_volumetric_columns_use_the_stated_reference_conditions(tmp_path, capsys):
    """Per-m³ columns of a built table: with --vol-ref standard-15C (the spec's) they pass; at the default
    normal conditions (0 °C) every one is off by 288.15/273.15 (ideal gas: n = P/(R T)), about 5.5 %."""
    build_spec(tmp_path, capsys)
    csv_path = tmp_path / "book" / "flue-vol.csv"
    sub = ["compare", "CO2=0.09,H2O=0.16,N2=0.72,O2=0.03", csv_path, "--h-datum", "sensible:15C", "--json"]
    rc, out, _ = run(sub + ["--out", tmp_path / "a", "--vol-ref", "standard-15C"], capsys)
    assert rc == 0, json.loads(out)["out_of_tolerance"][:2]
    rc, out, _ = run(sub + ["--out", tmp_path / "b", "--columns", "cp_vol"], capsys)
    s = json.loads(out)
    assert rc == 1 and s["options"]["volume_reference"]["T_K"] == 273.15
    assert s["columns"][0]["stats"]["max_rel"] == pytest.approx(288.15 / 273.15 - 1, rel=1e-9)


# ------------------------------------------------------------- unit pieces
def test_tolerance_forms():
    """Relative, absolute in the column unit, absolute with its own unit, and both (common practice:
    '% of reading + absolute', as instrument accuracies are stated)."""
    units = {"h": unit("kJ/kg"), "cp": unit("kJ/(kg K)")}
    assert parse_tolerance("cp=0.1%", units)[1].rel == pytest.approx(1e-3)
    t = parse_tolerance("h=0.5kJ/kg", units)[1]
    assert t.rel == 0 and t.abs_si == pytest.approx(500.0)
    t = parse_tolerance("h=0.2%+10 J/kg", units)[1]
    assert t.rel == pytest.approx(2e-3) and t.abs_si == pytest.approx(10.0)
    assert parse_tolerance("h=1e+1kJ/kg", units)[1].abs_si == pytest.approx(1e4)


def test_rounding_allowance_is_half_the_last_printed_place(tmp_path):
    """A cell printed to 3 decimals is known to ±0.0005: its rounding passes a zero tolerance."""
    import tablegen
    sub = tablegen.substance("N2")
    cp = sub.properties([1000.0])["cp_molar"][0]
    ref = tmp_path / "r.csv"
    ref.write_text(f"T [K],cp_molar [J/(mol K)]\n1000,{cp:.3f}\n", encoding="utf-8")
    zero = {"cp_molar": parse_tolerance("cp_molar=0%", {"cp_molar": unit("J/(mol K)")})[1]}
    assert compare(sub, read_reference(ref), tolerances=zero).passed
    ref.write_text(f"T [K],cp_molar [J/(mol K)]\n1000,{round(cp, 3) + 0.002:.3f}\n", encoding="utf-8")
    assert not compare(sub, read_reference(ref), tolerances=zero).passed
    ref.write_text(f"T [K],cp_molar [J/(mol K)]\n1000,{cp + 0.0004:.6f}\n", encoding="utf-8")
    assert not compare(sub, read_reference(ref), tolerances=zero).passed


# ------------------------------------------------------------ identities
from hypothesis import given, settings, strategies as st  # noqa: E402


@settings(max_examples=25, deadline=None)
@given(offset=st.floats(-5000.0, 5000.0), scale=st.floats(1e-3, 1e3),
       species=st.sampled_from(["N2", "CO2", "H2O", "air"]))
def test_alignment_recovers_any_offset_and_scale(offset, scale, species, tmp_path_factory):
    """Identity: a reference made as tablegen + c (h) and tablegen × f (Pr) aligns back to c and f,
    with zero deviation left (17 significant digits written, so float64 round-off only)."""
    import tablegen
    sub = tablegen.substance(species)
    T = np.linspace(250.0, 2500.0, 19)
    p = sub.properties(T)
    path = tmp_path_factory.mktemp("align") / "r.csv"
    path.write_text("T [K],h [kJ/kg],Pr [-]\n" + "".join(
        f"{float(t)!r},{float(h / 1000 + offset)!r},{float(pr * scale)!r}\n" for t, h, pr in zip(T, p["h"], p["Pr"])),
        encoding="utf-8")
    cmp = compare(sub, read_reference(path), align={"h": "offset", "Pr": "scale"})
    al = {c.key: c.alignment for c in cmp.columns}
    assert al["h"].value_in_unit == pytest.approx(offset, abs=1e-9 * (1 + abs(offset) + np.max(np.abs(p["h"])) / 1000))
    assert al["Pr"].value == pytest.approx(scale, rel=1e-12)
    assert cmp.passed


# ------------------------------------------------------ pipeline: hints, exit codes, books
def pdf_text(path, pages=None) -> str:
    import pypdf
    rd = pypdf.PdfReader(str(path))
    return "\n".join(p.extract_text() for p in (rd.pages if pages is None else rd.pages[:pages]))


#: A handbook-style ideal-gas air table in the classic gas-tables layout (h and s° counted
#: from absolute zero, Pr and vr on the tables' own scale), written FROM MEMORY: T [K],
#: h [kJ/kg], Pr, u [kJ/kg], vr, s° [kJ/(kg K)]. Not a copy of any source; the test below
#: checks that the recalled numbers hang together physically before using them.
AIR_FROM_MEMORY = """\
300 300.19 1.3860 214.07 621.2 1.70203
400 400.98 3.806 286.16 301.6 1.99194
500 503.02 8.411 359.49 170.6 2.21952
600 607.02 16.28 434.78 105.8 2.40902
700 713.27 28.80 512.33 69.76 2.57277
800 821.95 47.75 592.30 48.08 2.71787
900 932.93 75.29 674.58 34.31 2.84856
1000 1046.04 114.0 758.94 25.17 2.96770
1200 1277.79 238.0 933.33 14.470 3.17888
1400 1515.42 450.5 1113.52 8.919 3.36200
1600 1757.57 791.2 1298.30 5.804 3.52364
1800 2003.3 1310 1487.2 3.944 3.6684
2000 2252.1 2068 1678.7 2.776 3.7994
"""
#: From memory, of the same table: h(298.15 K) = 298.18 kJ/kg and s°(298.15 K) = 1.69528 kJ/(kg K).
AIR_MEMORY_AT_298 = {"h": 298.18, "s0": 1.69528}


def write_air_from_memory(path):
    rows = np.array([[float(x) for x in ln.split()] for ln in AIR_FROM_MEMORY.splitlines()])
    path.write_text("# handbook-style air table, values from memory\n"
                    "T [K]  h [kJ/kg]  Pr [-]  u [kJ/kg]  vr [-]  s0 [kJ/(kg K)]\n" + AIR_FROM_MEMORY,
                    encoding="utf-8")
    return rows


def test_air_table_from_memory_is_physically_plausible(tmp_path):
    """The recalled table obeys the ideal-gas identities it must (so the test below uses sane data):
    u = h - R T (R of dry air 0.2870 kJ/(kg K), common practice), vr ∝ T/Pr, and
    Pr2/Pr1 = exp((s°2 - s°1)/R)."""
    a = write_air_from_memory(tmp_path / "air.txt")
    T, h, Pr, u, vr, s0 = a.T
    R = scipy.constants.R / 28.9647           # kJ/(kg K); M of dry air 28.9647 g/mol (from memory)
    assert np.max(np.abs(u - (h - R * T))) < 1.0                       # kJ/kg; the table prints u to 0.01-0.1
    c = vr * Pr / T
    assert np.max(np.abs(c / c.mean() - 1)) < 0.005
    ratio = np.log(Pr[1:] / Pr[:-1]) / ((s0[1:] - s0[:-1]) / R)
    assert np.max(np.abs(ratio - 1)) < 0.005


def test_unaligned_handbook_table_hints_at_the_h_and_s0_offsets_and_the_suggested_align_passes(tmp_path, capsys):
    """The from-memory air table against tablegen air as computed: every cell fails, the hints name
    the constant offset of h and of s° (the handbook counts both from 0 K), the Pr/vr scale, and the
    --align options they suggest make it pass. Hints never change the verdict (exit 1 stays 1)."""
    import tablegen
    write_air_from_memory(tmp_path / "air.txt")
    rc, out, err = run(["compare", "air", tmp_path / "air.txt", "--out", tmp_path / "a", "--json"], capsys)
    s = json.loads(out)
    assert rc == 1 and s["cells_out_of_tolerance"] == s["cells_compared"] == 65
    hints = {h["column"]: h for h in s["hints"]}
    assert {"h", "u", "s0", "Pr", "vr"} <= set(hints)
    tg = tablegen.substance("air").properties(np.array([298.15]))
    # the offsets the hints give equal what the table itself says at 298.15 K (from memory) minus
    # tablegen's value there, within the table's printed places and the spread of the fit
    assert hints["h"]["kind"] == "offset" and hints["h"]["unit"] == "kJ/kg"
    assert hints["h"]["value"] == pytest.approx(AIR_MEMORY_AT_298["h"] - tg["h"][0] / 1000, abs=0.3)
    assert hints["s0"]["kind"] == "offset"
    assert hints["s0"]["value"] == pytest.approx(AIR_MEMORY_AT_298["s0"] - tg["s0"][0] / 1000, abs=1e-3)
    assert hints["Pr"]["kind"] == "scale" and hints["vr"]["kind"] == "scale"
    for line in ("hint: h: every deviation is the same -298.", "hint: s0: every deviation is the same +5.169",
                 "--align h=offset", "--align s0=offset", "--h-datum sensible:298.15K:"):
        assert line in err, line
    assert "Hints from the deviations" in pdf_text(tmp_path / "a" / "report.pdf", 1)
    opts = [x for o in s["suggested_options"] for x in o.split(" ", 1)]
    assert "h=offset" in opts and "s0=offset" in opts
    rc, out, _ = run(["compare", "air", tmp_path / "air.txt", "--out", tmp_path / "b", "--json", *opts], capsys)
    assert rc == 0, json.loads(out)["out_of_tolerance"][:3]
    # the datum and anchor the hints name do the same without fitting h, u, Pr and vr
    datum = next(o for o in hints["h"]["options"] if o.startswith("--h-datum"))
    anchor = next(o for o in hints["Pr"]["options"] if o.startswith("--anchor"))
    rc, out, _ = run(["compare", "air", tmp_path / "air.txt", "--out", tmp_path / "c", "--json",
                      *datum.split(" "), *anchor.split(" "), "--align", "s0=offset"], capsys)
    assert rc == 0, json.loads(out)["out_of_tolerance"][:3]


def test_n2_table_at_1_atm_gives_the_reference_pressure_hint(tmp_path, capsys):
    """NIST-JANAF N2 (janaf package, P° = 1 bar) moved to P° = 1 atm: s°(1 atm) = s°(1 bar) - R ln(1.01325)
    with R from scipy.constants (CODATA). The s° cells fail, the hint says the reference uses 1 atm
    and --p-ref 1atm passes."""
    T, cp, S, H = janaf_rows("N2")
    S_atm = S - scipy.constants.R * np.log(101325.0 / 100000.0)
    ref = tmp_path / "n2-1atm.csv"
    ref.write_text("T [K],cp_molar [J/(mol K)],s0_molar [J/(mol K)],dh298_molar [kJ/mol]\n" + "".join(
        f"{t:g},{c:.3f},{s:.3f},{h:.3f}\n" for t, c, s, h in zip(T, cp, S_atm, H)), encoding="utf-8")
    rc, out, err = run(["compare", "N2", ref, "--out", tmp_path / "a", "--json", "--source", "nasa1993"], capsys)
    s = json.loads(out)
    assert rc == 1 and {c["column"] for c in s["out_of_tolerance"]} == {"s0_molar"}
    (hint,) = s["hints"]
    assert hint["kind"] == "p_ref" and hint["options"] == ["--p-ref 1atm"]
    assert hint["value"] == pytest.approx(-scipy.constants.R * np.log(1.01325), rel=1e-9)
    assert "the reference uses P° = 1 atm: try --p-ref 1atm" in err
    assert "the reference uses P° = 1 atm" in pdf_text(tmp_path / "a" / "report.pdf", 1)
    assert s["suggested_options"] == ["--p-ref 1atm"]
    rc, _, _ = run(["compare", "N2", ref, "--out", tmp_path / "b", "--source", "nasa1993", "--p-ref", "1atm"], capsys)
    assert rc == 0


def test_book_against_book_one_changed_cell_fails_alone_and_a_changed_revision_is_stated(tmp_path, capsys,
                                                                                           demo_book):
    """The demo book (tablegen demo, its desk edition first) as the reference folder of its own spec: one cp cell changed by
    1 % (tolerance 0.5 %) in one CSV and the revision in another CSV's CSVW metadata: exit 1, exactly
    that cell fails, every other table passes, and the mixed revision is stated (it changes no verdict)."""
    import shutil

    from tablegen.commands.demo import spec_paths
    folder = tmp_path / "demo"
    shutil.copytree(demo_book, folder)
    spec = next(p for p in spec_paths() if p.stem == "kestrel-fen")
    csv_path = folder / "n2.csv"
    lines = csv_path.read_bytes().decode("utf-8").split("\r\n")
    head = lines[0].split(",")
    j, row = head.index("cp [kJ/(kg K)]"), 10                   # file line 11
    cells = lines[row].split(",")
    cells[j] = repr(float(cells[j]) * 1.01)
    lines[row] = ",".join(cells)
    csv_path.write_bytes("\r\n".join(lines).encode("utf-8"))
    meta = folder / "co2.csv-metadata.json"
    m = json.loads(meta.read_text(encoding="utf-8"))
    m["dc:hasVersion"] = "D"
    meta.write_text(json.dumps(m), encoding="utf-8")

    rc, out, err = run(["compare", spec, folder, "--out", tmp_path / "qa", "--json"], capsys)
    s = json.loads(out)
    assert rc == 1 and s["exit_status"] == 1 and s["verdict"] == "fail"
    assert s["tables_compared"] == 8 and s["tables_failed"] == 1 and s["cells_out_of_tolerance"] == 1
    by = {t["name"]: t for t in s["tables"]}
    assert by["n2"]["verdict"] == "fail"
    assert all(t["verdict"] == "pass" for n, t in by.items() if n != "n2")
    (cell,) = by["n2"]["summary"]["out_of_tolerance"]
    assert (cell["line"], cell["column"]) == (row + 1, "cp")
    assert by["co2"]["reference_identity"]["revision"] == "D"
    assert by["air"]["reference_identity"]["revision"] == "C"
    assert any("revision D" in n and "mixes two issues" in n for n in s["reference_folder"]["notes"])
    assert s["reference_folder"]["book"]["number"] == "KFH-PT-0107" and s["same_fingerprint"] is True
    assert by["air"]["matched_by"] == "book sidecar kestrel-fen-desk.json"
    assert "mixes two issues" in err
    dev = list(csv.DictReader(io.StringIO((tmp_path / "qa" / "deviations.csv").read_text(encoding="utf-8"))))
    assert [(r["table"], r["line"], r["column"]) for r in dev if r["status"] == "OUT"] == \
        [("n2", str(row + 1), "cp")]
    assert len(dev) == s["cells_compared"]
    first = pdf_text(tmp_path / "qa" / "report.pdf", 1)
    for text in ("FAIL", "KFH-PT-0107", "n2", "co2", "mixes two issues", "page 1 of"):
        assert text in first, text
    assert pdf_marked_cells(tmp_path / "qa" / "report.pdf") == {(row + 1, "cp")}


def test_reference_folder_by_mapping_file_and_missing_tables(tmp_path, capsys):
    """A folder without a sidecar: tables match by file name or by a --map file; a table with no
    reference is bad input (exit 2, nothing written)."""
    spec = build_spec(tmp_path, capsys)
    ref = tmp_path / "refs"
    ref.mkdir()
    for name, new in (("air-both", "air-both.csv"), ("co2-molar", "carbon-dioxide-rev-A.csv")):
        (ref / new).write_bytes((tmp_path / "book" / f"{name}.csv").read_bytes())
    rc, _, err = run(["compare", spec, ref, "--out", tmp_path / "a"], capsys)
    assert rc == 2 and "no reference for table 'co2-molar'" in err and "--map" in err
    assert not (tmp_path / "a").exists()
    mapping = tmp_path / "map.toml"
    mapping.write_text('[tables]\nco2-molar = "carbon-dioxide-rev-A.csv"\n', encoding="utf-8")
    rc, out, _ = run(["compare", spec, ref, "--map", mapping, "--table", "air-both,co2-molar",
                      "--out", tmp_path / "b", "--json"], capsys)
    s = json.loads(out)
    assert rc == 0 and [t["name"] for t in s["tables"]] == ["air-both", "co2-molar"]
    assert [t["matched_by"] for t in s["tables"]] == ["file name", "mapping file map.toml"]
    rc, _, err = run(["compare", "air", ref, "--out", tmp_path / "c"], capsys)
    assert rc == 2 and "book spec" in err


def test_bare_tolerance_is_refused_with_both_readings(tmp_path, capsys):
    """cp=0.5 could be 0.5 % or 0.5 kJ/(kg K): refused (exit 2) with one line showing both; the same
    with a unit or % is taken (a cp 10 % off then fails, as it must)."""
    import tablegen
    cp = tablegen.substance("N2").properties(np.array([300.0, 1000.0]))["cp"] / 1000 * 1.10
    ref = tmp_path / "ref.csv"
    ref.write_text("T [K],cp [kJ/(kg K)]\n" + f"300,{cp[0]:.4f}\n1000,{cp[1]:.4f}\n", encoding="utf-8")
    rc, out, err = run(["compare", "N2", ref, "--out", tmp_path / "o", "--tolerance", "cp=0.5"], capsys)
    assert rc == 2 and out == "" and err.count("\n") == 1
    assert "cp=0.5" in err and "0.5%" in err and "0.5kJ/(kg K)" in err
    assert not (tmp_path / "o").exists()
    rc, _, err = run(["compare", "N2", ref, "--out", tmp_path / "o", "--tolerance", "cp=0.1%+0.5"], capsys)
    assert rc == 2 and "0.5%" in err and "0.5kJ/(kg K)" in err
    rc, _, _ = run(["compare", "N2", ref, "--out", tmp_path / "o", "--tolerance", "cp=0.5%"], capsys)
    assert rc == 1


def test_wide_tolerance_needs_allow_wide_and_is_stated_on_page_one(tmp_path, capsys):
    """25 % relative, or an absolute tolerance larger than the column's range, cannot tell a right
    column from a wrong one: exit 2 without --allow-wide; with it, listed in summary.json and on page 1."""
    ref = write_janaf_csv(tmp_path / "janaf-N2.csv", "N2")
    for tol in ("cp_molar=25%", "cp_molar=10J/(mol K)"):      # N2 cp spans about 29-37 J/(mol K)
        rc, _, err = run(["compare", "N2", ref, "--out", tmp_path / "o", "--tolerance", tol], capsys)
        assert rc == 2 and "--allow-wide" in err and err.count("\n") == 1, err
    assert not (tmp_path / "o").exists()
    rc, out, _ = run(["compare", "N2", ref, "--out", tmp_path / "o", "--tolerance", "cp_molar=10J/(mol K)",
                      "--allow-wide", "--json"], capsys)
    s = json.loads(out)
    assert rc == 0 and [w["column"] for w in s["wide_tolerances"]] == ["cp_molar"]
    assert "range of the column" in s["wide_tolerances"][0]["reason"]
    first = pdf_text(tmp_path / "o" / "report.pdf", 1)
    assert "Wide tolerances" in first and "cp_molar" in first


def test_output_problems_exit_3_and_leave_nothing_new(tmp_path, capsys, monkeypatch):
    """Exit 3 for every output fault: the folder's files exist (no --force), the folder cannot be made,
    or a write fails (ENOSPC simulated); nothing of the run is left, in the folder or beside it."""
    import errno
    import os
    ref = write_janaf_csv(tmp_path / "janaf-Ar.csv", "Ar")
    blocker = tmp_path / "a-file"
    blocker.write_text("x", encoding="utf-8")
    rc, _, err = run(["compare", "Ar", ref, "--out", blocker / "sub"], capsys)
    assert rc == 3 and err.count("\n") == 1 and f"{blocker} is a file" in err
    real = os.fsync
    calls = []

    def full(fd):                      # the disk fills while the second file is staged
        calls.append(fd)
        if len(calls) == 2:
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
        return real(fd)
    monkeypatch.setattr(os, "fsync", full)
    rc, _, err = run(["compare", "Ar", ref, "--out", tmp_path / "o"], capsys)
    monkeypatch.setattr(os, "fsync", real)
    assert rc == 3 and err.count("\n") == 1 and "No space left on device" in err
    assert not (tmp_path / "o").exists() and not [p for p in tmp_path.iterdir() if p.name.startswith(".o.")]


def test_default_output_folder_is_named_after_substance_and_reference(tmp_path, capsys, monkeypatch):
    """Two references of one gas get two folders: output/compare-N2-vs-<reference stem>/."""
    monkeypatch.chdir(tmp_path)
    a = write_janaf_csv(tmp_path / "janaf-2024.csv", "N2")
    b = write_janaf_csv(tmp_path / "handbook.csv", "N2")
    assert run(["compare", "N2", a], capsys)[0] == 0
    assert run(["compare", "N2", b], capsys)[0] == 0
    assert (tmp_path / "output" / "compare-N2-vs-janaf-2024" / "summary.json").is_file()
    assert (tmp_path / "output" / "compare-N2-vs-handbook" / "summary.json").is_file()
    rc, _, err = run(["compare", "N2", a], capsys)
    assert rc == 3 and "--force" in err


def test_deviations_read_as_numbers_with_signs_and_labels_as_words(tmp_path, capsys):
    """Δ to two significant figures with its sign (common practice for reporting deviations); a
    dimensionless unit is not printed (its '-' read as a minus); labels in words."""
    from tablegen.calc.compare_output import format_dev
    assert [format_dev(v) for v in (-298.3, -0.3614, 0.000123, 1.234e-7, 9.96, 0.0)] == \
        ["-300", "-0.36", "+0.00012", "+1.2e-7", "+10", "0"]
    write_air_from_memory(tmp_path / "air.txt")
    rc, out, _ = run(["compare", "air", tmp_path / "air.txt", "--out", tmp_path / "o", "--columns", "h,Pr"], capsys)
    assert rc == 1
    pr = next(ln for ln in out.splitlines() if ", Pr: reference" in ln)
    assert re.search(r"Δ = -\d\.\d+, allowed ±", pr) and " - (" not in pr
    rc, out, _ = run(["compare", "air", tmp_path / "air.txt", "--out", tmp_path / "p", "--columns", "s0",
                      "--align", "s0=offset"], capsys)
    assert "s°, aligned by offset -5.169" in out and "+ -" not in out and "h (h)" not in out


def test_exactly_matching_column_is_not_plotted_at_round_off_scale(tmp_path, capsys):
    """A column equal to tablegen's own values: the report says 'identical to round-off' instead of
    a plot scaled to ±1e-13."""
    T = np.arange(300.0, 1501.0, 100.0)
    rows = state_rows(capsys, "CO2", T)
    ref = tmp_path / "own.csv"
    ref.write_text("T [K],cp [kJ/(kg K)],h [kJ/kg]\n" + "".join(f"{r['T_K']!r},{r['cp']!r},{r['h']!r}\n" for r in rows),
                   encoding="utf-8")
    assert run(["compare", "CO2", ref, "--out", tmp_path / "o"], capsys)[0] == 0
    text = pdf_text(tmp_path / "o" / "report.pdf")
    assert "Identical to round-off" in text and "Δ in kJ/(kg K)" not in text


def test_datum_plus_one_wrong_cell_is_hinted_as_such(tmp_path, capsys):
    """The from-memory air table with one h cell 20 kJ/kg off: h is still one constant but for that
    cell; the hint says so and counts the cell left (it never hides it)."""
    write_air_from_memory(tmp_path / "air.txt")
    text = (tmp_path / "air.txt").read_text(encoding="utf-8").replace("\n700 713.27 ", "\n700 733.27 ")
    (tmp_path / "bad.txt").write_text(text, encoding="utf-8")
    rc, out, _ = run(["compare", "air", tmp_path / "bad.txt", "--columns", "h", "--out", tmp_path / "o",
                      "--json"], capsys)
    s = json.loads(out)
    (hint,) = s["hints"]
    assert rc == 1 and hint["kind"] == "offset-except" and hint["cells_left"] == 1
    assert "except in 1 cell (T = 700 K)" in hint["text"]
    assert hint["value"] == pytest.approx(298.2, abs=0.3)        # the datum the other cells agree on
    rc, out, _ = run(["compare", "air", tmp_path / "bad.txt", "--columns", "h", "--align", "h=offset",
                      "--out", tmp_path / "p", "--json"], capsys)
    bad = [c["T"] for c in json.loads(out)["out_of_tolerance"]]
    assert rc == 1 and "700" in bad
    # the hint states how many cells --align would leave failing (its fitted mean includes the bad cell)
    assert f"With --align h=offset, {len(bad)} cell" in hint["text"]


def test_a_missing_reference_column_is_a_name_error_naming_the_columns(tmp_path):
    from tablegen.calc.compare_reference import read_reference
    from tablegen.core.errors import NameLookupError
    p = tmp_path / "ref.csv"
    p.write_text("T [K],cp [kJ/(kg K)]\n300,1.005\n400,1.013\n", encoding="utf-8")
    with pytest.raises(NameLookupError, match="no column .h.; allowed: cp"):
        read_reference(p).column("h")


def test_quoted_cell_with_a_line_break_is_read_and_later_lines_keep_their_numbers(tmp_path, capsys):
    # RFC 4180 section 2.6: a quoted field may hold a line break. The mark cell of
    # row 2 spans lines 4-5; the rows after it start on lines 7 and 8 (line 6 a comment
    # whose quote opens no cell). Values: NIST-JANAF N2 (janaf package), 3 decimals.
    T, cp, _, _ = janaf_rows("N2", (300.0, 500.0))
    rows = [f"{t:g},{c:.3f}" for t, c in zip(T, cp)]
    text = ("# NIST-JANAF N2\nT [K],cp_molar [J/(mol K)],mark\n"
            f"{rows[0]},\n{rows[1]},\"read from the printed table,\nsecond line\"\n"
            f"# a note, \"quoted\n{rows[2]},\n")
    ref = tmp_path / "ref.csv"
    ref.write_text(text, encoding="utf-8")
    r = read_reference(ref)
    assert r.lines == (3, 4, 7) and r.comments == ("NIST-JANAF N2", 'a note, "quoted')
    assert list(r.T_K) == [float(t) for t in T[:3]]
    rc, out, err = run(["compare", "N2", ref, "--out", tmp_path / "o", "--tolerance", "cp_molar=0.1%"], capsys)
    assert rc == 0, err
    bad = tmp_path / "bad.csv"
    bad.write_text(text + f"{T[3]:g},29.x,\n", encoding="utf-8")
    rc, out, err = run(["compare", "N2", bad, "--out", tmp_path / "o2"], capsys)
    assert rc == 2 and err == (f"tablegen: {bad}:8: cell '29.x' in column 'cp_molar' is not a number; "
                               f"write plain decimal numbers (an empty cell or '-' marks a gap)\n")


def test_the_compare_command_modules_import_one_way():
    # compare.py -> compare_book.py -> compare_table.py, never back (common practice: no import tangles).
    import ast
    import pathlib
    import tablegen.commands as commands
    here = pathlib.Path(commands.__file__).parent
    imported = {}
    for name in ("compare", "compare_book", "compare_table"):
        tree = ast.parse((here / f"{name}.py").read_text(encoding="utf-8"))
        imported[name] = {n.module for n in ast.walk(tree) if isinstance(n, ast.ImportFrom) and n.level == 1
                          and n.module and n.module.startswith("compare")}
    assert imported["compare_table"] == set()
    assert imported["compare_book"] == {"compare_table"}
    assert imported["compare"] <= {"compare_book", "compare_table"}
