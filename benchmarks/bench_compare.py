"""Speed of the QA comparison: a 5000-row, 10-column reference of a flue-gas mixture.

Run by hand: python3 benchmarks/bench_compare.py [--rows N] [--save DIR] (from the
repository root). Prints the time to read, compare, and render the PDF, CSV and JSON;
--save keeps the reference CSV and the PDF report in DIR (to look at or compare pages).
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import tablegen  # noqa: E402
from tablegen.book.qa_report import render_pdf  # noqa: E402
from tablegen.commands.common import dumps  # noqa: E402
from tablegen.calc.compare import compare  # noqa: E402
from tablegen.calc.compare_reference import read_reference  # noqa: E402
from tablegen.calc.compare_output import deviations_csv, summary  # noqa: E402

KEYS = [("cp", "kJ/(kg K)"), ("cv", "kJ/(kg K)"), ("k", "-"), ("h", "kJ/kg"), ("u", "kJ/kg"),
        ("s0", "kJ/(kg K)"), ("Pr", "-"), ("vr", "-"), ("a", "m/s"), ("cp_molar", "J/(mol K)")]
FACTOR = {"kJ/(kg K)": 1e-3, "kJ/kg": 1e-3}


def main(rows: int = 5000, save: Path | None = None):
    sub = tablegen.mixture({"CO2": 0.09, "H2O": 0.16, "N2": 0.72, "O2": 0.03})
    T = np.linspace(250.0, 2500.0, rows)
    p = sub.properties(T)
    with tempfile.TemporaryDirectory() as d:
        path = Path(d) / "ref.csv"
        lines = ["T [K]," + ",".join(f"{k} [{u}]" for k, u in KEYS)]
        for i in range(rows):
            lines.append(f"{T[i]:.4f}," + ",".join(f"{p[k][i] * FACTOR.get(u, 1.0):.6g}" for k, u in KEYS))
        path.write_text("\n".join(lines) + "\n", encoding="utf-8")
        t0 = time.perf_counter()
        ref = read_reference(path)
        t1 = time.perf_counter()
        cmp = compare(sub, ref)
        t2 = time.perf_counter()
        pdf = render_pdf(cmp)
        t3 = time.perf_counter()
        csv_text = deviations_csv(cmp)
        js = dumps(summary(cmp))
        t4 = time.perf_counter()
        if save is not None:
            save.mkdir(parents=True, exist_ok=True)
            (save / "ref.csv").write_bytes(path.read_bytes())
            (save / "report.pdf").write_bytes(pdf)
    print(f"{rows} rows x {len(KEYS)} columns = {cmp.n_cells} cells, verdict: {cmp.verdict}")
    print(f"read {t1 - t0:.3f} s, compare {t2 - t1:.3f} s, PDF {t3 - t2:.3f} s "
          f"({len(pdf) / 1e6:.2f} MB), CSV+JSON {t4 - t3:.3f} s ({len(csv_text) / 1e6:.2f} MB, "
          f"{len(js) / 1e3:.0f} kB)")


if __name__ == "__main__":
    ap = argparse.ArgumentParser(description="Time the QA comparison of a flue-gas reference table.")
    ap.add_argument("--rows", type=int, default=5000, help="rows of the reference (default 5000)")
    ap.add_argument("--save", type=Path, help="folder to keep the reference CSV and the PDF report in")
    a = ap.parse_args()
    main(a.rows, a.save)
