"""Spec validation: malformed specs are refused with the key path named, exit 2, no file.

Each bad spec below is the valid base spec with one fault; the test runs the real
command line (``tablegen build``) into an empty folder and checks the exit status,
that the one-line message names the offending key, and that nothing was written.
"""

from __future__ import annotations

import math
import textwrap

import numpy as np
import pytest

from tablegen import cli
from tablegen.spec import book as spec
from tablegen.spec import grids
from tablegen.core.errors import SpecError

BASE = textwrap.dedent('''
    [document]
    title = "Spec test book"
    number = "ST-1"
    revision = "A"
    issue_date = 2026-11-30
    paper = "A4"

    [substances.blend]
    mixture = { CH4 = 0.9, N2 = 0.1 }

    [[tables]]
    name = "air"
    substance = "air"
    grid = { segments = [ { start = "300 K", stop = "400 K", step = "50 K" } ] }

    [[tables]]
    name = "blend"
    substance = "blend"
    grid = { segments = [ { start = "300 K", stop = "400 K", step = "50 K" } ] }
''')

SEG = 'grid = { segments = [ { start = "300 K", stop = "400 K", step = "50 K" } ] }'


def _sub(old: str, new: str, count: int = 1) -> str:
    assert old in BASE, old
    return BASE.replace(old, new, count)


def _table0(old: str, new: str) -> str:
    """Replace in the first [[tables]] entry only."""
    head, sep, rest = BASE.partition("[[tables]]")
    assert old in rest
    return head + sep + rest.replace(old, new, 1)


