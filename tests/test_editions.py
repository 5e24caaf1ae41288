"""Editions: one spec, several printed forms (desk A4, pocket A5, ...) in one output folder.

The values an edition prints are checked against the engine (``Substance.properties``)
at the edition's own rows, so an edition can only change which rows and columns are
printed and how, never a value. The fingerprint is recomputed as docs/spec.md states it.
"""

from __future__ import annotations

import hashlib
import json
import textwrap
from pathlib import Path

import numpy as np
import pytest
from pypdf import PdfReader

import tablegen
from tablegen import cli

ROOT = Path(__file__).resolve().parent.parent
SCHEMA = json.loads((ROOT / "docs" / "book-json-schema.json").read_text(encoding="utf-8"))

SPEC = textwrap.dedent('''
    # an invented works: "Redshank Moor pumping station"
    [document]
    title = "Redshank Moor pumping station: gas tables"
    number = "RM-12"
    revision = "B"
    issue_date = 2026-08-03
    paper = "A4"

    [editions.desk]
    label = "Desk copy"
    suffix = "-D"

    [editions.pocket]
    label = "Pocket copy"
    suffix = "-P"
    paper = "A5"
    grid_step = "20 K"
    columns = ["T", "cp", "h", "s0"]

    [editions.pocket.table.n2]
    temperature_units = ["°C"]

    [[tables]]
    name = "air"
    substance = "air"
    columns = ["T", "cp", "cv", "k", "h", "u", "s0", "Pr", "vr", "a"]
    grid = { segments = [ { start = "300 K", stop = "1000 K", step = "10 K" } ] }

    [[tables]]
    name = "n2"
    substance = "N2"
    grid = { segments = [ { start = "0 °C", stop = "500 °C", step = "10 °C" } ] }
''')


def _write(tmp_path: Path, text: str, name: str = "redshank") -> Path:
    p = tmp_path / f"{name}.toml"
    p.write_text(text, encoding="utf-8")
    return p


@pytest.fixture(scope="module")
def both(tmp_path_factory):
    tmp = tmp_path_factory.mktemp("editions")
    spec = _write(tmp, SPEC)
    out = tmp / "out"
    assert cli.main(["build", str(spec), "--out", str(out), "--quiet"]) == 0
    metas = {e: json.loads((out / f"redshank-{e}.json").read_text(encoding="utf-8")) for e in ("desk", "pocket")}
    return out, metas


def _csv(path: Path) -> tuple[list[str], np.ndarray]:
    lines = path.read_text(encoding="utf-8").strip().split("\n")
    head = lines[0].strip().split(",")[:-1]          # the last column is the row mark
    rows = [[float(x) for x in ln.strip().split(",")[:-1]] for ln in lines[1:]]
    return head, np.array(rows)


def test_one_spec_builds_both_editions_into_one_folder(both):
    out, metas = both
    names = sorted(p.name for p in out.iterdir())
    assert names == sorted(["redshank-desk.pdf", "redshank-desk.json", "redshank-pocket.pdf", "redshank-pocket.json",
                            "air.csv", "air.csv-metadata.json", "n2.csv", "n2.csv-metadata.json",
                            "air-pocket.csv", "air-pocket.csv-metadata.json", "n2-pocket.csv",
                            "n2-pocket.csv-metadata.json", "tablegen-issue.sha256"])
    # one set, one issue: the manifest lists the files of both editions and names each edition
    manifest = (out / "tablegen-issue.sha256").read_text(encoding="utf-8")
    listed = {ln.split("  ", 1)[1] for ln in manifest.splitlines() if not ln.startswith("#")}
    assert listed == set(names) - {"tablegen-issue.sha256"}
    assert "# edition desk: redshank-desk.pdf" in manifest and "# edition pocket: redshank-pocket.pdf" in manifest
    for name in listed:
        digest = hashlib.sha256((out / name).read_bytes()).hexdigest()
        assert f"{digest}  {name}" in manifest
    for e, m in metas.items():
        assert m["edition"]["name"] == e
        assert m["files"]["pdf"] == f"redshank-{e}.pdf"
    assert metas["desk"]["edition"]["number"] == "RM-12-D" and metas["pocket"]["edition"]["number"] == "RM-12-P"
    assert metas["pocket"]["edition"]["paper"] == "A5" and metas["pocket"]["edition"]["two_sided"] is True
    assert metas["desk"]["edition"]["paper"] == "A4" and metas["desk"]["edition"]["two_sided"] is False
    assert [t["csv"] for t in metas["pocket"]["tables"]] == ["air-pocket.csv", "n2-pocket.csv"]
    # each edition's pages carry its own document number
    for e, number in (("desk", "RM-12-D"), ("pocket", "RM-12-P")):
        reader = PdfReader(str(out / f"redshank-{e}.pdf"))
        assert all(f"{number} Rev. B" in p.extract_text() for p in reader.pages)
        assert reader.pages[0].mediabox.width < 500 if e == "pocket" else reader.pages[0].mediabox.width > 590


