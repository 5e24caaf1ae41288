"""tablegen chart: T-s and h-s charts of one substance, with process overlays."""

from __future__ import annotations

import re
import shlex
import sys
from pathlib import Path

from ..core.errors import InputError, RangeError, SpecError, TablegenError
from .common import H_DATUM_REFERENCE_HELP, add_datum_options, notice, substance_with_options

EXAMPLE = """example:
  tablegen chart air
  tablegen chart air --kind ts --pressures 1bar,4bar,16bar --volumes 0.2,1,5 --T-range 250K,1400K \\
      --overlay "T=15C P=1.013bar label=GT-2; compress P2=12bar eta=0.86; heat_p T2=1350K; expand P2=1.05bar eta=0.89" \\
      --format both --out output/gt2
  tablegen chart CO2 --units US --T-unit F --paper A3 --format png
  tablegen chart --spec harwick-gt2-charts.toml --force

overlay text: 'T=.. P=.. [label=..]' then ';'-separated steps:
  compress P2=..|ratio=.. eta=..   expand P2=..|ratio=.. eta=..
  heat_p T2=..   heat_v T2=..   throttle P2=..
bare numbers are read in the unit system's units (SI: K, bar, m3/kg; US: °R, psia, ft3/lbm).
harwick-gt2-charts.toml (a chart spec) is in the project's docs/examples/ folder."""

#: command-line option of each chart key (for messages)
OPTION_OF = {"kind": "--kind", "pressures": "--pressures", "volumes": "--volumes",
             "isotherms": "--isotherms", "T_range": "--T-range", "paper": "--paper",
             "units": "--units", "temperature_unit": "--T-unit", "title": "--title"}
SPEC_KEYS = ("substance", "units", "date", "name", "barometer", "charts")


def add_arguments(p):
    p.epilog = EXAMPLE
    p.add_argument("substance", nargs="?", default=None,
                   help="species id or alias, shipped mixture (air), or a composition NAME=x,NAME=y "
                        "(mole fractions; NAME=x%%,... or basis=mass,...) "
                        "(optional with --spec if the spec names it)")
    g = p.add_argument_group("what to draw")
    g.add_argument("--kind", default=None, choices=("ts", "hs", "both"),
                   help="ts: temperature-entropy, hs: enthalpy-entropy, both (default)")
    g.add_argument("--pressures", default=None, metavar="LIST",
                   help="isobars, e.g. 1bar,5bar,20bar (default: 1-2-5 series 0.1-100 bar, or 1-1000 psia)")
    g.add_argument("--volumes", default=None, metavar="LIST",
                   help="lines of constant specific volume, e.g. 0.1m3/kg,1m3/kg (default: none)")
    g.add_argument("--isotherms", default=None, metavar="LIST",
                   help="isotherms on the h-s chart, e.g. 500K,1000K (default: a rounded series)")
    g.add_argument("--T-range", dest="T_range", default=None, metavar="LO,HI",
                   help="temperature range, e.g. 250K,1500K (default 250-2000 K within the data range)")
    g.add_argument("--overlay", action="append", default=None, metavar="TEXT",
                   help="a process path drawn on the chart (repeatable; syntax below)")
    g.add_argument("--title", default=None, help="chart title (default: the substance name)")
    g = p.add_argument_group("units and paper")
    g.add_argument("--units", default=None, metavar="SYSTEM", help="SI (default) or US")
    g.add_argument("--T-unit", dest="T_unit", default=None, metavar="UNIT",
                   help="temperature axis: K or C with SI, R or F with US")
    g.add_argument("--paper", default=None, metavar="SIZE", help="A4 (default) or A3, landscape")
    g.add_argument("--barometer", default=None, metavar="P",
                   help="barometric pressure that gauge pressures (12barg, 150psig) are read against, "
                        "absolute (default 1.01325bar); in a spec file: barometer = \"0.95 bar\"")
    g = p.add_argument_group("files")
    g.add_argument("--spec", default=None, metavar="FILE",
                   help="TOML file with [[charts]] tables (and optional substance, units, date, name)")
    g.add_argument("--format", default="pdf", choices=("pdf", "png", "both"),
                   help="pdf (vector, one page per chart; default), png (300 dpi, one file per chart), both")
    g.add_argument("--dpi", type=int, default=300, help="PNG resolution (72 to 600, default 300)")
    g.add_argument("--out", default="output/charts", metavar="DIR", help="output folder (default output/charts)")
    g.add_argument("--name", default=None, metavar="STEM", help="file name stem (default: the substance id)")
    g.add_argument("--date", default=None, metavar="TEXT",
                   help="document date printed in the footer (fixed text, for reproducible files)")
    g.add_argument("--force", action="store_true", help="replace chart files that already exist")
    add_datum_options(p, default=None, datum_help=H_DATUM_REFERENCE_HELP)   # the rule of the books
    p.set_defaults(extrapolate_option=None)     # charts refuse --extrapolate: never offer it


