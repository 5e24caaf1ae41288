"""The side-by-side listing of a QA report: full up to LISTING_FULL_ROWS rows of a table, the
rows out of tolerance with their neighbours above (the default, --listing auto), every row
with --listing full; deviations.csv keeps every row whatever the listing.

The reference is N2's cp from NIST-JANAF (docs/examples/janaf-n2.csv, 4th ed., table N-023)
interpolated onto a fine grid, so every row but the ones we spoil stays inside the
tolerance; which rows the PDF lists is what is checked here, not the values.
"""

import csv
import io
from pathlib import Path

import numpy as np
import pytest
from pypdf import PdfReader

from tablegen import cli
from tablegen.book.qa_report import LISTING_FULL_ROWS, LISTING_MODES, LISTING_NEIGHBOURS
from tablegen.commands.compare import LISTING_MODES as CLI_MODES

EXAMPLES = Path(__file__).resolve().parents[1] / "docs" / "examples"


def _reference(tmp_path, rows: int, spoil=()):
    text = (EXAMPLES / "janaf-n2.csv").read_text(encoding="utf-8")
    table = [r for r in csv.reader(io.StringIO(text)) if r and not r[0].startswith("#")][1:]
    T_src, cp_src = np.array([[float(r[0]), float(r[1])] for r in table]).T
    T = np.linspace(300.0, 2000.0, rows)
    cp = np.interp(T, T_src, cp_src)
    cp[list(spoil)] *= 1.05          # 5 %: far outside any tolerance
    p = tmp_path / "n2-fine.csv"
    with open(p, "w", newline="", encoding="utf-8") as f:
        w = csv.writer(f)
        w.writerow(["T [K]", "cp_molar [J/(mol K)]"])
        w.writerows([f"{t:.3f}", f"{c:.4f}"] for t, c in zip(T, cp))
    return p


def _listed_lines(pdf_path) -> list[int]:
    """Reference line numbers printed in the listing pages, top to bottom: the runs that are
    whole numbers right-aligned at the line column's edge (positions read back from the PDF)."""
    from pdf_pages import text_runs

    from tablegen.book.qa_layout import MARGIN
    edge = MARGIN + 26.0 - 2.0          # right edge of the "line" column (qa_report._listing)
    lines, listing = [], False
    for page in PdfReader(pdf_path).pages:
        listing = listing or "Side-by-side listing" in page.extract_text()   # the report's last part
        if not listing:
            continue
        runs = [r for r in text_runs(page) if r.text.strip().isdigit() and abs(r.x1 - edge) < 1.0]
        lines += [int(r.text) for r in sorted(runs, key=lambda r: -r.y0)]
    return lines


def _run(tmp_path, ref, *extra):
    out = tmp_path / ("qa" + "".join(extra).replace("-", ""))
    code = cli.main(["compare", "N2", str(ref), "--columns", "cp_molar", "--tolerance", "cp_molar=1%",
                     "--out", str(out), "--quiet", *extra])
    return code, out


def test_the_cli_offers_the_listing_modes_the_report_knows():
    assert CLI_MODES == LISTING_MODES


def test_a_large_table_lists_its_failing_rows_with_neighbours(tmp_path):
    rows = LISTING_FULL_ROWS + 300
    spoil = (40, 41, 500)
    code, out = _run(tmp_path, _reference(tmp_path, rows, spoil))
    assert code == 1
    listed = _listed_lines(out / "report.pdf")
    # data row i is line i + 2 of the file (line 1 is the header)
    want = {0, rows - 1}
    for i in spoil:
        want |= set(range(i - LISTING_NEIGHBOURS, i + LISTING_NEIGHBOURS + 1))
    assert listed == sorted(i + 2 for i in want)
    text = "".join(p.extract_text() for p in PdfReader(out / "report.pdf").pages)
    assert "rows within tolerance not listed" in text and "--listing full" in text
    # deviations.csv keeps every row
    dev = list(csv.reader(io.StringIO((out / "deviations.csv").read_text(encoding="utf-8"))))
    assert len(dev) - 1 == rows


@pytest.mark.parametrize("rows, extra, full", [(LISTING_FULL_ROWS, (), True),
                                                (LISTING_FULL_ROWS + 300, ("--listing", "full"), True),
                                                (60, ("--listing", "failing"), False)])
def test_full_listing_up_to_the_limit_or_when_asked(tmp_path, rows, extra, full):
    code, out = _run(tmp_path, _reference(tmp_path, rows, (30,)), *extra)
    assert code == 1
    listed = _listed_lines(out / "report.pdf")
    assert (listed == [i + 2 for i in range(rows)]) is full
    assert 32 in listed


def test_a_bad_listing_mode_is_refused_in_one_line(tmp_path, capsys):
    code, _ = _run(tmp_path, _reference(tmp_path, 20), "--listing", "some")
    err = capsys.readouterr().err.strip().splitlines()
    assert code == 2 and len(err) == 1 and "--listing" in err[0] and "full" in err[0]


def _vertical_rules(page) -> dict:
    """Total length of the vertical line segments of a page's content, by x (pt)."""
    import re
    data = page.get_contents().get_data().decode("latin-1")
    spans: dict = {}
    for x1, y1, x2, y2 in re.findall(r"([-\d.]+) ([-\d.]+) m ([-\d.]+) ([-\d.]+) l S", data):
        if abs(float(x1) - float(x2)) < 1e-3:
            x = round(float(x1), 2)
            spans[x] = spans.get(x, 0.0) + abs(float(y2) - float(y1))
    return spans


def test_every_column_group_is_ruled_from_its_head_to_its_last_row(tmp_path):
    # four columns make two groups of different width (3 + 1): each listing page rules the
    # right edge of every group of its columns over the same height (a rule queued for the
    # page and merged must not take another group's places). NIST-JANAF N2 (table N-023):
    # cp, s°, H - H(298); h at the formation datum is H - H(298) for an element (ΔfH = 0,
    # common practice), a fourth column.
    text = (EXAMPLES / "janaf-n2.csv").read_text(encoding="utf-8")
    table = [r for r in csv.reader(io.StringIO(text)) if r and not r[0].startswith("#")]
    ref = tmp_path / "n2-four.csv"
    with open(ref, "w", newline="", encoding="utf-8") as f:
        w = csv.writer(f)
        w.writerow(table[0] + ["h_molar [kJ/mol]"])
        w.writerows(r + [r[3]] for r in table[1:])
    out = tmp_path / "qa"
    code = cli.main(["compare", "N2", str(ref), "--out", str(out), "--listing", "full", "--quiet"])
    assert code in (0, 1)
    pages = [p for p in PdfReader(out / "report.pdf").pages if "Side-by-side listing" in p.extract_text()]
    assert len(pages) >= 2                                  # one page per column group at least
    for page in pages:
        spans = _vertical_rules(page)
        assert spans and max(spans.values()) - min(spans.values()) < 0.5, spans
