"""What a careful reader checks in a printed book: the digits of Pr and vr, the units of
the appendix, the default enthalpy datum of a flue gas, and the worked example on the
how-to-read page.

Sources beside each check. Unit factors are exact by definition (NIST SP 811 (2008)
appendix B: Btu (International Table) = 1055.05585262 J, lbm = 0.45359237 kg,
psi = 0.45359237 × 9.80665 N / 0.0254² m², °R = K × 9/5). Linear interpolation between
the printed rows of a table is how tables are read (common practice); the digit rule is
the book's own stated rule (docs/spec.md, "Digits"), applied here to the PDF text read
back with pypdf.
"""

from __future__ import annotations

import csv
import json
import math
import re
import textwrap
from pathlib import Path

import numpy as np
import pytest
from pypdf import PdfReader

from tablegen import cli
from tablegen.spec import columns, book as spec
from tablegen.calc import uncertainty as unc
from tablegen.book import model
from tablegen.commands.demo import spec_paths
from test_book import build, parse_table_pages, printed

ROOT = Path(__file__).resolve().parent.parent
PSI = 0.45359237 * 9.80665 / 0.0254 ** 2          # Pa, exact by definition (NIST SP 811)
TO_K = {"K": lambda T: T, "°C": lambda T: T + 273.15, "°F": lambda T: (T + 459.67) / 1.8,
        "°R": lambda T: T / 1.8}


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    """The demo books as a user gets them: (folder, {book name: (JSON, PdfReader, spec)})."""
    out = tmp_path_factory.mktemp("demo")
    assert cli.main(["demo", "--out", str(out), "--quiet"]) == 0
    from tablegen.book.build import file_names
    books = {}
    for path in spec_paths():
        for sp in spec.load_editions(path):           # every edition the demo spec declares
            names = file_names(sp)
            name = Path(names["pdf"]).stem
            meta = json.loads((out / names["json"]).read_text(encoding="utf-8"))
            books[name] = (meta, PdfReader(str(out / names["pdf"])), sp)
    return out, books


def _last_digit(token: str) -> float:
    """Value of one unit in the last printed digit of a figure as the PDF prints it."""
    t = token.replace("\u2212", "-")
    mant, _, exp = t.partition("e")
    dec = len(mant.split(".")[1]) if "." in mant else 0
    return 10.0 ** (-dec + (int(exp) if exp else 0))


# ---------------------------------------------------------------- significant digits
def test_significant_digit_columns_never_print_fewer_digits_than_their_uncertainty_asks(demo):
    """In every demo table, every printed Pr and vr has its last digit at most U/2, U the stated
    expanded uncertainty (data and fit) of its row: the rule docs/spec.md states for decimal
    columns, which the significant-digit columns follow. Read from the PDF text (pypdf)."""
    _, books = demo
    checked = 0
    for meta, reader, sp in books.values():
        pages = parse_table_pages(reader)
        for ti, (tj, ts) in enumerate(zip(meta["tables"], sp.tables), 1):
            keys = [c["key"] for c in tj["columns"] if c["significant"] is not None]
            if not keys:
                continue
            b = unc.budget(ts.substance, ts.T_K, keys, T_rows=ts.T_K[:1])
            U = {k: unc.COVERAGE * np.hypot(b.u[k]["data"], b.u[k].get("fit residual", 0.0)) for k in keys}
            tcol = tj["columns"][0]
            rows_csv = list(csv.DictReader((demo[0] / tj["csv"]).open(encoding="utf-8")))
            row_of = {printed(float(r[f"T [{tcol['unit']}]"]), tcol): i for i, r in enumerate(rows_csv)}
            nT = sum(1 for c in tj["columns"] if c["key"] == "T")
            for pg in pages:
                if pg is None or pg[0] != ti:
                    continue
                _, pairs, rows, _, _ = pg
                for k in keys:
                    sym = {"Pr": "Pr", "vr": "vr"}[k]
                    if (sym, "-") not in pairs:
                        continue
                    j = pairs.index((sym, "-"))
                    for toks in rows:
                        r = row_of[toks[0]]
                        assert _last_digit(toks[j]) <= U[k][r] / 2 * (1 + 1e-9), (tj["name"], k, toks[0], toks[j])
                        checked += 1
    assert checked > 500


def test_significant_digit_rule_is_stated_on_the_how_to_read_page(demo):
    _, books = demo
    meta, reader, _ = books["kestrel-fen-desk"]
    text = " ".join(reader.pages[1].extract_text().split())
    assert "Pr and vr, printed to a count n of significant digits, follow the same rule" in text