#: (id, spec text, text the message must contain)
BAD = [
    ("unknown-top-key", BASE + "\n[tabels]\nx = 1\n", "tabels"),
    ("unknown-document-key-did-you-mean", _sub('paper = "A4"', 'papr = "A4"'), "document.papr: unknown key; did you mean 'paper'"),
    ("paper-unknown", _sub('paper = "A4"', 'paper = "B5"'), "document.paper"),
    ("orientation-unknown", _sub('paper = "A4"', 'paper = "A4"\norientation = "sideways"'), "document.orientation"),
    ("units-unknown", _sub('paper = "A4"', 'paper = "A4"\nunits = "imperial"'), "document.units"),
    ("basis-unknown", _sub('paper = "A4"', 'paper = "A4"\nbasis = "weight"'), "document.basis"),
    ("title-wrong-type", _sub('title = "Spec test book"', 'title = 42'), "document.title: must be a string"),
    ("number-missing", _sub('number = "ST-1"\n', ''), "document.number: is required"),
    ("issue-date-bad", _sub('issue_date = 2026-11-30', 'issue_date = "30/11/2026"'), "document.issue_date"),
    ("reference-unknown", _sub('paper = "A4"', 'paper = "A4"\nreference = "arctic"'), "document.reference"),
    ("no-tables", BASE.split("[[tables]]")[0], "tables: is required"),
    ("table-unknown-key", _table0('substance = "air"', 'substance = "air"\ncolums = ["T"]'), "tables[0].colums: unknown key; did you mean 'columns'"),
    ("unknown-species", _table0('substance = "air"', 'substance = "unobtainium"'), "tables[0].substance"),
    ("fractions-not-summing", _sub('CH4 = 0.9, N2 = 0.1', 'CH4 = 0.9, N2 = 0.2'), "substances.blend.mixture: fractions sum to 1.1"),
    ("fraction-wrong-type", _sub('CH4 = 0.9, N2 = 0.1', 'CH4 = "0.9", N2 = 0.1'), "substances.blend.mixture.CH4: must be a number"),
    ("mixture-unknown-component", _sub('CH4 = 0.9, N2 = 0.1', 'CH4 = 0.9, Xe9 = 0.1'), "substances.blend"),
    ("empty-segments", _table0(SEG, 'grid = { segments = [] }'), "tables[0].grid.segments: is empty"),
    ("empty-list", _table0(SEG, 'grid = { list = [] }'), "tables[0].grid.list: is empty"),
    ("step-zero", _table0(SEG, SEG.replace('step = "50 K"', 'step = "0 K"')), "tables[0].grid.segments[0].step: must be > 0"),
    ("step-negative", _table0(SEG, SEG.replace('step = "50 K"', 'step = "-5 K"')), "tables[0].grid.segments[0].step: must be > 0"),
    ("T-below-zero-kelvin", _table0(SEG, SEG.replace('start = "300 K"', 'start = "-280 °C"')), "tables[0].grid.segments[0].start"),
    ("T-zero-kelvin-in-list", _table0(SEG, 'grid = { list = ["0 K", "300 K"] }'), "tables[0].grid.list[0]"),
    ("bad-temperature-unit", _table0(SEG, SEG.replace('step = "50 K"', 'step = "50 furlongs"')), "tables[0].grid.segments[0].step"),
    ("temperature-without-unit", _table0(SEG, SEG.replace('stop = "400 K"', 'stop = "400"')), "tables[0].grid.segments[0].stop"),
    ("stop-below-start", _table0(SEG, SEG.replace('stop = "400 K"', 'stop = "250 K"')), "tables[0].grid.segments[0].stop: must be above start"),
    ("million-rows", _table0(SEG, 'grid = { segments = [ { start = "300 K", stop = "1300 K", step = "0.001 K" } ] }'),
     f"at most {grids.MAX_ROWS_PER_TABLE} rows"),
    ("outside-data-range", _table0(SEG, SEG.replace('stop = "400 K"', 'stop = "9000 K"')), "tables[0].grid"),
    ("unknown-column", _table0('substance = "air"', 'substance = "air"\ncolumns = ["T", "cp", "enthalpy"]'), "tables[0].columns[2]"),
    ("column-twice", _table0('substance = "air"', 'substance = "air"\ncolumns = ["cp", "cp"]'), "tables[0].columns[1]"),
    ("decimals-out-of-range", _table0('substance = "air"', 'substance = "air"\ndecimals = { h = 40 }'), "tables[0].decimals.h"),
    ("decimals-unknown-column", _table0('substance = "air"', 'substance = "air"\ndecimals = { hh = 2 }'), "tables[0].decimals.hh: unknown column; did you mean 'h'"),
    ("bad-pressure-unit", _table0('substance = "air"', 'substance = "air"\nP_ref = "1 furlong"'), "tables[0].P_ref"),
    ("anchor-negative", _table0('substance = "air"', 'substance = "air"\nanchor = { Pr = -1.0 }'), "tables[0].anchor.Pr: must be > 0"),
    ("datum-unknown", _table0('substance = "air"', 'substance = "air"\ndatum = "absolute"'), "tables[0].datum"),
    ("tolerance-zero", _table0(SEG, 'grid = { start = "300 K", stop = "400 K", tolerance = 0.0 }'), "tables[0].grid.tolerance: must be > 0"),
    ("grid-two-kinds", _table0(SEG, 'grid = { list = ["300 K"], segments = [] }'), "tables[0].grid: give exactly one"),
    ("duplicate-table-name", _sub('name = "blend"', 'name = "air"'), "tables[1].name"),
    ("bad-table-name", _table0('name = "air"', 'name = "../air"'), "tables[0].name"),
    ("too-many-temperature-units", _table0('substance = "air"', 'substance = "air"\ntemperature_units = ["K", "°C", "°F"]'), "tables[0].temperature_units"),
    ("extra-row-bad", _table0('substance = "air"', 'substance = "air"\nextra_rows = [15]'), "tables[0].extra_rows[0]"),
    ("not-toml", "[document\ntitle = 'x'", "not valid TOML"),
]


def test_at_least_25_distinct_bad_specs():
    assert len({b[0] for b in BAD}) >= 25
    assert len({b[1] for b in BAD}) == len(BAD)       # distinct faults


def test_base_spec_is_valid(tmp_path):
    p = tmp_path / "base.toml"
    p.write_text(BASE, encoding="utf-8")
    s = spec.load(p)
    assert [t.name for t in s.tables] == ["air", "blend"]
    np.testing.assert_allclose(s.tables[0].T_K, [300.0, 350.0, 400.0], rtol=0, atol=1e-9)


