"""Every speed figure of the README in one run: python benchmarks/run_all.py [--repeat N]

Each row is the median of N runs (default 5; slow rows fewer, as printed), the
reference measured in the same run where one exists (cantera 3 for the engine, the
memory-bandwidth limit of the machine, the cold ``tablegen state`` for the
``species`` listing, the PDF chart for the PNG chart, a reportlab page floor for the
books), and the ratio to it. Only the public API, the command line and reportlab
are used, so the script measures what a user gets. Never run as a test: the figures
depend on the machine and its load (take the README's ranges from several runs on a
quiet machine).
"""

from __future__ import annotations

import argparse
import contextlib
import os
import re
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
import tablegen  # noqa: E402
from tablegen import cli  # noqa: E402

FLUE = {"CO2": 0.09, "H2O": 0.18, "N2": 0.71, "O2": 0.02}
N = 100_000
ENV = {**os.environ, "PYTHONPATH": str(ROOT)}


def median_time(f, repeat: int, reduce=statistics.median) -> float:
    """Time of ``f`` over ``repeat`` runs after one warm-up (first-call caches and fresh
    memory pages are not what a table run pays for): the median, or ``reduce`` of them."""
    f()
    ts = []
    for _ in range(repeat):
        t = time.perf_counter()
        f()
        ts.append(time.perf_counter() - t)
    return reduce(ts)