def test_significant_for_is_the_decimal_rule_relative_to_the_value():
    """10^(1-n) is the largest power of ten not above U_rel/2 (docs/spec.md, "Digits"): the
    last digit of 1.0000 (n = 5) is 1e-4, not above U/2 for U_rel = 3e-4 (common practice
    arithmetic)."""
    assert unc.significant_for([3e-4, 1e-3]) == 5
    assert unc.significant_for([2.1e-4]) == 5 and unc.significant_for([1.9e-4]) == 6
    assert unc.significant_for([0.05]) == 3
    assert unc.significant_for([np.nan]) == 12


# ---------------------------------------------------------------- US units of the appendix
SI_FIGURE = re.compile(r"(?<![\w.])[−-]?\d+(?:\.\d+)?(?:e[+−-]?\d+)?\s*"
                       r"(K|°C|bar|mbar|kPa|MPa|Pa|kJ/kg|J/kg|kJ/\(kg K\)|J/\(kg K\)|kJ/mol|J/mol|"
                       r"J/\(mol K\)|kJ/m³|kJ/\(m³ K\)|m/s)(?![\w/])")
#: a bracketed aside (one level of nesting, as in "(296.753 J/(kg K))"), not a unit's own brackets
BRACKETS = re.compile(r"(?<!/)\((?:[^()]|\([^()]*\))*\)")


def _si_figures(text: str) -> list:
    return [m.group(0) for m in SI_FIGURE.finditer(BRACKETS.sub("", text))]


def test_us_tables_state_every_figure_in_us_units(demo):
    """In the appendix sections of a US customary table, in its notes and head lines and on the
    how-to-read page (datum, P°, Tₘ), no
    figure carries an SI unit unless bracketed beside its US value; the paragraphs are those
    the PDF prints (read back with pypdf)."""
    _, books = demo
    meta, reader, sp = books["kestrel-fen-desk"]
    book = model.build_book(sp)
    text = " ".join(" ".join(p.extract_text() for p in reader.pages).split())
    us = [t for t in book.tables if t.units == "US"]
    assert len(us) == 2
    for t in us:
        said = [p for s in book.appendix for p in s.paragraphs if p.startswith(f"{t.title}: ")]
        rows = [" ".join(r[2:]) for s in book.appendix for r in s.rows if r[0] == t.name]
        assert len(said) >= 4 and len(rows) >= 10, t.name
        for p in said:
            assert " ".join(p.split())[:80] in text, p
        for line in [*said, *rows, *t.notes, *t.head_lines, t.datum_text, t.P_ref_text, t.mean_cp_text]:
            assert _si_figures(line) == [], (t.name, line)
        assert any("psia" in p for p in said) and any("°F" in r or "°R" in r for r in rows)
    # the check has teeth: the SI table beside them speaks SI
    si = next(t for t in book.tables if t.units == "SI" and t.basis == "mass")
    assert any(_si_figures(p) for s in book.appendix for p in s.paragraphs if p.startswith(f"{si.title}: "))


def test_appendix_figures_convert_exactly_to_the_table_units(demo):
    """The appendix's U of h in a US table equals the budget's SI figure divided by the exact
    Btu/lbm factor (NIST SP 811), to the two digits printed; the validity pressure 1 bar is
    printed as 14.5 psia (1e5 Pa / PSI)."""
    _, books = demo
    meta, reader, sp = books["kestrel-fen-desk"]
    book = model.build_book(sp)
    t = next(t for t in book.tables if t.name == "air-us")
    sec = book.appendix[0]
    h_rows = [r for r in sec.rows if r[0] == t.name and r[1] == "h"]
    si = [b for b in t.uncertainty["keys"]["h"]["bands"]]
    assert len(h_rows) == len(si)
    for r, b in zip(h_rows, si):
        value, unit = r[3].split()[:2]
        assert unit == "Btu/lbm"
        assert float(value) == pytest.approx(b["U"] / (1055.05585262 / 0.45359237), rel=0.06)
    assert any(f"at {1e5 / PSI:.4g} psia" in p for p in book.appendix[1].paragraphs if p.startswith(t.title))