def parse_overlay_text(text: str, n: int) -> dict:
    """'T=15C P=1bar label=X; compress P2=10bar eta=0.85; ...' -> an overlay table."""
    where = f"--overlay {n + 1}"
    segs = [s.strip() for s in text.split(";")]
    if not segs or not segs[0]:
        raise SpecError(f"{where}: empty; start with the state, e.g. 'T=15C P=1.013bar'")

    def pairs(seg, skip_first):
        try:
            toks = shlex.split(seg)
        except ValueError as e:
            raise SpecError(f"{where}: {seg!r}: {e}") from None
        head = toks[0] if skip_first and toks else None
        out = {}
        for t in toks[1 if skip_first else 0:]:
            if "=" not in t:
                raise SpecError(f"{where}: {t!r} in {seg!r} is not KEY=VALUE")
            k, v = t.split("=", 1)
            try:
                out[k] = float(v) if k in ("eta", "ratio") else v
            except ValueError:
                raise SpecError(f"{where}: {k}={v!r} is not a number") from None
        return head, out

    _, start = pairs(segs[0], False)
    ov = {}
    if "label" in start:
        ov["label"] = start.pop("label")
    ov["start"] = start
    steps = []
    for seg in segs[1:]:
        if not seg:
            continue
        head, kv = pairs(seg, True)
        steps.append({"step": head, **kv})
    ov["steps"] = steps
    return ov


def _cli_message(msg: str) -> str:
    m = re.match(r"^cli\[0\]\.overlays\[(\d+)\](.*?): (.*)$", msg, re.S)
    if m:
        rest = re.sub(r"\.steps\[(\d+)\]", lambda k: f", step {int(k.group(1)) + 1}", m.group(2))
        rest = rest.replace(".start", ", start").replace(".", " ")
        return f"--overlay {int(m.group(1)) + 1}{rest}: {m.group(3)}"
    m = re.match(r"^cli\[0\]\.(\w+)(.*?): (.*)$", msg, re.S)
    if m:
        return f"{OPTION_OF.get(m.group(1), m.group(1))}{m.group(2)}: {m.group(3)}"
    return msg.replace("cli[0]", "options")


def _split(text):
    return [t.strip() for t in text.split(",")]


def charts_from_options(args):
    from ..spec.chart import parse_charts
    from ..core.units import barometer_Pa
    raw = {"kind": args.kind or "both"}
    for key in ("pressures", "volumes", "isotherms"):
        v = getattr(args, key)
        if v is not None:
            raw[key] = _split(v)
    if args.T_range is not None:
        raw["T_range"] = _split(args.T_range)
    for key, dest in (("paper", "paper"), ("units", "units"), ("temperature_unit", "T_unit"),
                      ("title", "title")):
        v = getattr(args, dest)
        if v is not None:
            raw[key] = v
    if args.overlay:
        raw["overlays"] = [parse_overlay_text(t, i) for i, t in enumerate(args.overlay)]
    try:
        return parse_charts([raw], "cli", units="SI", barometer_Pa=barometer_Pa(args.barometer))
    except SpecError as e:
        raise SpecError(_cli_message(str(e))) from None