def cold(args, repeat: int, cwd=None) -> float:
    """Median wall time of a fresh interpreter running ``python -m tablegen ARGS``."""
    ts = []
    for _ in range(repeat):
        t = time.perf_counter()
        subprocess.run([sys.executable, "-m", "tablegen", *args], check=True, cwd=cwd or ROOT, env=ENV,
                       stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        ts.append(time.perf_counter() - t)
    return statistics.median(ts)


def run(args) -> None:
    with open(os.devnull, "w") as sink, contextlib.redirect_stdout(sink):
        rc = cli.main([*args, "--quiet"])
    if rc not in (0, 1):
        raise SystemExit(f"tablegen {' '.join(args)} exited {rc}")


def row(work: str, now: str, reference: str = "", goal: str = "") -> None:
    print(f"| {work} | {now} | {reference} | {goal} |", flush=True)


# ------------------------------------------------------------------ engine
def machine_limit(bytes_per_state: int) -> float:
    """ns/state to write ``bytes_per_state`` at the measured copy bandwidth, plus one np.log."""
    src = np.random.default_rng(1).uniform(300.0, 3000.0, 4_000_000)
    dst = np.empty_like(src)
    t_copy = median_time(lambda: np.copyto(dst, src), 5)
    t_log = median_time(lambda: np.log(src, out=dst), 5)
    bandwidth = src.nbytes / t_copy
    return (bytes_per_state / bandwidth + t_log / src.size) * 1e9


FRESH = """
import sys
import numpy as np
import tablegen
sys.path.insert(0, {here!r})
from run_all import median_time
method, in_order, repeat = sys.argv[1], sys.argv[2] == "1", int(sys.argv[3])
T = np.random.default_rng(0).uniform(300.0, 3000.0, {n})
T = np.sort(T) if in_order else T
f = getattr(tablegen.mixture({flue!r}), method)
print(median_time(lambda: f(T), repeat) / T.size * 1e9)
"""


def fresh_process_ns(method: str, in_order: bool, repeat: int) -> float:
    """ns/state of ``mix.<method>(T)`` in a fresh interpreter that does nothing else, as a
    user's script sees it: its allocator returns the freed outputs to the system between
    calls, so each call pays fresh memory pages (this process's allocator has been warmed
    by the bandwidth measurement's large arrays, hence the second figure of the rows)."""
    code = FRESH.format(n=N, flue=FLUE, here=str(Path(__file__).resolve().parent))
    res = subprocess.run([sys.executable, "-c", code, method, "1" if in_order else "0", str(repeat)],
                         check=True, capture_output=True, text=True, env=ENV)
    return float(res.stdout.split()[-1])


def engine(repeat: int) -> None:
    rng = np.random.default_rng(0)
    T = rng.uniform(300.0, 3000.0, N)
    Ts = np.sort(T)
    mix = tablegen.mixture(FLUE)
    lim3, lim_all = machine_limit(3 * 8), machine_limit(len(mix.properties(Ts[:10])) * 8)
    try:
        import cantera as ct
        species = [s for s in ct.Species.list_from_file("nasa_gas.yaml") if s.name in FLUE]
        gas = ct.Solution(thermo="ideal-gas", species=species)
        arr = ct.SolutionArray(gas, N)

        def ref(Tv):
            arr.TPX = Tv, ct.one_atm, FLUE
            return arr.cp_mass, arr.enthalpy_mass, arr.entropy_mass
    except ImportError:
        gas = ref = None
    for label, Tv, goal in (("in order", Ts, "≤ 8 ns (≥ 500x cantera)"), ("random order", T, "≤ 12 ns")):
        fresh = fresh_process_ns("cp_h_s0", label == "in order", repeat)
        t = median_time(lambda: mix.cp_h_s0(Tv), repeat) / N * 1e9
        refs = [f"limit {lim3:.1f} ns ({fresh / lim3:.1f}x)"]
        if ref is not None:
            t_ct = median_time(lambda: ref(Tv), max(2, repeat // 2)) / N * 1e9
            refs.insert(0, f"cantera {t_ct:,.0f} ns (tablegen {t_ct / fresh:,.0f}x faster)")
        row(f"cp, h, s° of a 4-species flue gas, 1e5 T {label}",
            f"{fresh:.1f} ns/state ({t:.1f} once the allocator keeps its memory)", "; ".join(refs), goal)
    fresh = fresh_process_ns("properties", True, repeat)
    t = median_time(lambda: mix.properties(Ts), repeat) / N * 1e9
    row("all properties (`properties()`), flue gas, 1e5 T",
        f"{fresh:.1f} ns/state ({t:.1f} once the allocator keeps its memory)",
        f"limit {lim_all:.1f} ns ({fresh / lim_all:.1f}x)", "≤ 25 ns")
    # one state at a time, as a process simulation or a spreadsheet calls it
    for n in (1, 10, 100, 1000):
        Tn = np.linspace(300.0, 2500.0, n) if n > 1 else 812.5
        calls = max(200, 20_000 // n)

        def loop():
            for _ in range(calls):
                mix.cp_h_s0(Tn)
        t = median_time(loop, repeat) / calls * 1e6
        refs, goal = "", "≤ 1.5 µs" if n == 1 else "≤ 10 µs"
        if gas is not None and n == 1:
            gas.TPX = 812.5, ct.one_atm, FLUE

            def ct_loop():
                for _ in range(calls):
                    gas.TP = 812.5, ct.one_atm
                    gas.cp_mass, gas.enthalpy_mass, gas.entropy_mass
            t_ct = median_time(ct_loop, repeat) / calls * 1e6
            refs = f"cantera scalar API {t_ct:.2f} µs ({t / t_ct:.1f}x its time)"
        row(f"cp, h, s° of the flue gas, N = {n} per call", f"{t:.2f} µs/call", refs, goal)
    # the inverse
    for name in ("N2", "air", "CO2", "H2O", "flue gas"):
        sub = mix if name == "flue gas" else tablegen.substance(name)
        Tv = rng.uniform(max(300.0, sub.T_min), min(3000.0, sub.T_max), 1_000_000)
        h = sub.properties(Tv, keys=("h",))["h"]
        t = median_time(lambda: sub.T_from("h", h), max(3, repeat // 2))
        rep = sub.T_from("h", h, report=True)[1]
        passes = getattr(rep, "passes", getattr(rep, "iterations", "?"))
        row(f"inverse `T_from(\"h\")`, 1e6 values, {name}", f"{t:.3f} s ({passes} passes)", "", "≤ 0.15 s, ≤ 3 passes")


# ------------------------------------------------------------------ books
from bench_book import spec_text  # noqa: E402  (the benchmark book of benchmarks/bench_book.py)


def pdf_pages(folder: Path) -> int:
    pdf = next(folder.glob("*.pdf")).read_bytes()
    return len(re.findall(rb"/Type\s*/Page(?![a-zA-Z])", pdf))


def spec_for_pages(d: Path, pages: int) -> Path:
    """A tables-only spec of about ``pages`` pages (rows scaled from a probe build)."""
    p = d / "probe.toml"
    rows = 200
    for _ in range(3):
        p.write_text(spec_text(rows), encoding="utf-8")
        out = d / f"probe-{pages}-{rows}"
        run(["build", str(p), "--out", str(out)])
        got = pdf_pages(out)
        if abs(got - pages) <= max(2, pages // 50):
            break
        front = 4
        rows = max(20, int(rows * (pages - front) / max(1, got - front)))
    q = d / f"book{pages}.toml"
    q.write_text(spec_text(rows), encoding="utf-8")
    return q


def reportlab_floor(pages: int = 20) -> float:
    """ms/page for reportlab to write a page of 50 rows x 11 numbers (the canvas floor)."""
    from reportlab.pdfgen import canvas
    import io

    def book():
        c = canvas.Canvas(io.BytesIO(), invariant=1)
        for _ in range(pages):
            t = c.beginText()
            for r in range(50):
                for k in range(11):
                    t.setTextOrigin(40 + 48 * k, 780 - 14 * r)
                    t.textOut(f"{1234.5678 + r + k:.4f}")
            c.drawText(t)
            c.showPage()
        c.save()
    return median_time(book, 3) / pages * 1e3


def books(repeat: int) -> None:
    floor = reportlab_floor()
    with tempfile.TemporaryDirectory() as d:
        d = Path(d)
        spec = spec_for_pages(d, 100)
        k = [0]

        def build():
            k[0] += 1
            run(["build", str(spec), "--out", str(d / f"b{k[0]}")])
        t = median_time(build, repeat)
        pages = pdf_pages(d / "b1")
        row(f"{pages}-page book, in process (`tablegen build` after warm-up)", f"{t:.2f} s",
            f"reportlab floor {floor:.1f} ms/page = {floor * pages / 1e3:.2f} s ({t / (floor * pages / 1e3):.1f}x)",
            "≤ 0.6 s")
        t_cold = cold(["build", str(spec), "--out", str(d / "cold"), "--quiet", "--force"], max(2, repeat // 2))
        row(f"{pages}-page book, cold `tablegen build`", f"{t_cold:.2f} s", "", "≤ 1.0 s")
        spec5 = spec_for_pages(d, 500)
        # peak resident memory of the child alone: Linux's VmHWM belongs to the address space
        # made at exec, while ru_maxrss keeps the forking parent's peak (this script's, with
        # cantera and matplotlib loaded by the rows above) and overstated it
        code = ("import resource, sys; from tablegen import cli; "
                f"rc = cli.main(['build', {str(spec5)!r}, '--out', {str(d / 'b500')!r}, '--quiet', '--force']); "
                "hwm = [l.split()[1] for l in open('/proc/self/status') if l.startswith('VmHWM:')] "
                "if sys.platform.startswith('linux') else []; "
                "print(hwm[0] if hwm else resource.getrusage(resource.RUSAGE_SELF).ru_maxrss)")
        t0 = time.perf_counter()
        out = subprocess.run([sys.executable, "-c", code], check=True, env=ENV, capture_output=True, text=True)
        t5 = time.perf_counter() - t0
        mb = int(out.stdout.split()[-1]) / 1024
        row(f"{pdf_pages(d / 'b500')}-page book, cold", f"{t5:.2f} s, {mb:.0f} MB peak", "", "≤ 3 s, ≤ 150 MB")


# ------------------------------------------------------------------ QA, charts, listing, data
def qa(repeat: int) -> None:
    keys = (("cp", "kJ/(kg K)", 1e-3), ("cv", "kJ/(kg K)", 1e-3), ("k", "-", 1.0), ("h", "kJ/kg", 1e-3),
            ("u", "kJ/kg", 1e-3), ("s0", "kJ/(kg K)", 1e-3), ("Pr", "-", 1.0), ("vr", "-", 1.0))
    sub = tablegen.substance("air")
    rows = 10_000
    T = np.linspace(250.0, 2500.0, rows)
    p = sub.properties(T)
    rng = np.random.default_rng(2)
    with tempfile.TemporaryDirectory() as d:
        d = Path(d)
        ref = d / "reference.csv"
        lines = ["T [K]," + ",".join(f"{k} [{u}]" for k, u, _ in keys)]
        for i in range(rows):   # 6 digits and a little noise, as a handbook table carries
            vals = (p[k][i] * f * (1 + 2e-6 * rng.standard_normal()) for k, _, f in keys)
            lines.append(f"{T[i]:.4f}," + ",".join(f"{v:.6g}" for v in vals))
        ref.write_text("\n".join(lines) + "\n", encoding="utf-8")
        k = [0]
        for listing in ("auto", "full"):
            def one():
                k[0] += 1
                run(["compare", "air", str(ref), "--out", str(d / f"c{k[0]}"), "--listing", listing])
            t = median_time(one, max(2, repeat // 2))
            what = ("default listing (rows out of tolerance and neighbours)" if listing == "auto"
                    else "`--listing full`")
            row(f"`compare` on a {rows:,}-row x {len(keys) + 1}-column reference, {what}, in process",
                f"{t:.2f} s", "", "≤ 2 s")


def charts(repeat: int) -> None:
    with tempfile.TemporaryDirectory() as d:
        d = Path(d)
        k = [0]

        def chart(fmt):
            def f():
                k[0] += 1
                run(["chart", "air", "--format", fmt, "--out", str(d / f"{fmt}{k[0]}")])
            return f
        t_png = median_time(chart("png"), repeat) / 2      # one T-s and one h-s chart
        t_pdf = median_time(chart("pdf"), repeat) / 2
        row("300 dpi A4 PNG chart (`tablegen chart --format png`, per chart)", f"{t_png:.2f} s",
            f"PDF chart {t_pdf:.2f} s ({t_png / t_pdf:.1f}x)", "≤ 0.35 s")


def listing(repeat: int) -> None:
    t_species = cold(["species"], repeat)
    t_state = cold(["state", "air", "--T", "300K"], repeat)
    t_help = cold(["--help"], repeat)
    row("`tablegen species`, cold", f"{t_species:.2f} s", f"`state` {t_state:.2f} s ({t_species / t_state:.1f}x)",
        "≤ 0.25 s")
    row("`tablegen --help`, cold", f"{t_help:.2f} s", "", "≤ 0.25 s")
    code = ("import importlib, time, numpy as np, tablegen; m = tablegen.mixture(" + repr(FLUE) + "); "
            "T = np.linspace(300, 2000, 50)\n"
            "importlib.import_module('tablegen.calc.uncertainty')\n"
            "t = time.perf_counter(); m.properties(T, uncertainty=True); a = time.perf_counter() - t; "
            "t = time.perf_counter(); m.properties(T, uncertainty=True); b = time.perf_counter() - t; print(a - b)")
    ts = [float(subprocess.run([sys.executable, "-c", code], check=True, env=ENV, capture_output=True,
                               text=True).stdout.split()[-1]) for _ in range(repeat)]
    row("agreement and uncertainty data read by a book's first budget (first call - second, fresh process)",
        f"{statistics.median(ts) * 1e3:.0f} ms", "", "≤ 20 ms")


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeat", type=int, default=5, help="runs per row (median); slow rows use fewer")
    ap.add_argument("--only", choices=("engine", "books", "qa", "charts", "listing"), action="append",
                    help="run only these groups (repeatable)")
    a = ap.parse_args(argv)
    print(f"# tablegen benchmarks, {time.strftime('%Y-%m-%d')}, load average "
          f"{os.getloadavg()[0]:.2f}, median of {a.repeat} runs unless a row says otherwise")
    print("| work | now | reference in the same run | goal |")
    print("| --- | --- | --- | --- |")
    for name, f in (("engine", engine), ("books", books), ("qa", qa), ("charts", charts), ("listing", listing)):
        if not a.only or name in a.only:
            f(a.repeat)
    return 0


if __name__ == "__main__":
    sys.exit(main())