# ---------------------------------------------------------------- default datum
FLUE_SPEC = textwrap.dedent('''
    [document]
    title = "Slipway Row test boiler"
    number = "SR-9"
    revision = "A"
    issue_date = 2026-09-01

    [substances.stack]
    name = "Slipway Row flue gas"
    combustion = { fuel = "CH4=0.9,C2H6=0.05,N2=0.05", excess_air = 20 }

    [[tables]]
    name = "stack-si"
    substance = "stack"
    columns = ["T", "cp", "h", "s0"]
    grid = { segments = [ { start = "0 °C", stop = "1200 °C", step = "20 °C" } ] }

    [[tables.charts]]
    kind = "hs"

    [[tables]]
    name = "stack-formation"
    substance = "stack"
    columns = ["T", "h"]
    datum = "formation"
    grid = { list = ["300 K", "400 K"] }

    [[tables]]
    name = "air-vol"
    substance = "air"
    basis = "volumetric"
    columns = ["T", "cp", "h"]
    grid = { segments = [ { start = "0 °C", stop = "400 °C", step = "20 °C" } ] }

    [[tables]]
    name = "air-mass"
    substance = "air"
    columns = ["T", "h"]
    grid = { list = ["300 K", "400 K"] }
''')


def _documented_default(row_start: str) -> str:
    """The default datum docs/spec.md states for a kind of table ("The default enthalpy datum")."""
    doc = (ROOT / "docs" / "spec.md").read_text(encoding="utf-8")
    section = doc.split("### The default enthalpy datum", 1)[1].split("###", 1)[0]
    line = next(ln for ln in section.splitlines() if ln.startswith(f"| {row_start}"))
    return line.split("|")[2].strip()


def test_flue_gas_table_without_a_datum_key_prints_the_documented_sensible_datum(tmp_path):
    """A combustion-products table without a datum key: the datum docs/spec.md states
    (sensible, h(0 °C) = 0), printed at the head of its pages, and h at 0 °C is 0 within the
    rounding of its printed digits (half a unit in the last place) in the PDF and the CSV;
    its h-s chart's enthalpy scale starts near zero, not near -2700 kJ/kg. Reading a flue-gas
    table as sensible heat above a stated temperature is common practice in boiler work."""
    stated = _documented_default("combustion products")
    assert stated == "sensible, h(0 °C) = 0"
    assert _documented_default("any substance on the volumetric basis") == "sensible, h(0 °C) = 0"
    assert _documented_default("every other table").startswith("formation")
    out = build(tmp_path, name="stack", text=FLUE_SPEC)
    meta = json.loads((out / "stack.json").read_text(encoding="utf-8"))
    t = {x["name"]: x for x in meta["tables"]}
    assert t["stack-si"]["datum"]["kind"] == "sensible"
    assert t["stack-si"]["datum"]["T_ref_K"] == pytest.approx(273.15, abs=1e-12)
    assert t["stack-si"]["datum"]["h_ref_J_per_kg"] == 0.0
    text = " ".join(" ".join(p.extract_text() for p in PdfReader(str(out / "stack.pdf")).pages).split())
    assert "Enthalpy datum h(273.15 K) = 0 kJ/kg (sensible enthalpy)" in text
    rows = list(csv.DictReader((out / "stack-si.csv").open(encoding="utf-8")))
    h_col = next(c for c in t["stack-si"]["columns"] if c["key"] == "h")
    at0 = next(r for r in rows if float(r["T [°C]"]) == 0.0)
    assert abs(float(at0["h [kJ/kg]"])) <= 0.5 * 10.0 ** -h_col["decimals"]
    assert printed(float(at0["h [kJ/kg]"]), h_col) == f"{0:.{h_col['decimals']}f}"
    # the formation datum is one key away: h of the flue gas far below zero
    form = list(csv.DictReader((out / "stack-formation.csv").open(encoding="utf-8")))
    assert float(form[0]["h [kJ/kg]"]) < -2000
    # per m³: sensible from 0 °C; air per kg keeps the formation datum (NASA/JANAF convention)
    assert t["air-vol"]["datum"]["kind"] == "sensible" and t["air-mass"]["datum"]["kind"] == "formation"
    # the chart of the flue-gas table: h from about 0 up, on the table's datum
    book = model.build_book(spec.load(tmp_path / "stack.toml"))
    hs = book.tables[0].charts[0]
    assert hs.kind == "hs" and -200 < hs.y_axis.lo <= 0 < hs.y_axis.hi


