"""Benchmark: a 100-page tables-only book (A4, SI, ten property columns).

Targets (issue 10): <= 1.5 s for the book, peak memory <= 250 MB, <= 30 kB per page.
Run by hand:  python3 benchmarks/bench_book.py
Reports the wall time of each stage (spec validation, table model, PDF, CSV and
JSON), the PDF pages and bytes per page, and the peak resident memory of the process.
"""

from __future__ import annotations

import resource
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

SPECIES = ["air", "N2", "O2", "CO2", "H2O"]


def spec_text(rows_per_table: int) -> str:
    lines = ['[document]', 'title = "Benchmark book"', 'number = "BM-100"', 'revision = "A"',
             'issue_date = 2026-11-30', 'paper = "A4"', '']
    for s in SPECIES:
        stop = 200 + (rows_per_table - 1) * 1
        lines += ['[[tables]]', f'name = "bench-{s}"', f'substance = "{s}"',
                  f'grid = {{ segments = [ {{ start = "200 K", stop = "{stop} K", step = "1 K" }} ] }}', '']
    return "\n".join(lines)


def main() -> int:
    from tablegen.spec import book as specmod
    from tablegen.book import csvout, jsonout, model, pdf, tablepages
    from tablegen.book.fonts import register
    register()
    with tempfile.TemporaryDirectory() as d:
        # 20 table pages per substance at the A4 rows per page
        p = Path(d) / "bench.toml"
        p.write_text(spec_text(60), encoding="utf-8")
        probe = model.build_book(specmod.load(p))
        rpp = tablepages.plan_table(probe.tables[0], pdf.layout_for("A4", "portrait")).chunks[0][1]
        p.write_text(spec_text(20 * rpp), encoding="utf-8")
        t0 = time.perf_counter()
        spec = specmod.load(p)
        t1 = time.perf_counter()
        book = model.build_book(spec)
        t2 = time.perf_counter()
        data = pdf.render(book)
        t3 = time.perf_counter()
        names = {"pdf": "bench.pdf", "csv": [f"{t.name}.csv" for t in book.tables]}
        names["csv_metadata"] = [csvout.metadata_name(n) for n in names["csv"]]
        csvs = [csvout.render_table(book, t) for t in book.tables]
        metas = [csvout.metadata(book, t, n) for t, n in zip(book.tables, names["csv"])]
        js = jsonout.render(book, names)
        t4 = time.perf_counter()
    _, pages = pdf.plan(book)
    table_pages = sum(1 for pg in pages if pg.kind == "table")
    n = len(pages)
    peak_mb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    total = t4 - t0
    print(f"rows: {sum(t.rows for t in book.tables)} in {len(book.tables)} tables; "
          f"{rpp} rows per page")
    print(f"pages: {n} ({table_pages} table pages, {n - table_pages} front pages)")
    print(f"spec {t1 - t0:.3f} s, model {t2 - t1:.3f} s, PDF {t3 - t2:.3f} s, "
          f"CSV+JSON {t4 - t3:.3f} s; total {total:.3f} s (target <= 1.5 s)")
    print(f"PDF {len(data) / 1024:.0f} kB, {len(data) / n / 1024:.1f} kB per page (target <= 30 kB)")
    print(f"peak resident memory {peak_mb:.0f} MB (target <= 250 MB)")
    # the same book from a cold start of the command (interpreter, imports, data files)
    import subprocess
    with tempfile.TemporaryDirectory() as d:
        p = Path(d) / "bench.toml"
        p.write_text(spec_text(20 * rpp), encoding="utf-8")
        t = time.perf_counter()
        subprocess.run([sys.executable, "-m", "tablegen", "build", str(p), "--out", str(Path(d) / "o"),
                        "--quiet"], check=True, cwd=Path(__file__).resolve().parent.parent,
                       stdout=subprocess.DEVNULL)
        cold = time.perf_counter() - t
    print(f"cold command 'tablegen build' of the same book, files written: {cold:.3f} s")
    ok = total <= 1.5 and peak_mb <= 250 and len(data) / n <= 30 * 1024
    print("targets met" if ok else "TARGET MISSED")
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())
