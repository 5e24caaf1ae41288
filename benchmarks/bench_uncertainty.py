"""Speed of the uncertainty budget (run by hand: python benchmarks/bench_uncertainty.py).

Prints wall times for: loading the agreement figures once, a budget of a
flue-gas table (276 rows, 10 columns, 10 bar), properties(uncertainty=True) on
the same rows, and an automatic step for three columns.
"""

import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
import tablegen  # noqa: E402
from tablegen.calc import uncertainty as un  # noqa: E402
from tablegen.calc import evidence as ev, interpolation as ip  # noqa: E402


def timed(label, f, repeat=5):
    best = float("inf")
    for _ in range(repeat):
        t = time.perf_counter()
        f()
        best = min(best, time.perf_counter() - t)
    print(f"{label:55s} {best * 1e3:8.1f} ms")


def main():
    t = time.perf_counter()
    ev.load_agreement()
    print(f"{'load agreement figures (first call)':55s} {(time.perf_counter() - t) * 1e3:8.1f} ms")
    sub = tablegen.substance("CO2=0.09,H2O=0.18,N2=0.71,O2=0.02")
    T = np.arange(250.0, 3001.0, 10.0)
    keys = ("cp", "cv", "k", "h", "u", "s0", "g0", "Pr", "vr", "a")
    timed("budget, 276 rows x 10 columns, 10 bar", lambda: un.budget(sub, T, keys, P_max_Pa=10e5))
    timed("properties(T, uncertainty=True), 276 rows", lambda: sub.properties(T, uncertainty=True))
    timed("auto_step cp, h, s0 at 1e-4, 300-2000 K", lambda: ip.auto_step(sub, ("cp", "h", "s0"), 300, 2000, 1e-4))
    timed("interpolation_bound h, 276 rows", lambda: ip.interpolation_bound(sub, "h", T))


if __name__ == "__main__":
    main()