@pytest.mark.parametrize("case", BAD, ids=[b[0] for b in BAD])
def test_bad_spec_exits_2_naming_the_key_and_writes_nothing(case, tmp_path, capsys):
    name, text, needle = case
    p = tmp_path / "bad.toml"
    p.write_text(text, encoding="utf-8")
    out = tmp_path / "out"
    status = cli.main(["build", str(p), "--out", str(out)])
    err = capsys.readouterr().err
    assert status == 2, err
    assert err.startswith("tablegen: ") and err.count("\n") == 1, err
    assert needle in err, err
    assert not out.exists() or not any(out.iterdir())


def test_spec_error_is_a_spec_error(tmp_path):
    p = tmp_path / "x.toml"
    p.write_text(_sub('paper = "A4"', 'paper = "A6"'), encoding="utf-8")
    with pytest.raises(SpecError, match=r"document\.paper: 'A6' is not known; .*allowed: A4, Letter, A3, A5$"):
        spec.load(p)


def test_grid_in_celsius_is_exact_in_celsius(tmp_path):
    p = tmp_path / "c.toml"
    p.write_text(_table0(SEG, 'grid = { segments = [ { start = "0 °C", stop = "100 °C", step = "25 °C" } ] }'),
                 encoding="utf-8")
    t = spec.load(p).tables[0]
    np.testing.assert_allclose(t.T_K - 273.15, [0, 25, 50, 75, 100], rtol=0, atol=1e-9)


def test_fahrenheit_step_is_a_difference_of_temperature(tmp_path):
    # a step of 18 °F is 10 K (common practice: 1 °F difference = 5/9 K)
    p = tmp_path / "f.toml"
    p.write_text(_table0(SEG, 'grid = { segments = [ { start = "32 °F", stop = "68 °F", step = "18 °F" } ] }'),
                 encoding="utf-8")
    t = spec.load(p).tables[0]
    np.testing.assert_allclose(t.T_K, [273.15, 283.15, 293.15], rtol=0, atol=1e-9)


def test_segments_and_extra_rows_merge_sorted_without_duplicates(tmp_path):
    p = tmp_path / "m.toml"
    p.write_text(_table0(SEG, 'grid = { segments = [ { start = "300 K", stop = "400 K", step = "50 K" }, '
                              '{ start = "400 K", stop = "500 K", step = "100 K" } ] }\n'
                              'extra_rows = ["25 °C", "350 K"]'), encoding="utf-8")
    t = spec.load(p).tables[0]
    np.testing.assert_allclose(t.T_K, [298.15, 300, 350, 400, 500], rtol=0, atol=1e-9)
    assert t.extra.tolist() == [True, False, True, False, False]


def test_auto_grid_meets_its_interpolation_tolerance(tmp_path):
    """Linear interpolation between printed rows stays within the stated tolerance and
    within the worst bound the book prints, checked here at 1/8 points (the chooser
    bounds the error on a dense grid: tablegen.calc.interpolation); scale: |f|, or
    cp·T for h, as docs/spec.md states."""
    tol = 1e-4
    p = tmp_path / "a.toml"
    p.write_text(_table0(SEG, f'grid = {{ start = "300 K", stop = "2000 K", tolerance = {tol} }}\n'
                              'columns = ["cp", "h", "s0"]'), encoding="utf-8")
    t = spec.load(p).tables[0]
    T = t.T_K
    assert T[0] == pytest.approx(300) and T[-1] == pytest.approx(2000)
    sub = t.substance
    worst = t.grid["worst_interpolation_error"]
    assert worst <= tol
    mid = 0.5 * (T[1:] + T[:-1])
    p_mid = sub.properties(mid)           # the scale is taken at each interval's middle
    for frac in np.arange(1, 8) / 8:
        Tm = T[:-1] + frac * np.diff(T)
        pm = sub.properties(Tm)
        for key in ("cp", "h", "s0"):
            y = sub.properties(T)[key]
            lin = y[:-1] + frac * np.diff(y)
            scale = p_mid["cp"] * mid if key == "h" else np.abs(p_mid[key])
            assert np.max(np.abs(pm[key] - lin) / scale) <= worst * (1 + 1e-9), (key, frac)


