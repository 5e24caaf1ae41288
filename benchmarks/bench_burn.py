"""Combustion speed, run by hand: python3 benchmarks/bench_burn.py

Times tablegen.combustion for a natural-gas-like fuel in humid air (every figure:
products, ratios, dew point, heating values, flame temperature), and the
resolution of a flue@ name for a fresh composition.
"""

import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import tablegen  # noqa: E402


def main():
    tablegen.combustion("CH4", excess_air=10)           # warm the library
    n = 200
    t = time.perf_counter()
    for i in range(n):
        tablegen.combustion("CH4=0.9,C2H6=0.06,N2=0.04", "air,rh=60%,T=20C", excess_air=5 + i * 0.1)
    per = (time.perf_counter() - t) / n
    print(f"combustion(): {per * 1e3:.2f} ms per call ({n} calls)")
    t = time.perf_counter()
    for i in range(n):
        tablegen.substance(f"flue@CH4=0.9,C2H6=0.06,N2=0.04@lambda={1.05 + i * 0.001:.3f}")
    per = (time.perf_counter() - t) / n
    print(f"substance('flue@...'): {per * 1e3:.2f} ms per new name ({n} names)")


if __name__ == "__main__":
    main()