def load_spec(path: str):
    """A chart spec file -> (substance name or None, unit system, date, name, ChartSpecs)."""

    from ..spec.chart import parse_charts
    from ..spec.book import read_toml
    from ..core.units import barometer_Pa
    p = Path(path)
    raw = read_toml(p, "--spec")
    for k in raw:
        if k not in SPEC_KEYS:
            raise SpecError(f"{p.name}: {k}: unknown key; allowed: {', '.join(SPEC_KEYS)}")
    for k in ("substance", "units", "date", "name", "barometer"):
        if k in raw and not isinstance(raw[k], str):
            raise SpecError(f"{p.name}: {k}: must be a text")
    if "charts" not in raw:
        raise SpecError(f"{p.name}: charts: missing; add at least one [[charts]] table")
    units = raw.get("units", "SI")
    try:
        baro = barometer_Pa(raw.get("barometer"), "barometer")
    except TablegenError as e:
        raise SpecError(f"{p.name}: barometer: {e}") from None
    specs = parse_charts(raw["charts"], f"{p.name}: charts", units=units, barometer_Pa=baro)
    return raw.get("substance"), units.upper(), raw.get("date"), raw.get("name"), specs


def _stem(text: str) -> str:
    s = re.sub(r"[^A-Za-z0-9._+-]+", "_", text).strip("._")
    return s[:60] or "chart"


def run(args) -> int:
    from .common import data_notices
    data_notices(args)
    from ..book.chart_model import build_chart
    from ..book.chart_pdf import chart_pdf
    from ..book.chart_png import PngPages
    from .. import __version__

    if args.extrapolate:
        raise InputError("--extrapolate: charts are drawn inside the data range only; allowed: leave it out")
    if not (72 <= args.dpi <= 600):
        raise RangeError(f"--dpi {args.dpi} is outside the allowed range 72 to 600")
    date = args.date
    name = None
    if args.spec:
        clash = [o for o, v in (("--kind", args.kind), ("--pressures", args.pressures),
                                ("--volumes", args.volumes), ("--isotherms", args.isotherms),
                                ("--T-range", args.T_range), ("--overlay", args.overlay),
                                ("--paper", args.paper), ("--T-unit", args.T_unit),
                                ("--title", args.title), ("--units", args.units),
                                ("--barometer", args.barometer)) if v is not None]
        if clash:
            raise InputError(f"{clash[0]} cannot be combined with --spec; put it in the spec's "
                             f"[[charts]] table instead")
        sub_name, units, spec_date, name, specs = load_spec(args.spec)
        date = date or spec_date
        sub_name = args.substance or sub_name
        if not sub_name:
            raise InputError("no substance: give it on the command line or as substance = \"...\" in the spec")
    else:
        if not args.substance:
            raise InputError("no substance given; e.g. 'tablegen chart air' (or use --spec FILE)")
        sub_name = args.substance
        specs = charts_from_options(args)
    from ..core.texts import bad_character, one_line_rule
    if date is not None and (len(date) > 100 or bad_character(date)):
        raise InputError(f"--date: {one_line_rule()}, at most 100 characters")
    sub = substance_with_options(args, sub_name, by_rule=True, reacting=None)
    footer = f"tablegen {__version__} · " + (sub.name if sub.name == sub.id else f"{sub.name} ({sub.id})")
    try:
        models = [build_chart(sub, sp, units=sp.units, footer=footer) for sp in specs]
    except SpecError as e:
        raise SpecError(_cli_message(str(e))) from None

    stem = _stem(args.name or name or sub.id)
    out = Path(args.out)
    from ..core.filewrite import check_files, write_files
    jobs = {}
    if args.format in ("pdf", "both"):
        jobs[out / f"{stem}-charts.pdf"] = lambda: chart_pdf(models, title=f"{sub.name}: T-s and h-s charts",
                                                            date_text=date or "")
    if args.format in ("png", "both"):
        pages = PngPages()      # one figure for every PNG of the same paper
        seen = {}
        for m in models:
            seen[m.kind] = seen.get(m.kind, 0) + 1
            suffix = "" if sum(1 for x in models if x.kind == m.kind) == 1 else f"-{seen[m.kind]}"
            # drawn one after the other, each encoded on a worker while the next is drawn
            jobs[out / f"{stem}-{m.kind}{suffix}.png"] = lambda m=m: pages.png_soon(m, m.paper, dpi=args.dpi)
    check_files(jobs, args.force)
    try:
        made = {p: make() for p, make in jobs.items()}       # PDF bytes, or a function giving PNG bytes
        made = {p: v() if callable(v) else v for p, v in made.items()}
    finally:
        if args.format in ("png", "both"):
            pages.close()
    written = write_files(made, args.force)
    for p in written:
        sys.stdout.write(f"{p}\n")
    notice(args, f"{len(models)} chart(s) of {sub.id} written to {out}/")
    return 0