def test_normalised_spec_has_no_paths_and_applies_defaults(tmp_path):
    p = tmp_path / "n.toml"
    p.write_text(BASE, encoding="utf-8")
    n = spec.load(p).normalised
    assert str(tmp_path) not in repr(n)
    t = n["tables"][0]
    assert t["P_ref_Pa"] == 1e5 and t["datum"]["kind"] == "formation"
    assert math.isclose(t["anchor"]["T_K"], 298.15)
    assert [c["key"] for c in t["columns"]][:2] == ["T", "T"]


def test_the_annotated_example_in_docs_builds(tmp_path):
    from pathlib import Path
    doc = (Path(__file__).resolve().parent.parent / "docs" / "spec.md").read_text(encoding="utf-8")
    example = doc.split("```toml\n", 1)[1].split("```", 1)[0]
    p = tmp_path / "example.toml"
    p.write_text(example, encoding="utf-8")
    s = spec.load(p)
    assert [t.name for t in s.tables] == ["air-si", "flue-nm3", "co2-molar"]
    assert s.tables[1].basis == "volumetric" and s.tables[2].substance.P_ref_Pa == 101325.0


def test_substance_of_a_named_species_or_shipped_mixture(tmp_path):
    text = BASE.replace("[substances.blend]\nmixture = { CH4 = 0.9, N2 = 0.1 }",
                        '[substances.blend]\nof = "carbon dioxide"\nname = "process CO2"')
    p = tmp_path / "of.toml"
    p.write_text(text, encoding="utf-8")
    t = spec.load(p).tables[1]
    assert t.substance.id == "CO2" and t.substance.name == "process CO2"


RICH = textwrap.dedent('''
    [document]
    title = "Rich"
    number = "R-1"
    revision = "A"
    issue_date = 2026-11-30
    units = "both"
    basis = "volumetric"
    reference = { name = "works", T = "20 °C", P = "1 atm" }

    [substances.blend]
    mixture = { CH4 = 0.9, N2 = 0.1 }
    basis = "mole"
    name = "blend"

    [defaults]
    columns = ["T", "cp", "h", "s0", "Pr", "cp_mean_h"]

    [[tables]]
    name = "t0"
    title = "T0"
    substance = "blend"
    temperature_units = ["°C", "°F"]
    decimals = { h = 1 }
    significant = { Pr = 4 }
    datum = { kind = "sensible", T = "0 °C", h = "0 kJ/kg" }
    P_ref = "1 atm"
    anchor = { T = "300 K", Pr = 1.0, vr = 1.0 }
    mean_cp_from = "0 °C"
    extra_rows = [ { T = "15 °C", label = "x" }, "20 °C" ]
    grid = { segments = [ { start = "0 °C", stop = "100 °C", step = "50 °C" } ] }

    [[tables]]
    name = "t1"
    substance = "N2"
    grid = { start = "300 K", stop = "600 K", tolerance = 1e-3 }
''')


def _paths(obj, prefix=()):
    if isinstance(obj, dict):
        for k, v in obj.items():
            yield prefix + (k,)
            yield from _paths(v, prefix + (k,))
    elif isinstance(obj, list):
        for i, v in enumerate(obj):
            yield prefix + (i,)
            yield from _paths(v, prefix + (i,))


def test_any_value_of_the_wrong_type_is_a_spec_error_never_a_crash():
    """Every key of a rich spec set in turn to values of every TOML type: the result is a
    valid book or a TablegenError naming the key, never another exception."""
    import copy
    import tomllib

    from tablegen.core.errors import TablegenError
    base = tomllib.loads(RICH)
    spec.parse(base, name="rich")                      # the base is valid
    wrong = [7, -1.5, "x", True, [], ["y", 2], {}, {"z": 1}]
    checked = 0
    for path in _paths(base):
        for w in wrong:
            raw = copy.deepcopy(base)
            node = raw
            for k in path[:-1]:
                node = node[k]
            node[path[-1]] = w
            try:
                spec.parse(raw, name="rich")
            except TablegenError as e:
                assert str(e).split(":")[0], e
            checked += 1
    assert checked > 300


def test_byte_order_mark_and_missing_file(tmp_path):
    p = tmp_path / "bom.toml"
    p.write_bytes(b"\xef\xbb\xbf" + BASE.encode("utf-8"))
    assert len(spec.load(p).tables) == 2
    with pytest.raises(SpecError, match="spec file not found"):
        spec.load(tmp_path / "nothing.toml")
