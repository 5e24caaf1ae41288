"""Benchmark: ten charts (model + vector PDF page) in <= 4 s; PNG figures reported too.

Run by hand:  python3 benchmarks/bench_charts.py
Ten charts: T-s and h-s of five substances (air, CO2, H2O, N2, an invented flue
gas), each with volume lines and a gas-turbine process overlay.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

import tablegen  # noqa: E402
from tablegen.book.chart_model import build_chart  # noqa: E402
from tablegen.book.chart_pdf import chart_pdf  # noqa: E402
from tablegen.book.chart_png import PngPages, chart_png  # noqa: E402
from tablegen.spec.chart import parse_charts  # noqa: E402

TARGET_S = 4.0
OVERLAY = {"label": "GT-2, invented Harwick site", "start": {"T": "15C", "P": "1.013bar"},
           "steps": [{"step": "compress", "P2": "12bar", "eta": 0.86},
                     {"step": "heat_p", "T2": "1300K"},
                     {"step": "expand", "P2": "1.05bar", "eta": 0.89}]}
SUBSTANCES = ["air", "CO2", "H2O", "N2", "CO2=0.085,H2O=0.17,N2=0.725,O2=0.02"]


def main() -> int:
    subs = [tablegen.substance(n) for n in SUBSTANCES]       # data loading not timed
    specs = parse_charts({"kind": "both", "volumes": [0.2, 2.0], "overlays": [OVERLAY]},
                         "charts", units="SI")
    chart_pdf([build_chart(subs[0], specs[0], T_range_K=(250.0, 1500.0))])   # warm fonts
    t0 = time.perf_counter()
    models = [build_chart(s, sp, T_range_K=(250.0, 1500.0)) for s in subs for sp in specs]
    t1 = time.perf_counter()
    pdf = chart_pdf(models)
    t2 = time.perf_counter()
    total = t2 - t0
    print(f"10 charts: models {t1 - t0:.2f} s + PDF pages {t2 - t1:.2f} s = {total:.2f} s "
          f"(target <= {TARGET_S:g} s); PDF {len(pdf) / 1024:.0f} KiB")
    t3 = time.perf_counter()
    for m in models[:2]:
        chart_png(m, "A4", dpi=300)
    t4 = time.perf_counter()
    pages = PngPages()
    for m in models[:2]:
        pages.png(m, "A4", dpi=300)
    t5 = time.perf_counter()
    print(f"PNG at 300 dpi, A4: {(t4 - t3) / 2:.2f} s per chart on a figure of its own, "
          f"{(t5 - t4) / 2:.2f} s on one figure reused (reported, not in the target)")
    return 0 if total <= TARGET_S else 1


if __name__ == "__main__":
    sys.exit(main())