def test_json_of_each_edition_validates_against_the_schema(both):
    from test_book import validate
    for m in both[1].values():
        validate(m, SCHEMA)


def test_both_editions_carry_one_fingerprint_of_spec_and_data(both):
    out, metas = both
    fps = {m["fingerprint"]["sha256"] for m in metas.values()}
    assert len(fps) == 1
    fp = fps.pop()
    # recomputed as documented: canonical JSON of the spec (its editions included), then "name sha256" per file
    spec = metas["pocket"]["spec"]
    assert set(spec["editions"]) == {"desk", "pocket"}
    h = hashlib.sha256(json.dumps(spec, sort_keys=True, separators=(",", ":"), ensure_ascii=False).encode())
    from tablegen.data.library import gasdata_dir
    for f in metas["pocket"]["data_files"]:
        h.update(f"\n{f['name']} {hashlib.sha256((gasdata_dir() / f['name']).read_bytes()).hexdigest()}".encode())
    assert h.hexdigest() == fp
    for e in metas:
        for page in PdfReader(str(out / f"redshank-{e}.pdf")).pages:
            assert f"sha256 {fp}" in page.extract_text()
    for name in ("air.csv", "air-pocket.csv"):
        meta = json.loads((out / f"{name}-metadata.json").read_text(encoding="utf-8"))
        assert meta["prov:wasDerivedFrom"]["@id"] == f"urn:sha256:{fp}"


def test_pocket_grid_and_columns_follow_its_overrides(both):
    out, metas = both
    head, desk = _csv(out / "air.csv")
    phead, pocket = _csv(out / "air-pocket.csv")
    assert np.allclose(desk[:, 0], np.arange(300.0, 1000.0 + 1e-9, 10.0), rtol=0, atol=1e-9)
    assert np.allclose(pocket[:, 0], np.arange(300.0, 1000.0 + 1e-9, 20.0), rtol=0, atol=1e-9)
    assert phead == ["T [K]", "T [°C]", "cp [kJ/(kg K)]", "h [kJ/kg]", "s0 [kJ/(kg K)]"]
    assert head[2:] == ["cp [kJ/(kg K)]", "cv [kJ/(kg K)]", "k [-]", "h [kJ/kg]", "u [kJ/kg]", "s0 [kJ/(kg K)]",
                        "Pr [-]", "vr [-]", "a [m/s]"]
    # the per-table override: n2 in °C only, the °C grid at 20 K (= 20 °C) steps
    nhead, n2 = _csv(out / "n2-pocket.csv")
    assert nhead[0] == "T [°C]" and np.allclose(n2[:, 0], np.arange(0.0, 500.0 + 1e-9, 20.0), atol=1e-9)
    assert metas["pocket"]["edition"]["tables"][0]["rows"] == 36


def test_every_edition_prints_the_engine_values_at_its_rows(both):
    """The pocket edition changes rows and columns, never a value: its CSV equals the engine."""
    out, _ = both
    phead, pocket = _csv(out / "air-pocket.csv")
    p = tablegen.substance("air").properties(pocket[:, 0])
    assert np.allclose(pocket[:, 2], p["cp"] / 1e3, rtol=1e-15, atol=0)
    assert np.allclose(pocket[:, 4], p["s0"] / 1e3, rtol=1e-15, atol=0)
    _, desk = _csv(out / "air.csv")
    common = np.isin(desk[:, 0], pocket[:, 0])
    assert np.array_equal(desk[common][:, [0, 2]], pocket[:, [0, 2]])


def test_one_edition_alone_gives_the_same_bytes(both, tmp_path):
    out, _ = both
    spec = _write(tmp_path, SPEC)
    alone = tmp_path / "alone"
    assert cli.main(["build", str(spec), "--edition", "pocket", "--out", str(alone), "--quiet"]) == 0
    assert sorted(p.name for p in alone.iterdir()) == sorted(
        ["redshank-pocket.pdf", "redshank-pocket.json", "air-pocket.csv", "air-pocket.csv-metadata.json",
         "n2-pocket.csv", "n2-pocket.csv-metadata.json", "tablegen-issue.sha256"])
    for p in alone.iterdir():
        if p.name != "tablegen-issue.sha256":         # the manifest lists this set only
            assert p.read_bytes() == (out / p.name).read_bytes(), p.name


