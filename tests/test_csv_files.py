"""The CSV files of the demo books open as data in the tools QA staff and engineers use.

Outside references: pandas (read_csv with its default arguments, as a dataframe user
does), Python's csv module (RFC 4180), and the `csvw` package (a general-purpose
implementation of the W3C "CSV on the Web" recommendations: Tabular Metadata and the
Model for Tabular Data, W3C 17 December 2015), which reads each CSV through its
metadata file and checks every cell against the declared datatype.
"""

from __future__ import annotations

import csv
import json
import re

import csvw  # reference libraries of the test extra: a missing one fails
import pandas
import pytest
from pypdf import PdfReader



@pytest.fixture(scope="module")
def demo(demo_book):
    out = demo_book
    books = []
    for side in sorted(out.glob("*.json")):
        if side.name.endswith("-metadata.json"):
            continue
        books.append((side, json.loads(side.read_text(encoding="utf-8"))))
    assert len(books) >= 2
    return out, books


def _tables(demo):
    out, books = demo
    for side, meta in books:
        for tj in meta["tables"]:
            yield out, meta, tj


def test_every_demo_csv_opens_with_pandas_defaults(demo):
    n = 0
    for out, meta, tj in _tables(demo):
        df = pandas.read_csv(out / tj["csv"])
        assert list(df.columns) == [c["csv_header"] for c in tj["columns"]] + ["mark"]
        assert len(df) == tj["rows"]
        for c in tj["columns"]:
            assert df[c["csv_header"]].dtype.kind == "f", (tj["csv"], c["csv_header"])
        n += 1
    assert n >= 8


def test_row_1_is_the_header_for_the_csv_module_and_values_read_back_exactly(demo):
    for out, meta, tj in _tables(demo):
        with open(out / tj["csv"], newline="", encoding="utf-8") as f:
            rows = list(csv.reader(f))
        heads = [c["csv_header"] for c in tj["columns"]]
        assert rows[0] == heads + ["mark"]
        assert len(rows) == tj["rows"] + 1
        df = pandas.read_csv(out / tj["csv"])
        for j, h in enumerate(heads):
            # every cell is a shortest round-trip repr: float() of the text and pandas'
            # parser give the same double
            texts = [r[j] for r in rows[1:]]
            assert all(repr(float(t)) == t for t in texts), (tj["csv"], h)
            assert [float(t) for t in texts] == df[h].tolist(), (tj["csv"], h)
        assert all(re.fullmatch(r"[*xc]*", r[-1]) for r in rows[1:])


def _footer_fingerprint(pdf_path) -> str:
    found = set()
    for page in PdfReader(str(pdf_path)).pages:
        found |= set(re.findall(r"sha256 ([0-9a-f]{64})", page.extract_text()))
    assert len(found) == 1
    return found.pop()


def test_csvw_metadata_describes_each_csv_and_carries_the_pdf_fingerprint(demo):
    out, books = demo
    for side, meta in books:
        fp = _footer_fingerprint(out / meta["files"]["pdf"])
        assert fp == meta["fingerprint"]["sha256"]
        assert len(meta["files"]["csv_metadata"]) == len(meta["files"]["csv"])
        for tj in meta["tables"]:
            mpath = out / tj["csv_metadata"]
            assert mpath.name == tj["csv"] + "-metadata.json"      # W3C naming convention
            m = json.loads(mpath.read_text(encoding="utf-8"))
            assert m["url"] == tj["csv"]
            assert m["prov:wasDerivedFrom"]["@id"] == f"urn:sha256:{fp}"
            assert m["dc:identifier"] == meta["document"]["number"]
            assert m["dc:hasVersion"] == meta["document"]["revision"]
            cols = m["tableSchema"]["columns"]
            assert [c["titles"] for c in cols] == [c["csv_header"] for c in tj["columns"]] + ["mark"]
            assert [c.get("schema:unitText") for c in cols[:-1]] == [c["unit"] for c in tj["columns"]]
            assert len({c["name"] for c in cols}) == len(cols)
            # an independent CSVW implementation reads the CSV through the metadata:
            # the header must match the titles and every cell the declared datatype
            table = csvw.Table.from_file(mpath)
            assert table.check_primary_key() if hasattr(table, "check_primary_key") else True
            rows = list(table.iterdicts(strict=True))
            assert len(rows) == tj["rows"]
            first = rows[0]
            assert isinstance(first[cols[0]["name"]], float)
