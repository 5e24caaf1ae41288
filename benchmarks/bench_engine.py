"""Engine speed, by hand: python benchmarks/bench_engine.py

* cp, h, s° of a 4-species flue gas on 1e5 temperatures: ns per state, for
  tablegen and (when installed) cantera's vectorised SolutionArray, and the ratio;
* the same for 1 to 20 species (cost must stay flat: the mixture is collapsed);
* inverse T(h) for 1e6 values;
* cold `tablegen --help`.
Targets (README): <= 30 ns/state, >= 200x cantera, flat in species count,
T(h) for 1e6 values <= 0.5 s, --help <= 0.25 s.
"""

import subprocess
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
import tablegen  # noqa: E402
from run_all import median_time  # noqa: E402  (benchmarks/run_all.py, beside this file)

FLUE = {"CO2": 0.09, "H2O": 0.18, "N2": 0.71, "O2": 0.02}
N = 100_000


def best(f, repeat=7):
    return median_time(f, repeat, reduce=min)


def main():
    rng = np.random.default_rng(0)
    T = rng.uniform(300.0, 3000.0, N)           # unsorted: the general path
    Ts = np.sort(T)                              # sorted: every table grid
    mix = tablegen.mixture(FLUE)
    t_u = best(lambda: mix.cp_h_s0(T))
    t_s = best(lambda: mix.cp_h_s0(Ts))
    t_full = best(lambda: mix.properties(Ts))
    print(f"cp, h, s° (4 species, 1e5 unsorted T): {t_u / N * 1e9:6.1f} ns/state")
    print(f"cp, h, s° (4 species, 1e5 sorted T):   {t_s / N * 1e9:6.1f} ns/state")
    print(f"all properties (sorted T):             {t_full / N * 1e9:6.1f} ns/state")
    try:
        import cantera as ct
        species = [s for s in ct.Species.list_from_file("nasa_gas.yaml") if s.name in FLUE]
        gas = ct.Solution(thermo="ideal-gas", species=species)
        arr = ct.SolutionArray(gas, N)
        def ref():
            arr.TPX = T, ct.one_atm, FLUE      # cantera takes a mapping of mole fractions
            return arr.cp_mass, arr.enthalpy_mass, arr.entropy_mass
        t_ct = best(ref, repeat=3)
        print(f"cantera SolutionArray, same states:    {t_ct / N * 1e9:6.1f} ns/state "
              f"(tablegen {t_ct / t_s:,.0f}x faster on sorted, {t_ct / t_u:,.0f}x on unsorted T)")
    except ImportError:
        print("cantera not installed: no reference timing")
    names = ["N2", "O2", "CO2", "H2O", "Ar", "CO", "H2", "SO2", "NO", "CH4", "Kr", "Xe", "NH3",
             "H2S", "OH", "NO2", "N2O", "He", "Ne", "HCl"]
    for n in (1, 4, 10, 20):
        sub = tablegen.mixture({k: 1.0 / n for k in names[:n]})
        t = best(lambda: sub.cp_h_s0(Ts))
        tu = best(lambda: sub.cp_h_s0(T))
        print(f"  {n:2d} species: {t / N * 1e9:6.1f} ns/state sorted, {tu / N * 1e9:6.1f} unsorted "
              f"({sub.poly.n_intervals} intervals)")
    M = 1_000_000
    Ti = rng.uniform(300.0, 3000.0, M)
    h = mix.properties(Ti)["h"]
    mix.T_from("h", h[:10])  # build the inversion grid once
    t_inv = best(lambda: mix.T_from("h", h), repeat=3)
    print(f"inverse T(h), 1e6 values:              {t_inv:6.3f} s")
    t0 = time.perf_counter()
    subprocess.run([sys.executable, "-m", "tablegen", "--help"], capture_output=True, check=True)
    print(f"cold 'tablegen --help':                {time.perf_counter() - t0:6.3f} s")


if __name__ == "__main__":
    main()