def test_one_edition_into_the_folder_of_all_says_what_it_leaves_out(both, tmp_path, capsys):
    import shutil
    out, _ = both
    folder = tmp_path / "issue"
    shutil.copytree(out, folder)
    spec = _write(tmp_path, SPEC)
    assert cli.main(["build", str(spec), "--edition", "pocket", "--out", str(folder)]) == 2
    assert "holds an earlier issue" in capsys.readouterr().err
    assert cli.main(["build", str(spec), "--edition", "pocket", "--out", str(folder), "--force"]) == 0
    err = capsys.readouterr().err
    assert "held the desk edition too; this issue holds pocket only" in err
    assert not (folder / "redshank-desk.pdf").exists() and (folder / "redshank-pocket.pdf").is_file()


def test_editions_that_print_a_table_alike_share_its_csv(tmp_path):
    text = SPEC.replace('grid_step = "20 K"\ncolumns = ["T", "cp", "h", "s0"]\n', '')
    assert text != SPEC
    out = tmp_path / "o"
    assert cli.main(["build", str(_write(tmp_path, text)), "--out", str(out), "--quiet"]) == 0
    desk = json.loads((out / "redshank-desk.json").read_text(encoding="utf-8"))
    pocket = json.loads((out / "redshank-pocket.json").read_text(encoding="utf-8"))
    assert [t["csv"] for t in desk["tables"]] == ["air.csv", "n2.csv"]
    assert [t["csv"] for t in pocket["tables"]] == ["air.csv", "n2-pocket.csv"]     # n2 differs: °C only
    meta = json.loads((out / "air.csv-metadata.json").read_text(encoding="utf-8"))
    assert meta["schema:bookEdition"] == ["desk", "pocket"]


def test_compare_finds_each_table_of_either_edition(both, tmp_path, capsys):
    out, _ = both
    spec = _write(tmp_path, SPEC)
    for edition, csv in ((None, "air.csv"), ("pocket", "air-pocket.csv")):
        extra = ["--edition", edition] if edition else []
        rc = cli.main(["compare", str(spec), str(out), "--out", str(tmp_path / f"qa-{edition}"), "--json", *extra])
        s = json.loads(capsys.readouterr().out)
        assert rc == 0 and s["tables_compared"] == 2
        by = {t["name"]: t for t in s["tables"]}
        assert Path(by["air"]["reference_file"]).name == csv
        assert s["same_fingerprint"] is True


def test_paper_for_once_keeps_the_fingerprint_and_says_so(both, tmp_path):
    out, metas = both
    spec = _write(tmp_path, SPEC)
    once = tmp_path / "once"
    assert cli.main(["build", str(spec), "--edition", "desk", "--paper", "Letter", "--out", str(once), "--quiet"]) == 0
    m = json.loads((once / "redshank-desk.json").read_text(encoding="utf-8"))
    assert m["fingerprint"] == metas["desk"]["fingerprint"]
    assert m["edition"]["paper"] == "Letter" and m["edition"]["paper_from"] == "--paper"
    reader = PdfReader(str(once / "redshank-desk.pdf"))
    assert (float(reader.pages[0].mediabox.width), float(reader.pages[0].mediabox.height)) == (612.0, 792.0)
    assert "tablegen build --paper" in reader.pages[0].extract_text()


def test_a_spec_without_editions_is_one_book_as_before(tmp_path):
    text = SPEC[:SPEC.index("[editions.desk]")] + SPEC[SPEC.index("[[tables]]"):]
    out = tmp_path / "o"
    assert cli.main(["build", str(_write(tmp_path, text)), "--out", str(out), "--quiet"]) == 0
    assert sorted(p.name for p in out.iterdir()) == sorted(
        ["redshank.pdf", "redshank.json", "air.csv", "air.csv-metadata.json", "n2.csv", "n2.csv-metadata.json",
         "tablegen-issue.sha256"])
    m = json.loads((out / "redshank.json").read_text(encoding="utf-8"))
    assert m["edition"]["name"] == "" and m["edition"]["number"] == "RM-12"
    assert "editions" not in m["spec"]