def test_chart_command_follows_the_book_rule(tmp_path, capsys):
    """tablegen chart of a flue gas without --h-datum: the sensible datum of its book table
    (its footer states it); of air: formation, as before."""
    from tablegen.commands import common
    from tablegen.thermo.substance import Datum, default_datum
    import tablegen
    flue = tablegen.substance("flue@CH4@excess-air=15")
    assert common.datum_from_text(None, flue, by_rule=True, reacting=None) == Datum("sensible", 273.15, 0.0)
    assert default_datum(tablegen.substance("air"), reacting=None) == Datum("formation")
    assert default_datum(tablegen.substance("air"), reacting=None, basis="volumetric").kind == "sensible"
    assert cli.main(["chart", "flue@CH4@excess-air=15", "--kind", "hs", "--out", str(tmp_path), "--quiet"]) == 0
    pdf = next(tmp_path.glob("*.pdf"))
    text = " ".join(PdfReader(str(pdf)).pages[0].extract_text().split())
    assert "Enthalpy datum: h(273.15 K) = 0 kJ/kg (sensible enthalpy)" in text


# ---------------------------------------------------------------- worked example
EXAMPLE = re.compile(r"Worked example, from Table 1 \((?P<title>[^)]*)\): to read (?P<sym>\S+) at "
                     r"(?P<T>[\d.]+) (?P<Tu>\S+), take the printed rows at (?P<T1>[\d.]+) and "
                     r"(?P<T2>[\d.]+) \S+ and interpolate linearly between them: .*? = (?P<v>[\d.−]+) "
                     r"(?P<unit>\S+)\. .*? How good the reading is: linear interpolation between these "
                     r"two rows adds at most (?P<bound>[\d.]+) ")


@pytest.mark.parametrize("book", ["kestrel-fen-desk", "kestrel-fen-pocket"])
def test_worked_example_equals_the_interpolation_of_the_printed_rows(demo, book):
    """The how-to-read page's example, read from the PDF: its reading equals linear
    interpolation (common practice) of the two rows as printed, recomputed from the CSV
    rounded to the printed decimals; the bound it names covers the error of interpolating
    the unrounded rows against the value computed at the temperature read."""
    out, books = demo
    meta, reader, sp = books[book]
    # the how-to-read pages: two on A4, more on the A5 pocket edition
    text = " ".join(" ".join(reader.pages[i].extract_text().split()) for i in range(1, 6))
    m = EXAMPLE.search(text)
    assert m, text[:2000]
    tj, ts = meta["tables"][0], sp.tables[0]
    assert m["title"] == tj["title"]
    tcol = tj["columns"][0]
    col = next(c for c in tj["columns"] if c["key"] == "h" and c["unit"] == m["unit"])
    rows = list(csv.DictReader((out / tj["csv"]).open(encoding="utf-8")))
    by_T = {printed(float(r[f"T [{tcol['unit']}]"]), tcol): r for r in rows}
    r1, r2 = by_T[m["T1"]], by_T[m["T2"]]
    head = f"h [{col['unit']}]"
    v1, v2 = (float(printed(float(r[head]), col).replace("\u2212", "-")) for r in (r1, r2))
    T, T1, T2 = float(m["T"]), float(m["T1"]), float(m["T2"])
    assert T1 < T < T2
    reading = v1 + (T - T1) / (T2 - T1) * (v2 - v1)
    assert m["v"].replace("\u2212", "-") == f"{reading:.{col['decimals']}f}"
    # the bound: the unrounded rows interpolated against the value at T (K, the rows' own)
    u1, u2 = float(r1[head]), float(r2[head])
    T_K = TO_K[tcol["unit"]](T)
    assert tj["basis"] == "mass"          # the demo's first tables are per unit mass
    p = ts.substance.properties(np.array([T_K]))
    exact = float(p["h"][0]) / columns.unit_factor("h", col["system"], tj["basis"])
    err = abs(u1 + (T - T1) / (T2 - T1) * (u2 - u1) - exact)
    assert err <= float(m["bound"]) * 1.05        # the bound printed to two digits
    assert "printed row" in text and "read, 0.3 of the step past the row above" in text


def test_tables_state_their_interpolation_bound_under_the_rows(demo):
    """Under every demo table covered by a budget: the largest interpolation error per column,
    in the table's units, the figure the worked example points to."""
    _, books = demo
    for meta, reader, sp in books.values():
        book = model.build_book(sp)
        for t in book.tables:
            if t.uncertainty:
                line = next(n for n in t.notes if n.startswith("Linear interpolation between adjacent rows"))
                unit = next(c.unit for c in t.columns if c.key not in ("T", "k", "Pr", "vr"))
                assert unit in line, (t.name, line)


def test_figure_prints_two_digits_without_exponent():
    from tablegen.book.stated import figure
    assert [figure(x) for x in (1.9e-5, 0.000998, 0.24, 240.4, 9.96)] == \
        ["0.000019", "0.0010", "0.24", "240", "10"]
    assert math.isclose(float(figure(0.0094)), 0.0094)
