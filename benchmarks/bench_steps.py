"""Speed of the process calculator on arrays of start states (run by hand).

    python3 benchmarks/bench_steps.py

Prints the time per call and per state for each step on 100 000 start states
of air (a 3-species collapsed mixture); the method comparison is included,
as every result carries it.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
import tablegen  # noqa: E402
from tablegen.calc.incompressible import incompressible  # noqa: E402
from tablegen.calc.steps import process  # noqa: E402

N = 100_000


def bench(label, fn, repeat=3):
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    print(f"{label:<34} {best * 1e3:9.1f} ms   {best / N * 1e9:8.0f} ns/state")


def main() -> int:
    air = tablegen.substance("air")
    water = incompressible("water")
    rng = np.random.default_rng(20310)
    T1 = rng.uniform(450.0, 900.0, N)
    P1 = rng.uniform(0.5e5, 5e5, N)
    Tw = rng.uniform(280.0, 300.0, N)
    process(air, T1[:10], P1[:10], "compress", ratio=4.0)       # warm the inverse grids
    print(f"{N} start states")
    bench("air compress ratio 6, eta 0.85", lambda: process(air, T1, P1, "compress", ratio=6.0, eta=0.85))
    bench("air expand ratio 3, eta 0.9", lambda: process(air, T1, P1, "expand", ratio=3.0, eta=0.9))
    bench("air heat_p by 300 kJ/kg", lambda: process(air, T1, P1, "heat_p", q_J_per_kg=3e5))
    bench("air heat_v to 1200 K", lambda: process(air, T1, P1, "heat_v", T2_K=1200.0))
    bench("air throttle to P1/2", lambda: process(air, T1, P1, "throttle", P2_Pa=P1 / 2))
    bench("water pump to 12 bar, eta 0.7", lambda: process(water, Tw, 1e5, "compress", P2_Pa=12e5, eta=0.7))
    return 0


if __name__ == "__main__":
    sys.exit(main())
