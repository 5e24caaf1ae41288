"""Speed of loading users' own data: a full TM-4513 card file (every nasa1993
record, 748 species, written by the tm-4513 writer) read, built and validated,
and the same set as a gasdata TOML file. Run by hand:

    python3 benchmarks/bench_userdata.py
"""

from __future__ import annotations

import sys
import tempfile
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from tablegen.data import formats  # noqa: E402
from tablegen.data.library import Library  # noqa: E402


def main():
    base = Library((), include_user_dir=False)
    recs = base.datasets["nasa1993"].records()
    cards = []
    for r in recs:
        c = r.poly.coeffs
        if r.poly.n_intervals == 1:
            lo = up = c[0]
        else:
            lo, up = c[0], c[1]
        if not r.T_min < 1000.0 < r.T_max:
            continue
        hR = float(r.poly.evaluate(np.array([298.15]))["h"][0])
        try:
            cards.append(formats.write_tm4513({"id": r.id[:18].replace(" ", "_"), "elements": r.elements,
                                              "M": r.M, "T_bounds_K": [r.T_min, 1000.0, r.T_max],
                                              "coefficients": [lo[2:], up[2:]], "h298_over_R_K": hR}))
        except Exception:
            continue
    with tempfile.TemporaryDirectory() as d:
        f = Path(d) / "all.dat"
        f.write_text("".join(cards))
        t0 = time.perf_counter()
        lib = Library((str(f),), include_user_dir=False)
        t1 = time.perf_counter()
        n = len(lib.datasets["all"])
        print(f"TM-4513 card file, {n} records: read, built and validated in {(t1 - t0) * 1e3:.0f} ms "
              f"({(t1 - t0) / n * 1e6:.0f} us a record)")
        src = base.datasets["nasa1993"].path
        g = Path(d) / "copy.toml"
        g.write_text(src.read_text().replace('id = "nasa1993"', 'id = "copy"', 1))
        t0 = time.perf_counter()
        lib = Library((str(g),), include_user_dir=False)
        t1 = time.perf_counter()
        print(f"gasdata TOML file, {len(lib.datasets['copy'])} records: read, built and validated in "
              f"{(t1 - t0) * 1e3:.0f} ms")


if __name__ == "__main__":
    main()