@pytest.mark.parametrize("change, args, message", [
    (None, ["--edition", "field"],
     "tablegen: --edition 'field': not an edition of this spec; its editions: desk, pocket"),
    (("[editions.pocket.table.n2]", "[editions.pocket.substances.x]\nof = \"CO2\"\n\n[editions.pocket.table.n2]"),
     [], "tablegen: editions.pocket.substances: an edition may not change the substances"),
    (("[editions.desk]\n", "[editions.desk]\ndata = { files = [\"x.toml\"] }\n"), [],
     "tablegen: editions.desk.data: an edition may not change the coefficient data"),
    (("temperature_units = [\"°C\"]", "temperature_units = [\"°C\"]\ndatum = \"sensible\""), [],
     "tablegen: editions.pocket.table.n2.datum: an edition may not change the enthalpy datum"),
    (("grid_step = \"20 K\"", "grid_step = \"20 K\"\nT_range = [\"1200 K\", \"1500 K\"]"), [],
     "tablegen: editions.pocket.T_range: 1200-1500 K leaves table 'air' with no rows"),
    (("grid_step = \"20 K\"", "grid_step = \"-5 K\""), [], "tablegen: editions.pocket.grid_step: must be > 0"),
    (("temperature_units = [\"°C\"]", "temperature_units = [\"°C\"]\ngrid = { list = [] }"), [],
     "tablegen: editions.pocket: tables[1].grid.list: is empty"),
    (("paper = \"A5\"", "paper = \"B5\""), [], "tablegen: editions.pocket.paper: 'B5' is not known"),
    (("[editions.pocket.table.n2]", "[editions.pocket.table.co2]"), [],
     "tablegen: editions.pocket.table.co2: 'co2' is not a table of this spec"),
    (None, ["--paper", "A6"], "tablegen: --paper 'A6': not a paper tablegen prints on; allowed: A4, Letter, A3, A5"),
    (None, ["--edition", "desk", "--impose", "booklet"], "tablegen: --impose booklet: desk is A4 portrait"),
    (None, ["--impose", "poster"], "tablegen: --impose 'poster': not a layout; allowed: booklet"),
])
def test_bad_edition_input_is_refused_in_one_line_and_nothing_is_written(tmp_path, capsys, change, args, message):
    text = SPEC if change is None else SPEC.replace(*change)
    assert text != SPEC or change is None
    out = tmp_path / "o"
    assert cli.main(["build", str(_write(tmp_path, text)), "--out", str(out), *args]) == 2
    err = capsys.readouterr().err
    assert err.startswith(message), err
    assert len(err.strip().splitlines()) == 1 and "; " in err
    assert not out.exists()


def test_edition_on_a_spec_without_editions_is_refused(tmp_path, capsys):
    text = SPEC[:SPEC.index("[editions.desk]")] + SPEC[SPEC.index("[[tables]]"):]
    assert cli.main(["build", str(_write(tmp_path, text)), "--edition", "pocket", "--out", str(tmp_path / "o")]) == 2
    assert capsys.readouterr().err.startswith("tablegen: --edition pocket: redshank declares no editions; ")


def test_demo_is_one_spec_in_four_editions(demo_book, tmp_path):
    import shutil

    from test_book import validate
    from tablegen.commands.demo import spec_paths
    assert [p.name for p in spec_paths()] == ["kestrel-fen.toml"]
    metas = {e: json.loads((demo_book / f"kestrel-fen-{e}.json").read_text(encoding="utf-8"))
             for e in ("desk", "pocket", "letter", "wall")}
    assert {m["edition"]["paper"] for m in metas.values()} == {"A4", "A5", "Letter", "A3"}
    assert len({m["fingerprint"]["sha256"] for m in metas.values()}) == 1
    assert (demo_book / "kestrel-fen-pocket-booklet.pdf").is_file()
    subs = {s["id"]: s for m in metas.values() for s in m["substances"]}
    assert "air" in subs
    assert sum(1 for s in subs.values() if s["kind"] == "mixture" and s["id"] != "air") >= 2
    assert sum(1 for s in subs.values() if s["kind"] == "species") >= 3
    units = {t["units"] for m in metas.values() for t in m["tables"]}
    assert {"SI", "US", "both"} <= units
    for m in metas.values():
        validate(m, SCHEMA)
        assert (demo_book / m["files"]["pdf"]).is_file()
        assert all((demo_book / c).is_file() for c in m["files"]["csv"])
    # the US site copy prints the US tables as the desk copy does: one CSV file each
    assert [t["csv"] for t in metas["letter"]["tables"]] == ["air-us.csv", "fuel-letter.csv", "flue-us.csv"]
    assert json.loads((demo_book / "air-us.csv-metadata.json").read_text(encoding="utf-8"))[
        "schema:bookEdition"] == ["desk", "letter"]
    # the demo overwrites its own files without --force
    again = tmp_path / "again"
    shutil.copytree(demo_book, again)
    assert cli.main(["demo", "--out", str(again), "--quiet"]) == 0
    assert (again / "kestrel-fen-desk.pdf").read_bytes() == (demo_book / "kestrel-fen-desk.pdf").read_bytes()
