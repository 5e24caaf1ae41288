"""T-s and h-s charts of an ideal gas: chart model and two renderers (the spec: tablegen/spec/chart.py).

The flow is one way, as everywhere in tablegen:

    parse_charts(raw spec)  ->  ChartSpec (frozen, validated once)
    build_chart(substance, spec)  ->  ChartModel (pure data: lines as arrays in
        chart units, inline label positions, ticks, overlay states, panel text)
    draw_chart(canvas, model, ...)  ->  vector page (reportlab)
    chart_png(model, paper)  ->  PNG bytes (matplotlib, Agg)

Only ``build_chart`` (and the overlay end-state function ``end_state``) call the
thermodynamic engine; both renderers lay out finished numbers through one
composer (``_compose``) that draws with a handful of primitives, so the PDF
page and the PNG look the same.

Relations drawn (ideal gas; R the specific gas constant, P° the entropy
reference pressure of the substance):
    s(T, P) = s°(T) - R ln(P/P°)          isobars (T-s and h-s)
    P = R T / v                            lines of constant specific volume
    h = h(T)                               right-hand h scale on T-s; isotherms
                                           are horizontal lines on h-s
"""

from __future__ import annotations

import hashlib
import math
from dataclasses import dataclass, field, replace

import numpy as np

from ..core.errors import RangeError, SpecError, TablegenError
from ..spec.chart import (  # noqa: F401  (the chart spec, kept importable from here)
    CHART_KEYS, DEFAULT_PRESSURES, DEFAULT_T_RANGE_K, KINDS, OVERLAY_KEYS, PAPERS, START_KEYS, STEP_KEYS,
    STEP_KINDS, T_UNITS, UNIT_SYSTEMS, ChartSpec, OverlaySpec, StepSpec, _fail, _system, parse_chart,
    parse_charts)
from ..core.rounding import round_step_up

# --------------------------------------------------------------------------
# overlay end states

@dataclass(frozen=True, slots=True)
class StepEnd:
    T2_K: float
    P2_Pa: float
    T2s_K: float | None    # isentropic end state (compress, expand), else None


def end_state(substance, T1_K: float, P1_Pa: float, step: StepSpec) -> StepEnd:
    """End state of one process step, by the process calculator ``tablegen.calc.steps.process``.

    compress/expand (ideal gas, isentropic relation through the relative
    pressure): Pr(T2s) = Pr(T1) P2/P1; compression h2 = h1 + (h2s - h1)/eta,
    expansion h2 = h1 - eta (h1 - h2s); T2 = T(h2).
    heat_p: P2 = P1.  heat_v: v constant, P2 = P1 T2/T1.
    throttle: h2 = h1, so T2 = T1 for an ideal gas.

    Raises
    ------
    SpecError naming the step's key path when the step breaks a rule or its
    end state leaves the data range.
    """
    from ..calc.steps import process
    params = {}
    if step.kind in ("compress", "expand"):
        params["eta"] = step.eta
        if step.P2_Pa is not None:
            params["P2_Pa"] = step.P2_Pa
        else:
            params["ratio"] = step.ratio
    elif step.kind in ("heat_p", "heat_v"):
        if step.T2_K is not None:
            params["T2_K"] = step.T2_K
        else:
            params["q_J_per_kg"] = step.q_J_per_kg
    else:
        params["P2_Pa"] = step.P2_Pa
    try:
        r = process(substance, np.array([T1_K]), np.array([P1_Pa]), step.kind, **params)
    except TablegenError as e:
        _fail(step.where, str(e))
    T2s = None if r.T2s_K is None else float(np.ravel(r.T2s_K)[0])
    return StepEnd(float(np.ravel(r.T2_K)[0]), float(np.ravel(r.P2_Pa)[0]), T2s)


# --------------------------------------------------------------------------
# model

@dataclass(frozen=True, slots=True)
class Axis:
    label: str
    lo: float
    hi: float
    major: tuple          # tick positions (chart units)
    minor: tuple
    labels: tuple         # text of each major tick


@dataclass(frozen=True, slots=True)
class SideScale:
    """A non-linear scale on the right axis: tick positions in y units."""

    label: str
    major: tuple
    minor: tuple
    labels: tuple


@dataclass(frozen=True, slots=True)
class Label:
    text: str
    x: float              # centre, chart units
    y: float
    du: float             # direction of the line at the label, normalised plot units
    dv: float
    size: float           # pt


@dataclass(frozen=True, slots=True)
class Line:
    family: str           # isobar, isochore, isotherm, process, isentropic, aux
    x: np.ndarray         # chart units
    y: np.ndarray
    style: str            # key of STYLES
    label: Label | None = None
    value_SI: float = math.nan    # P (Pa), v (m³/kg) or T (K) of the line
    T_K: np.ndarray | None = None
    P_Pa: np.ndarray | None = None


@dataclass(frozen=True, slots=True)
class StatePoint:
    name: str             # "1", "2s", "A2", ...
    T_K: float
    P_Pa: float
    h: float              # J/kg
    s: float              # J/(kg K)
    x: float
    y: float
    isentropic: bool
    label: Label | None = None


@dataclass(frozen=True, slots=True)
class Arrow:
    x: float
    y: float
    du: float
    dv: float


@dataclass(frozen=True, slots=True)
class PanelBlock:
    kind: str             # heading, text, key, table
    content: tuple        # text lines; key: (style, text) pairs; table: rows of cells
    size: float = 7.0


@dataclass(frozen=True, slots=True)
class ChartModel:
    kind: str
    paper: str
    units: str
    title: str
    subtitle: str
    x_axis: Axis
    y_axis: Axis
    side: SideScale | None
    lines: tuple
    points: tuple
    arrows: tuple
    panel: tuple
    footer: str
    fingerprint: str
    notes: tuple = ()
    extra: dict = field(default_factory=dict)


#: Line styles: (width pt, dash pattern in pt or None, RGB). Meaning is carried by
#: width and dash (greyscale-safe); the colour only helps on screen.
STYLES = {
    "grid_major": (0.45, None, (0.72, 0.74, 0.76)),
    "grid_minor": (0.2, None, (0.85, 0.86, 0.87)),
    "isobar": (0.7, None, (0.20, 0.36, 0.56)),
    "isobar_decade": (1.2, None, (0.20, 0.36, 0.56)),
    "isochore": (0.65, (4.0, 2.2), (0.16, 0.42, 0.30)),
    "isotherm": (0.65, (6.0, 1.8, 1.2, 1.8), (0.45, 0.28, 0.12)),
    "process": (2.2, None, (0.52, 0.03, 0.03)),
    "isentropic": (1.4, (5.0, 2.5), (0.52, 0.03, 0.03)),
    "aux": (0.9, (1.2, 1.6), (0.52, 0.03, 0.03)),
    "dewpoint": (1.5, (0.9, 1.5), (0.05, 0.38, 0.62)),
    "frame": (0.8, None, (0.0, 0.0, 0.0)),
}
BLACK = (0.0, 0.0, 0.0)
INK = (0.12, 0.12, 0.12)

_SUP = {"2": "²", "3": "³"}


@dataclass(frozen=True, slots=True)
class Layout:
    """Rectangles of a chart page, points, origin bottom left: (x, y, w, h)."""

    page: tuple
    title: tuple
    plot: tuple
    panel: tuple
    footer: tuple
    scale: float          # font scale
    columns: int = 1      # columns of the reading panel
    title_lines: tuple = ()      # the title and subtitle wrapped to the band: ((text, size, font), ...)


#: Smallest text size of the design at font scale 1 (the reading panel's notes), pt.
SMALLEST_PT = 6.0


def _title_lines(title: str, subtitle: str, s: float, width: float) -> tuple:
    """Title and subtitle wrapped to the title band (the subtitle breaks at its ' · ')."""
    m = _Measure()
    out = [(line, 14.5 * s, "bold") for line in _wrap(m, title, 14.5 * s, width, "bold")] if title else []
    cur = ""
    for piece in subtitle.split(" · ") if subtitle else []:
        t = piece if not cur else cur + " · " + piece
        if cur and m.width(t, 8.2 * s) > width:
            out.append((cur, 8.2 * s, "sans"))
            cur = piece
        else:
            cur = t
    if cur:
        out.extend((line, 8.2 * s, "sans") for line in _wrap(m, cur, 8.2 * s, width))
    return tuple(out)


def _line_step(lines, i: int, s: float) -> float:
    """Baseline distance from title-band line i - 1 to line i (3.2 s more where the subtitle starts)."""
    return lines[i][1] * 1.2 + (3.2 * s if lines[i][2] != lines[i - 1][2] else 0.0)


def layout(width: float, height: float, *, panel_page: bool = False, min_pt: float | None = None,
           title: str = "", subtitle: str = "") -> Layout:
    """Our page design: title band on top, plot at left, reading panel at right.

    A portrait box (width < 1.15 height) puts the reading panel under the plot,
    in two columns. ``panel_page``: the plot fills the box and the reading panel
    goes on a page of its own (:func:`panel_layout`), for small paper. ``min_pt``:
    the smallest text size allowed (the font scale grows to keep every text at or
    above it). The title and subtitle, when given, are wrapped to the band.
    """
    s = max(0.8, min(1.45, math.sqrt(max(width, height) / PAPERS["A4"][0])))
    if min_pt:
        s = max(s, min_pt / SMALLEST_PT)
    m = 26.0 * s if width > 500 else 12.0 * s
    lines = _title_lines(title, subtitle, s, width - 2 * m)
    title_h = 34.0 * s if len(lines) <= 2 else 21.0 * s + sum(_line_step(lines, i, s) for i in range(1, len(lines)))
    foot_h = 14.0 * s
    left = 44.0 * s       # y tick labels and axis title
    right = 48.0 * s      # secondary scale
    bottom = 34.0 * s     # x tick labels and axis title
    px = m + left
    portrait = width < 1.15 * height
    if panel_page:
        panel = (m, m + foot_h, 0.0, 0.0)
        py = m + foot_h + bottom
        pw = width - 2 * m - left - right
        ph = height - 2 * m - title_h - foot_h - bottom - 6.0 * s
        cols = 1
    elif portrait:
        panel_h = 0.36 * (height - 2 * m - title_h - foot_h)
        panel = (m, m + foot_h, width - 2 * m, panel_h)
        py = m + foot_h + panel_h + bottom + 6.0 * s
        pw = width - 2 * m - left - right
        ph = height - m - title_h - 6.0 * s - py
        cols = 2
    else:
        panel_w = 190.0 * s
        panel = (width - m - panel_w, m + foot_h, panel_w, height - 2 * m - title_h - foot_h)
        py = m + foot_h + bottom
        pw = width - 2 * m - left - right - panel_w - 10.0 * s
        ph = height - 2 * m - title_h - foot_h - bottom - 6.0 * s
        cols = 1
    if pw < 150 or ph < 150:
        raise TablegenError(f"a chart box of {width:.0f} x {height:.0f} pt is too small; "
                            f"allowed: at least about {PAPERS['A4'][0] / 1.414:.0f} x {PAPERS['A4'][1] / 1.414:.0f} pt "
                            f"(landscape A5)")
    return Layout(page=(0.0, 0.0, width, height),
                  title=(m, height - m - title_h, width - 2 * m, title_h),
                  plot=(px, py, pw, ph), panel=panel,
                  footer=(m, m, width - 2 * m, foot_h), scale=s, columns=cols, title_lines=lines)


def panel_layout(width: float, height: float, *, min_pt: float | None = None, title: str = "",
                 subtitle: str = "") -> Layout:
    """The page of a chart's reading panel on its own (small paper): the title band, then
    the panel in two columns over the rest of the box."""
    lay = layout(width, height, panel_page=True, min_pt=min_pt, title=title, subtitle=subtitle)
    m, s = lay.title[0], lay.scale
    top = lay.title[1]
    panel = (m, m + lay.footer[3], width - 2 * m, top - 6.0 * s - m - lay.footer[3])
    return replace(lay, panel=panel, columns=2 if width > 300 else 1)


def nice_ticks(lo: float, hi: float, target: float):
    """Major step, minor step and digits for about ``target`` intervals on [lo, hi]."""
    span = hi - lo
    raw = span / max(target, 1.0)
    m, mag = round_step_up(raw, lambda step: span / step <= target * 1.15)
    step = m * mag
    minor = step / (4 if m == 2 else 5)
    digits = max(0, -int(math.floor(math.log10(step) + 1e-9)))
    if m == 2.5:
        digits = max(0, -int(math.floor(math.log10(minor) + 1e-9)))
    return step, minor, digits


def _fmt(v: float, digits: int) -> str:
    t = f"{v:.{digits}f}"
    if t.startswith("-"):
        t = "−" + t[1:]
        if float(t[1:]) == 0:
            t = t[1:]
    return t


def _axis(label: str, lo: float, hi: float, target: float) -> Axis:
    step, minor, digits = nice_ticks(lo, hi, target)
    lo_r = math.floor(lo / minor + 1e-9) * minor
    hi_r = math.ceil(hi / minor - 1e-9) * minor
    k0, k1 = math.ceil(lo_r / step - 1e-9), math.floor(hi_r / step + 1e-9)
    major = tuple(round(k * step, 12) for k in range(k0, k1 + 1))
    j0, j1 = math.ceil(lo_r / minor - 1e-9), math.floor(hi_r / minor + 1e-9)
    minor_t = tuple(round(j * minor, 12) for j in range(j0, j1 + 1)
                    if abs(j * minor / step - round(j * minor / step)) > 1e-6)
    return Axis(label, lo_r, hi_r, major, minor_t, tuple(_fmt(v, digits) for v in major))


def _fmt_value(v: float) -> str:
    """Line values as people write them: 0.1, 2, 50, 1000."""
    if v >= 100:
        return f"{v:.0f}"
    return f"{v:.3g}"


def _fingerprint(substance, spec: ChartSpec, T_range) -> str:
    h = hashlib.sha256()
    h.update(repr((substance.id, substance.M, substance.datum, substance.P_ref_Pa, substance.anchor,
                   spec, T_range)).encode())
    h.update(np.ascontiguousarray(substance.poly.coeffs, dtype=float).tobytes())
    h.update(np.ascontiguousarray(substance.poly.T_bounds, dtype=float).tobytes())
    return h.hexdigest()[:12]


class _Conv:
    """SI -> chart units for one unit system."""

    def __init__(self, system: str, T_unit: str):
        from ..core.units import unit
        u = UNIT_SYSTEMS[system]
        self.sym = dict(u, T=T_unit)
        self.T = unit(T_unit, "temperature")
        self.s = unit(u["s"], "specific_entropy")
        self.h = unit(u["h"], "specific_energy")
        self.P = unit(u["P"], "pressure")
        self.v = unit(u["v"], "specific_volume")


def build_chart(substance, spec: ChartSpec, *, T_range_K=None, units: str | None = None,
                footer: str = "", box_pt=None, panel_page: bool = False,
                min_pt: float | None = None) -> ChartModel:
    """The finished chart as data: every line sampled, every label placed.

    Parameters
    ----------
    substance : Substance (datum, P° and anchor as the table uses them)
    spec : ChartSpec from :func:`parse_charts`
    T_range_K : (lo, hi) of the table's grid, K; the spec's own T_range wins;
        without either the default 250-2000 K clipped to the data range is used.
        The range is widened to show every overlay state.
    units : "SI" or "US"; default the spec's
    footer : document line printed at the bottom (the writer adds page numbers)
    box_pt : (width, height) of the box ``draw_chart`` will fill, points; labels
        are placed for it. Default: the spec's paper, landscape.
    panel_page : the reading panel on a page of its own (small paper): the plot
        fills the box; draw the two pages with ``part="plot"`` and ``part="panel"``
    min_pt : smallest text size, pt (the font scale grows to keep to it)

    Raises
    ------
    SpecError (naming the spec key) for an overlay that leaves the data range
    or breaks a step rule; RangeError for a chart range outside the data.
    """
    system = _system(units or spec.units, "units")
    T_unit = spec.T_unit if spec.T_unit in T_UNITS[system] else T_UNITS[system][0]
    cv = _Conv(system, T_unit)
    kind_name = "Temperature-entropy (T-s) chart" if spec.kind == "ts" else "Enthalpy-entropy (h-s) chart"
    title = spec.title or (substance.name if substance.name == substance.id
                           else f"{substance.name} ({substance.id})")
    subtitle = (f"{kind_name} · ideal gas · M = {substance.M:.4f} kg/kmol · "
                f"R = {cv.s.from_si(substance.R):.5f} {cv.sym['s']} · s° at P° = "
                f"{cv.P.from_si(substance.P_ref_Pa):.6g} {cv.sym['P']}")
    box = box_pt or PAPERS[spec.paper]
    lay = layout(*box, panel_page=panel_page, min_pt=min_pt, title=title, subtitle=subtitle)
    fs = lay.scale

    # ---- temperature range
    lo_d, hi_d = substance.T_min, substance.T_max
    notes = []
    if spec.T_range_K is not None:
        lo, hi = spec.T_range_K
    elif T_range_K is not None:
        lo, hi = float(min(T_range_K)), float(max(T_range_K))
    else:
        lo, hi = max(DEFAULT_T_RANGE_K[0], lo_d), min(DEFAULT_T_RANGE_K[1], hi_d)
    if hi <= lo_d or lo >= hi_d:
        raise RangeError(f"{substance.id}: chart range {lo:g}-{hi:g} K lies outside the data range "
                         f"{lo_d:g}-{hi_d:g} K; allowed: a range inside {lo_d:g}-{hi_d:g} K")
    if lo < lo_d or hi > hi_d:
        notes.append(f"Lines end at the data range {lo_d:g}-{hi_d:g} K; no extrapolation is drawn.")
        lo, hi = max(lo, lo_d), min(hi, hi_d)

    # ---- overlay states (the engine's process calculation)
    ov_states = []    # per overlay: list of (name, T, P, isentropic, step index)
    ov_steps = []
    for n, ov in enumerate(spec.overlays):
        prefix = chr(ord("A") + n) if len(spec.overlays) > 1 else ""
        for key, T in (("start.T", ov.T1_K),):
            if not (lo_d <= T <= hi_d):
                _fail(f"{ov.where}.{key}", f"{T:g} K is outside the data range {lo_d:g}-{hi_d:g} K "
                      f"of {substance.id}")
        states = [(f"{prefix}1", ov.T1_K, ov.P1_Pa, False)]
        steps = []
        T1, P1 = ov.T1_K, ov.P1_Pa
        for i, st in enumerate(ov.steps):
            if st.T2_K is not None and not (lo_d <= st.T2_K <= hi_d):
                _fail(f"{st.where}.T2", f"{st.T2_K:g} K is outside the data range {lo_d:g}-{hi_d:g} K "
                      f"of {substance.id}")
            try:
                e = end_state(substance, T1, P1, st)
            except SpecError:
                raise
            except TablegenError as err:
                _fail(st.where, f"end state outside the data of {substance.id}: {err}")
            k = len(states)
            name = f"{prefix}{k + 1 - sum(1 for s in states if s[3])}"
            if e.T2s_K is not None:
                states.append((name + "s", e.T2s_K, e.P2_Pa, True))
            states.append((name, e.T2_K, e.P2_Pa, False))
            steps.append((st, (T1, P1), e))
            T1, P1 = e.T2_K, e.P2_Pa
        ov_states.append(states)
        ov_steps.append(steps)
    all_T = [s[1] for st in ov_states for s in st]
    all_P = [s[2] for st in ov_states for s in st]
    if all_T:
        span = hi - lo
        lo = max(lo_d, min(lo, min(all_T) - 0.03 * span))
        hi = min(hi_d, max(hi, max(all_T) + 0.03 * span))

    # ---- pressures
    if spec.pressures_Pa is not None:
        pressures = list(spec.pressures_Pa)
    else:
        base = [cv.P.to_si(p) for p in DEFAULT_PRESSURES[system]]
        if all_P:
            pmin, pmax = min(all_P), max(all_P)
            while base[0] > pmin * 1.0001:
                base = [b / 10 for b in base[:3]] + base
            while base[-1] < pmax / 1.0001:
                base = base + [b * 10 for b in base[-3:]]
        pressures = sorted(set(round(p, 6) for p in base))
    decade = {p for p in pressures if abs(math.log10(cv.P.from_si(p)) - round(math.log10(cv.P.from_si(p)))) < 1e-9}
    if len(decade) < 2 or len(decade) == len(pressures):
        decade = set()

    # ---- y axis first; the lines then fill it out to its rounded ends (inside the data)
    plot = lay.plot
    if spec.kind == "ts":
        y_axis = _axis(f"temperature T  [{cv.sym['T']}]", cv.T.from_si(lo), cv.T.from_si(hi), plot[3] / 40.0)
        lo = max(lo_d, cv.T.to_si(y_axis.lo))
        hi = min(hi_d, cv.T.to_si(y_axis.hi))
    else:
        hb = substance.properties(np.array([lo, hi]))["h"]
        y_axis = _axis(f"specific enthalpy h  [{cv.sym['h']}]", cv.h.from_si(float(hb[0])),
                       cv.h.from_si(float(hb[1])), plot[3] / 50.0)
        h_ends = substance.properties(np.array([lo_d, hi_d]))["h"]
        ya = max(cv.h.to_si(y_axis.lo), float(h_ends[0]))
        yb = min(cv.h.to_si(y_axis.hi), float(h_ends[1]))
        lo, hi = (float(t) for t in substance.T_from("h", np.array([ya, yb])))
    T = np.unique(np.concatenate([np.geomspace(lo, hi, 240), [lo, hi]]))
    props = substance.properties(T)
    s0 = props["s0"]
    hT = props["h"]
    R = substance.R
    yconv = (lambda TK, hJ: cv.T.from_si(TK)) if spec.kind == "ts" else (lambda TK, hJ: cv.h.from_si(hJ))

    lines = []
    for P in pressures:
        s = s0 - R * np.log(P / substance.P_ref_Pa)
        lines.append(Line("isobar", cv.s.from_si(s), yconv(T, hT),
                          "isobar_decade" if P in decade else "isobar",
                          value_SI=P, T_K=T, P_Pa=np.full_like(T, P)))
    for v in spec.volumes_m3_per_kg:
        P = R * T / v
        s = s0 - R * np.log(P / substance.P_ref_Pa)
        lines.append(Line("isochore", cv.s.from_si(s), yconv(T, hT), "isochore", value_SI=v, T_K=T, P_Pa=P))

    # ---- x range from the drawn lines and the overlay states
    xs = [ln.x for ln in lines]
    ov_s = [float(substance.properties(np.array([t]), p)["s"][0]) for t, p in zip(all_T, all_P)]
    x_lo = min(float(a.min()) for a in xs)
    x_hi = max(float(a.max()) for a in xs)
    if ov_s:
        x_lo = min(x_lo, cv.s.from_si(min(ov_s)))
        x_hi = max(x_hi, cv.s.from_si(max(ov_s)))
    pad = 0.015 * (x_hi - x_lo)
    x_axis = _axis(f"specific entropy s  [{cv.sym['s']}]", x_lo - pad, x_hi + pad, plot[2] / 52.0)

    # ---- isotherms on h-s: horizontal lines across the isobar fan
    if spec.kind == "hs":
        if spec.isotherms_K is not None:
            iso = [t for t in spec.isotherms_K if lo <= t <= hi]
        else:
            t_lo, t_hi = cv.T.from_si(lo), cv.T.from_si(hi)
            st, _, _ = nice_ticks(t_lo, t_hi, 7)
            iso = [cv.T.to_si(k * st) for k in range(math.ceil(t_lo / st), math.floor(t_hi / st) + 1)]
            iso = [t for t in iso if lo + 0.02 * (hi - lo) <= t <= hi - 0.02 * (hi - lo)]
        if iso:
            pi = substance.properties(np.array(iso))
            p_hi, p_lo = max(pressures), min(pressures)
            for t, s0t, ht in zip(iso, pi["s0"], pi["h"]):
                pa, pb = p_hi, p_lo
                if p_hi < 1.5 * p_lo:       # a single isobar: isotherms span the chart
                    pa = float(substance.P_ref_Pa * math.exp((s0t - cv.s.to_si(x_axis.lo)) / R))
                    pb = float(substance.P_ref_Pa * math.exp((s0t - cv.s.to_si(x_axis.hi)) / R))
                P_line = np.geomspace(pa, pb, 24)
                xx = cv.s.from_si(s0t - R * np.log(P_line / substance.P_ref_Pa))
                lines.append(Line("isotherm", xx, np.full(xx.shape, cv.h.from_si(ht)), "isotherm",
                                  value_SI=float(t), T_K=np.full(xx.shape, t), P_Pa=P_line))

    # ---- the gas's water dew point (its one figure, at its stated pressure), a labelled line
    dew = getattr(substance, "dew_point_K", None)
    if dew is not None and lo <= dew <= hi:
        y_dew = cv.T.from_si(dew) if spec.kind == "ts" else \
            cv.h.from_si(float(substance.properties(np.array([dew]))["h"][0]))
        xx = np.linspace(x_axis.lo, x_axis.hi, 24)
        lines.append(Line("dewpoint", xx, np.full(xx.shape, float(y_dew)), "dewpoint", value_SI=float(dew),
                          T_K=np.full(xx.shape, dew), P_Pa=np.full(xx.shape, substance.dew_point_P_Pa)))

    # ---- right-hand scale: h on T-s, T on h-s (ideal gas: h is a function of T)
    side = None
    if spec.kind == "ts":
        hh_lo = cv.h.from_si(float(substance.properties(np.array([max(lo_d, cv.T.to_si(y_axis.lo))]))["h"][0]))
        hh_hi = cv.h.from_si(float(substance.properties(np.array([min(hi_d, cv.T.to_si(y_axis.hi))]))["h"][0]))
        step, minor, digits = nice_ticks(hh_lo, hh_hi, plot[3] / 50.0)
        maj = [k * step for k in range(math.ceil(hh_lo / step - 1e-9), math.floor(hh_hi / step + 1e-9) + 1)]
        mnr = [k * minor for k in range(math.ceil(hh_lo / minor - 1e-9), math.floor(hh_hi / minor + 1e-9) + 1)]
        mnr = [v for v in mnr if abs(v / step - round(v / step)) > 1e-6]
        pos = lambda vals: tuple(float(cv.T.from_si(t)) for t in
                                 substance.T_from("h", np.array([cv.h.to_si(v) for v in vals]))) if vals else ()
        side = SideScale(f"specific enthalpy h  [{cv.sym['h']}]", pos(maj), pos(mnr),
                         tuple(_fmt(v, digits) for v in maj))
    else:
        t_lo = cv.T.from_si(max(lo_d, float(substance.T_from("h", np.array([cv.h.to_si(y_axis.lo)]))[0])
                                if cv.h.to_si(y_axis.lo) >= float(hT[0]) else lo))
        t_hi = cv.T.from_si(min(hi_d, float(substance.T_from("h", np.array([cv.h.to_si(y_axis.hi)]))[0])
                                if cv.h.to_si(y_axis.hi) <= float(hT[-1]) else hi))
        step, minor, digits = nice_ticks(t_lo, t_hi, plot[3] / 50.0)
        maj = [k * step for k in range(math.ceil(t_lo / step - 1e-9), math.floor(t_hi / step + 1e-9) + 1)]
        mnr = [k * minor for k in range(math.ceil(t_lo / minor - 1e-9), math.floor(t_hi / minor + 1e-9) + 1)]
        mnr = [v for v in mnr if abs(v / step - round(v / step)) > 1e-6]
        pos = lambda vals: tuple(float(cv.h.from_si(x)) for x in
                                 substance.properties(np.array([cv.T.to_si(v) for v in vals]))["h"]) if vals else ()
        side = SideScale(f"temperature T  [{cv.sym['T']}]", pos(maj), pos(mnr), tuple(_fmt(v, digits) for v in maj))

    # ---- overlay geometry
    ov_lines, points, arrows = [], [], []
    for states, steps in zip(ov_states, ov_steps):
        pts = {}
        for name, t, p, isen in states:
            pp = substance.properties(np.array([t]), p)
            h, s = float(pp["h"][0]), float(pp["s"][0])
            pts[name] = StatePoint(name, t, p, h, s, float(cv.s.from_si(s)), float(yconv(t, h)), isen)
        order = [s[0] for s in states]
        actual = [s[0] for s in states if not s[3]]
        for (st, (T1, P1), e), (a, b) in zip(steps, zip(actual[:-1], actual[1:])):
            A, B = pts[a], pts[b]
            tt = np.linspace(T1, e.T2_K, 48)
            if st.kind == "heat_p":
                pr = substance.properties(tt, P1)
                x, y = cv.s.from_si(pr["s"]), yconv(tt, pr["h"])
            elif st.kind == "heat_v":
                pr = substance.properties(tt, P1 * tt / T1)
                x, y = cv.s.from_si(pr["s"]), yconv(tt, pr["h"])
            else:
                # irreversible steps: the path between the end states is not a state
                # path; common practice draws a straight line between them.
                x, y = np.array([A.x, B.x]), np.array([A.y, B.y])
            ov_lines.append(Line("process", np.asarray(x, float), np.asarray(y, float), "process",
                                 T_K=tt if st.kind in ("heat_p", "heat_v") else np.array([T1, e.T2_K])))
            if e.T2s_K is not None:
                S = pts[b + "s"]
                ov_lines.append(Line("isentropic", np.array([A.x, S.x]), np.array([A.y, S.y]), "isentropic",
                                     T_K=np.array([T1, e.T2s_K])))
                tt2 = np.linspace(e.T2s_K, e.T2_K, 24)
                pr = substance.properties(tt2, e.P2_Pa)
                ov_lines.append(Line("aux", cv.s.from_si(pr["s"]), yconv(tt2, pr["h"]), "aux",
                                     value_SI=e.P2_Pa, T_K=tt2, P_Pa=np.full_like(tt2, e.P2_Pa)))
            arrows.append((A, B, x, y))
        points.extend(pts[n] for n in order)

    all_lines = lines + ov_lines
    placer = _Placer(lay.plot, x_axis, y_axis)
    for ln in ov_lines:
        placer.block_line(ln.x, ln.y)
    for p in points:
        placer.block_point(p.x, p.y, 3.2 * fs)
    arrow_objs = []
    for A, B, x, y in arrows:
        u, v = placer.norm(np.asarray(x), np.asarray(y))
        d = np.hypot(np.diff(u) * placer.W, np.diff(v) * placer.H)
        cum = np.concatenate([[0], np.cumsum(d)])
        if cum[-1] < 1e-9:
            continue
        j = int(np.searchsorted(cum, cum[-1] * 0.55))
        j = min(max(j, 1), len(u) - 1)
        f = (cum[-1] * 0.55 - cum[j - 1]) / max(cum[j] - cum[j - 1], 1e-12)
        xm = x[j - 1] + f * (x[j] - x[j - 1])
        ym = y[j - 1] + f * (y[j] - y[j - 1])
        arrow_objs.append(Arrow(float(xm), float(ym), float(u[j] - u[j - 1]), float(v[j] - v[j - 1])))

    # point labels first (they matter most), then line labels
    placed_points = []
    for p in points:
        lab = placer.place_point(p.name, p.x, p.y, (8.2 if not p.isentropic else 7.4) * fs)
        placed_points.append(StatePoint(p.name, p.T_K, p.P_Pa, p.h, p.s, p.x, p.y, p.isentropic, lab))

    labelled = []
    size = 7.0 * fs
    Psym = cv.sym["P"]
    for idx, ln in enumerate(all_lines):
        if ln.family == "isobar":
            text = f"{_fmt_value(cv.P.from_si(ln.value_SI))} {Psym}"
            lab = placer.place_on_line(text, ln.x, ln.y, size * (1.08 if ln.style == "isobar_decade" else 1.0),
                                       targets=_stagger(idx, (0.90, 0.80, 0.70, 0.60, 0.50, 0.40)))
        elif ln.family == "isochore":
            text = f"{_fmt_value(cv.v.from_si(ln.value_SI))} {cv.sym['v']}"
            lab = placer.place_on_line(text, ln.x, ln.y, size,
                                       targets=_stagger(idx, (0.22, 0.32, 0.14, 0.42, 0.52)))
        elif ln.family == "isotherm":
            text = f"{_fmt_value(cv.T.from_si(ln.value_SI))} {cv.sym['T']}"
            lab = placer.place_on_line(text, ln.x, ln.y, size, along_x=True,
                                       targets=(0.90, 0.80, 0.70, 0.60, 0.50, 0.30, 0.15))
        elif ln.family == "dewpoint":
            dew_T = f"{cv.T.from_si(ln.value_SI):.1f} {cv.sym['T']}"
            # the longest wording that fits the plot (a small page's plot is narrower than the first)
            for text in (f"water dew point {dew_T} at {cv.P.from_si(substance.dew_point_P_Pa):.4g} {Psym}: "
                         f"condensation below", f"water dew point {dew_T}: condensation below",
                         f"water dew point {dew_T}"):
                if placer._width(text, size * 1.05) + 2.4 <= 0.9 * placer.W:
                    break
            lab = placer.place_on_line(text, ln.x, ln.y, size * 1.05, along_x=True,
                                       targets=(0.70, 0.55, 0.85, 0.40, 0.25))
        else:
            lab = None
        labelled.append(Line(ln.family, ln.x, ln.y, ln.style, lab, ln.value_SI, ln.T_K, ln.P_Pa))

    # ---- panel
    used = {ln.style for ln in labelled}
    if hi > 2200.0:
        notes.append("Fixed composition: dissociation, which sets in above about 2000 K (common "
                     "practice), is not included.")
    panel = _panel(substance, spec, cv, ov_states, ov_steps, placed_points, system, notes, fs, used)
    if not panel_fits(panel, panel_layout(*box, min_pt=min_pt, title=title, subtitle=subtitle)
                      if panel_page else lay, min_pt):
        _fail(f"{spec.where}.overlays", f"{len(spec.overlays)} overlays with "
              f"{sum(len(o.steps) for o in spec.overlays)} steps do not fit the reading panel of "
              f"{'this box' if box_pt else 'an ' + spec.paper + ' page'} in legible type; allowed: fewer "
              f"overlays or steps, or paper = \"A3\"")
    return ChartModel(kind=spec.kind, paper=spec.paper, units=system, title=title, subtitle=subtitle,
                      x_axis=x_axis, y_axis=y_axis, side=side, lines=tuple(labelled),
                      points=tuple(placed_points), arrows=tuple(arrow_objs), panel=panel,
                      footer=footer, fingerprint=_fingerprint(substance, spec, (lo, hi)),
                      notes=tuple(notes), extra={"T_range_K": (lo, hi), "panel_page": bool(panel_page),
                                                 "min_pt": min_pt})


def _stagger(i: int, targets: tuple) -> tuple:
    """Neighbouring lines start their label search at alternating heights."""
    k = (i % 2) * 1
    return targets[k:] + targets[:k]


def _panel(substance, spec, cv, ov_states, ov_steps, points, system, notes, fs, used) -> tuple:
    blocks = [PanelBlock("heading", ("How to read",), 8.0 * fs)]
    key = [k for k in (("isobar_decade", "isobar, P = const (decade value)"), ("isobar", "isobar, P = const"))
           if k[0] in used]
    if spec.volumes_m3_per_kg:
        key.append(("isochore", "specific volume v = const"))
    if spec.kind == "hs":
        key.append(("isotherm", "isotherm, T = const (h = const)"))
    if "dewpoint" in used:
        key.append(("dewpoint", "water dew point (water condenses below)"))
    if spec.overlays:
        key.append(("process", "process, actual path"))
        if "isentropic" in used:
            key += [("isentropic", "isentropic path (η = 1)"), ("aux", "end isobar, 2s to 2")]
        key.append(("point", "state point"))
        if "isentropic" in used:
            key.append(("point_open", "isentropic end state 2s"))
    blocks.append(PanelBlock("key", tuple(key), 6.6 * fs))
    side = "right scale: h from T (ideal gas)" if spec.kind == "ts" else "right scale: T from h (ideal gas)"
    blocks.append(PanelBlock("text", (
        "s(T, P) = s°(T) − R ln(P/P°);  v = RT/P.", side + ".",
        f"Enthalpy datum: {substance.datum.describe()}."), 6.2 * fs))
    sym = cv.sym
    byname = {p.name: p for p in points}
    for ov, states, steps in zip(spec.overlays, ov_states, ov_steps):
        blocks.append(PanelBlock("heading", (ov.label,), 7.6 * fs))
        rows = [("state", f"T [{sym['T']}]", f"P [{sym['P']}]", f"h [{sym['h']}]", f"s [{sym['s']}]")]
        for name, *_ in states:
            p = byname[name]
            rows.append((name, f"{cv.T.from_si(p.T_K):.1f}", f"{cv.P.from_si(p.P_Pa):.4g}",
                         _fmt(cv.h.from_si(p.h), 1), _fmt(cv.s.from_si(p.s), 4)))
        blocks.append(PanelBlock("table", tuple(rows), 6.2 * fs))
        text = []
        actual = [s[0] for s in states if not s[3]]
        for (st, (T1, P1), e), (a, b) in zip(steps, zip(actual[:-1], actual[1:])):
            A, B = byname[a], byname[b]
            dh = cv.h.from_si(B.h - A.h)
            if st.kind == "compress":
                text.append(f"{a}→{b} compression, η = {st.eta:g}: w in = {_fmt(dh, 1)} {sym['h']}")
            elif st.kind == "expand":
                text.append(f"{a}→{b} expansion, η = {st.eta:g}: w out = {_fmt(-dh, 1)} {sym['h']}")
            elif st.kind == "heat_p":
                text.append(f"{a}→{b} {'heating' if B.T_K >= A.T_K else 'cooling'} at P = const: "
                            f"q = {_fmt(dh, 1)} {sym['h']}")
            elif st.kind == "heat_v":
                du = dh - cv.h.from_si(substance.R * (B.T_K - A.T_K))
                text.append(f"{a}→{b} {'heating' if B.T_K >= A.T_K else 'cooling'} at v = const: "
                            f"q = {_fmt(du, 1)} {sym['h']}")
            else:
                text.append(f"{a}→{b} throttling, h = const: Δs = {_fmt(cv.s.from_si(B.s - A.s), 4)} {sym['s']}")
        if text:
            blocks.append(PanelBlock("text", tuple(text), 6.2 * fs))
    srcs = []
    for sid, ds, cit in substance.sources:
        if ds not in srcs:
            srcs.append(ds)
    cits = {ds: cit for _, ds, cit in substance.sources}
    blocks.append(PanelBlock("heading", ("Data and cautions",), 7.6 * fs))
    text = [f"Coefficients: {', '.join(srcs)} ({'; '.join(dict.fromkeys(c.split(' [')[0] for c in cits.values()))})."]
    if substance.kind == "mixture" and len(substance.components) > 1:
        comp = ", ".join(f"{c.id} {c.mole_fraction:.4g}" for c in substance.components)
        text.append(f"Composition, mole fractions: {comp}; s° includes the ideal mixing term.")
    text += list(notes)
    ids = {c.id for c in substance.components} | {substance.id}
    sulfur = "SO2" in ids or any("sulfur" in c for c in getattr(substance, "cautions", ()))
    if getattr(substance, "dew_point_P_Pa", None) is not None:
        from ..thermo.saturation import dew_point_text
        text.append(f"Water dew point {dew_point_text(substance.dew_point_K, substance.dew_point_P_Pa)}"
                    f" (IAPWS-IF97): below it water condenses and the lines do not describe the gas"
                    + ("; condensing acid attacks metal surfaces." if sulfur else "."))
    elif "H2O" in ids and substance.kind == "mixture":
        text.append("Contains water vapour: below its dew point water condenses; lines there do not "
                    "describe the gas.")
    if getattr(substance, "cautions", ()):
        # combustion products: the cautions that travel with the gas, in short
        text.append("Combustion products (frozen complete combustion, no dissociation): flue gas is "
                    "toxic and asphyxiant" + ("; the acid dew point of this sulfur-bearing flue gas lies well "
                                              "above the water dew point and is not computed." if sulfur else "."))
    text.append("Ideal-gas model: not valid near saturation or at high pressure, where real-gas "
                "effects matter; for design, check against real-gas data and follow local codes "
                "and licensed engineering practice.")
    blocks.append(PanelBlock("text", tuple(text), 6.0 * fs))
    return tuple(blocks)


# --------------------------------------------------------------------------
# label placement (in the plot rectangle of the model's paper, points)

class _Placer:
    def __init__(self, plot, xa: Axis, ya: Axis):
        self.W, self.H = plot[2], plot[3]
        self.xa, self.ya = xa, ya
        self.boxes = []      # oriented rectangles: (cx, cy, ux, uy, hw, hh) in pt
        self.segs = []       # blocked points (x, y, r) in pt
        self._seg_arr = None

    def norm(self, x, y):
        return ((np.asarray(x, float) - self.xa.lo) / (self.xa.hi - self.xa.lo),
                (np.asarray(y, float) - self.ya.lo) / (self.ya.hi - self.ya.lo))

    def block_line(self, x, y):
        u, v = self.norm(x, y)
        px, py = u * self.W, v * self.H
        # sample every ~3 pt
        for i in range(len(px) - 1):
            n = max(1, int(math.hypot(px[i + 1] - px[i], py[i + 1] - py[i]) / 3.0))
            for t in np.linspace(0, 1, n + 1):
                self.segs.append((px[i] + t * (px[i + 1] - px[i]), py[i] + t * (py[i + 1] - py[i]), 1.5))

    def block_point(self, x, y, r):
        u, v = self.norm([x], [y])
        self.segs.append((float(u[0]) * self.W, float(v[0]) * self.H, r))

    @staticmethod
    def _width(text, size):
        from reportlab.pdfbase.pdfmetrics import stringWidth

        from .fonts import SANS, register
        register()
        return stringWidth(text, SANS, size)

    def _free(self, box, margin=2.0) -> float:
        """Overlap cost of an oriented box: 0 when it is free and inside the plot."""
        cx, cy, ux, uy, hw, hh = box
        cost = 0.0
        ex = abs(ux) * hw + abs(uy) * hh
        ey = abs(uy) * hw + abs(ux) * hh
        if cx - ex < margin or cx + ex > self.W - margin or cy - ey < margin or cy + ey > self.H - margin:
            cost += 100.0
        for b in self.boxes:
            if _obb_overlap(box, b):
                cost += 10.0
        if self.segs:
            if self._seg_arr is None or len(self._seg_arr) != len(self.segs):
                self._seg_arr = np.array(self.segs, float)
            sx, sy, r = self._seg_arr.T
            dx, dy = sx - cx, sy - cy
            a = dx * ux + dy * uy
            c = -dx * uy + dy * ux
            cost += float(np.count_nonzero((np.abs(a) < hw + r) & (np.abs(c) < hh + r)))
        return cost

    def place_on_line(self, text, x, y, size, targets, along_x=False):
        u, v = self.norm(x, y)
        w = self._width(text, size) + 2.4
        hh = size * 0.62
        best = None
        key = u if along_x else v
        cands = []
        lo_k, hi_k = float(np.min(key)), float(np.max(key))
        for t in targets:
            level = lo_k + t * (hi_k - lo_k) if along_x else t
            cands.append(level)
        # finer fallbacks
        cands += list(np.linspace(0.05, 0.95, 19)) if not along_x else list(lo_k + np.linspace(0.05, 0.95, 19) * (hi_k - lo_k))
        for level in cands:
            idx = np.nonzero((key[:-1] - level) * (key[1:] - level) <= 0)[0]
            if idx.size == 0:
                continue
            i = int(idx[0])
            span = key[i + 1] - key[i]
            f = 0.0 if span == 0 else (level - key[i]) / span
            cu = u[i] + f * (u[i + 1] - u[i])
            cvv = v[i] + f * (v[i + 1] - v[i])
            du = (u[i + 1] - u[i]) * self.W
            dv = (v[i + 1] - v[i]) * self.H
            L = math.hypot(du, dv)
            if L == 0:
                continue
            ux, uy = du / L, dv / L
            if ux < 0 or (ux == 0 and uy < 0):
                ux, uy = -ux, -uy
            box = (cu * self.W, cvv * self.H, ux, uy, w / 2, hh)
            cost = self._free(box)
            if best is None or cost < best[0]:
                best = (cost, box, cu, cvv, ux, uy)
            if cost == 0:
                break
        if best is None:
            return None
        _, box, cu, cvv, ux, uy = best
        self.boxes.append(box)
        return Label(text, self.xa.lo + cu * (self.xa.hi - self.xa.lo),
                     self.ya.lo + cvv * (self.ya.hi - self.ya.lo), ux, uy, size)

    def place_point(self, text, x, y, size):
        u, v = self.norm([x], [y])
        px, py = float(u[0]) * self.W, float(v[0]) * self.H
        w = self._width(text, size) + 2.0
        hh = size * 0.6
        best = None
        d = 4.5 + size * 0.35
        for ang in (135, 45, 225, 315, 90, 180, 0, 270, 160, 20, 200, 340):
            a = math.radians(ang)
            cx = px + math.cos(a) * (d + w / 2 * abs(math.cos(a)))
            cy = py + math.sin(a) * (d + hh * abs(math.sin(a)))
            box = (cx, cy, 1.0, 0.0, w / 2, hh)
            # the own marker must not count against the label
            cost = self._free(box) - (1.0 if abs(cx - px) < w / 2 + 3.2 and abs(cy - py) < hh + 3.2 else 0.0)
            if best is None or cost < best[0]:
                best = (max(cost, 0.0), box)
            if cost <= 0:
                break
        box = best[1]
        self.boxes.append(box)
        return Label(text, self.xa.lo + box[0] / self.W * (self.xa.hi - self.xa.lo),
                     self.ya.lo + box[1] / self.H * (self.ya.hi - self.ya.lo), 1.0, 0.0, size)


def _obb_overlap(a, b) -> bool:
    """Separating-axis test for two oriented rectangles (cx, cy, ux, uy, hw, hh)."""
    ax, ay, aux, auy, ahw, ahh = a
    bx, by, bux, buy, bhw, bhh = b
    dx, dy = bx - ax, by - ay
    for (nx, ny) in ((aux, auy), (-auy, aux), (bux, buy), (-buy, bux)):
        ra = ahw * abs(aux * nx + auy * ny) + ahh * abs(-auy * nx + aux * ny)
        rb = bhw * abs(bux * nx + buy * ny) + bhh * abs(-buy * nx + bux * ny)
        if abs(dx * nx + dy * ny) > ra + rb:
            return False
    return True


# --------------------------------------------------------------------------
# composer: one drawing routine for both renderers

class _Surface:
    """Drawing primitives in points, origin bottom left (implemented per renderer)."""

    def polyline(self, pts, width, dash, rgb, clip=None): ...
    def polygon(self, pts, fill, stroke=None, width=0.0): ...
    def circle(self, x, y, r, fill, stroke, width): ...
    def text(self, x, y, s, size, font="sans", align="left", angle=0.0, rgb=INK): ...
    def width(self, s, size, font="sans") -> float: ...


def _text_bg(surf, x, y, s, size, angle, font="sans", rgb=INK, pad=1.2):
    """Text centred on (x, y) with a white ground that interrupts the line under it."""
    w = surf.width(s, size, font) + 2 * pad
    a = math.radians(angle)
    ca, sa = math.cos(a), math.sin(a)
    lo, hi = -0.30 * size, 0.80 * size
    off = -0.36 * size                          # baseline below the centre
    corners = []
    for px, py in ((-w / 2, lo + off), (w / 2, lo + off), (w / 2, hi + off), (-w / 2, hi + off)):
        corners.append((x + px * ca - py * sa, y + px * sa + py * ca))
    surf.polygon(corners, (1.0, 1.0, 1.0))
    bx, by = x - off * sa, y + off * ca
    surf.text(bx, by, s, size, font, "center", angle, rgb)


def _compose(surf, model: ChartModel, x0, y0, width, height, page_text: str = "", part: str = "whole"):
    opts = {"min_pt": model.extra.get("min_pt"), "title": model.title, "subtitle": model.subtitle}
    lay = (panel_layout(width, height, **opts) if part == "panel"
           else layout(width, height, panel_page=part == "plot", **opts))
    fs = lay.scale
    px, py, pw, ph = lay.plot
    px, py = px + x0, py + y0
    xa, ya = model.x_axis, model.y_axis
    clip = (px, py, pw, ph)

    def X(v):
        return px + (np.asarray(v, float) - xa.lo) / (xa.hi - xa.lo) * pw

    def Y(v):
        return py + (np.asarray(v, float) - ya.lo) / (ya.hi - ya.lo) * ph

    def angle(lab):
        return math.degrees(math.atan2(lab.dv, lab.du)) if lab.du or lab.dv else 0.0

    # title band
    tx, ty, tw, th = lay.title
    tx, ty = tx + x0, ty + y0
    yl = ty + th - 15 * fs
    for i, (line, size, font) in enumerate(lay.title_lines):
        if i:
            yl -= _line_step(lay.title_lines, i, fs)
        surf.text(tx, yl, line, size, font, "left", rgb=BLACK if font == "bold" else INK)
    surf.polyline([(tx, ty + 1.5 * fs), (tx + tw, ty + 1.5 * fs)], 0.8 * fs, None, BLACK)
    if part == "panel":
        qx, qy, qw, qh = lay.panel
        _draw_panel(surf, model.panel, (qx + x0, qy + y0, qw, qh), fs, lay.columns, opts["min_pt"])
        _chart_footer(surf, model, lay, x0, y0, fs, page_text)
        return

    # grid
    for v in xa.minor:
        surf.polyline([(float(X(v)), py), (float(X(v)), py + ph)], *STYLES["grid_minor"])
    for v in ya.minor:
        surf.polyline([(px, float(Y(v))), (px + pw, float(Y(v)))], *STYLES["grid_minor"])
    for v in xa.major:
        surf.polyline([(float(X(v)), py), (float(X(v)), py + ph)], *STYLES["grid_major"])
    for v in ya.major:
        surf.polyline([(px, float(Y(v))), (px + pw, float(Y(v)))], *STYLES["grid_major"])

    # lines (thin families first, overlays on top)
    order = {"isotherm": 0, "isochore": 1, "isobar": 2, "dewpoint": 3, "aux": 4, "isentropic": 5, "process": 6}
    for ln in sorted(model.lines, key=lambda ln: order.get(ln.family, 9)):
        w, dash, rgb = STYLES[ln.style]
        surf.polyline(np.column_stack([X(ln.x), Y(ln.y)]), w, dash, rgb, clip)
    # arrows along the actual process paths
    for ar in model.arrows:
        ax_, ay_ = float(X(ar.x)), float(Y(ar.y))
        L = math.hypot(ar.du * pw, ar.dv * ph)
        if L == 0:
            continue
        ux, uy = ar.du * pw / L, ar.dv * ph / L
        a, b = 6.0 * fs, 2.6 * fs
        tip = (ax_ + ux * a / 2, ay_ + uy * a / 2)
        surf.polygon([tip, (tip[0] - ux * a - uy * b, tip[1] - uy * a + ux * b),
                      (tip[0] - ux * a + uy * b, tip[1] - uy * a - ux * b)], STYLES["process"][2])
    # inline line labels
    for ln in model.lines:
        if ln.label is not None:
            lab = ln.label
            rgb = STYLES[ln.style][2]
            font = "bold" if ln.style == "isobar_decade" else "sans"
            _text_bg(surf, float(X(lab.x)), float(Y(lab.y)), lab.text, lab.size, angle(lab), font, rgb)
    # state points
    for p in model.points:
        r = 2.6 * fs
        if p.isentropic:
            surf.circle(float(X(p.x)), float(Y(p.y)), r, (1, 1, 1), BLACK, 1.0 * fs)
        else:
            surf.circle(float(X(p.x)), float(Y(p.y)), r, BLACK, (1, 1, 1), 0.6 * fs)
        if p.label is not None:
            _text_bg(surf, float(X(p.label.x)), float(Y(p.label.y)), p.label.text, p.label.size, 0.0,
                     "bold", BLACK, pad=0.8)

    # frame and ticks
    surf.polyline([(px, py), (px + pw, py), (px + pw, py + ph), (px, py + ph), (px, py)], *STYLES["frame"])
    tick = 4.0 * fs
    tsz = 7.4 * fs
    for v, t in zip(xa.major, xa.labels):
        xx = float(X(v))
        surf.polyline([(xx, py), (xx, py - tick)], 0.6, None, BLACK)
        surf.text(xx, py - tick - tsz - 1.5, t, tsz, "sans", "center")
    for v in xa.minor:
        surf.polyline([(float(X(v)), py), (float(X(v)), py - tick / 2)], 0.4, None, BLACK)
    for v, t in zip(ya.major, ya.labels):
        yy = float(Y(v))
        surf.polyline([(px, yy), (px - tick, yy)], 0.6, None, BLACK)
        surf.text(px - tick - 2.0, yy - tsz * 0.35, t, tsz, "sans", "right")
    for v in ya.minor:
        surf.polyline([(px, float(Y(v))), (px - tick / 2, float(Y(v)))], 0.4, None, BLACK)
    surf.text(px + pw / 2, py - tick - 2 * tsz - 8 * fs, xa.label, 8.6 * fs, "sans", "center", rgb=BLACK)
    surf.text(px - 36 * fs, py + ph / 2, ya.label, 8.6 * fs, "sans", "center", 90.0, BLACK)
    if model.side is not None:
        sd = model.side
        for v, t in zip(sd.major, sd.labels):
            yy = float(Y(v))
            if ya.lo - 1e-9 <= v <= ya.hi + 1e-9:
                surf.polyline([(px + pw, yy), (px + pw + tick, yy)], 0.6, None, BLACK)
                surf.text(px + pw + tick + 2.0, yy - tsz * 0.35, t, tsz, "sans", "left")
        for v in sd.minor:
            if ya.lo <= v <= ya.hi:
                surf.polyline([(px + pw, float(Y(v))), (px + pw + tick / 2, float(Y(v)))], 0.4, None, BLACK)
        surf.text(px + pw + 40 * fs, py + ph / 2, sd.label, 8.6 * fs, "sans", "center", 90.0, BLACK)

    # reading panel
    if part == "whole":
        qx, qy, qw, qh = lay.panel
        _draw_panel(surf, model.panel, (qx + x0, qy + y0, qw, qh), fs, lay.columns, opts["min_pt"])
    _chart_footer(surf, model, lay, x0, y0, fs, page_text)


def _chart_footer(surf, model, lay, x0, y0, fs, page_text):
    fx, fy, fw, fh = lay.footer
    fx, fy = fx + x0, fy + y0
    surf.polyline([(fx, fy + fh), (fx + fw, fy + fh)], 0.4, None, INK)
    left = model.footer or "tablegen"
    surf.text(fx, fy + 3 * fs, f"{left} · chart fingerprint {model.fingerprint}", 6.2 * fs, "sans", "left")
    if page_text:
        surf.text(fx + fw, fy + 3 * fs, page_text, 6.2 * fs, "sans", "right")


def _panel_ops(surf, blocks, width, fs, k):
    """Blocks -> (height, ops) at font factor k; ops are drawn relative to the block top."""
    out = []
    for b in blocks:
        size = b.size * k
        ops, y = [], 0.0
        if b.kind == "heading":
            y -= size * 1.5
            ops.append(("text", 0.0, y, b.content[0], size, "bold", "left", BLACK))
            y -= 2.5 * fs * k
        elif b.kind == "key":
            for style, text in b.content:
                y -= size * 1.55
                mid = y + size * 0.32
                if style in ("point", "point_open"):
                    ops.append(("dot", 11 * fs * k, mid, 2.4 * fs * k, style == "point_open"))
                else:
                    ops.append(("sample", 0.0, mid, 22 * fs * k, style))
                ops.append(("text", 27 * fs * k, y, text, size, "sans", "left", INK))
            y -= 3 * fs * k
        elif b.kind == "text":
            for para in b.content:
                for line in _wrap(surf, para, size, width):
                    y -= size * 1.32
                    ops.append(("text", 0.0, y, line, size, "sans", "left", INK))
                y -= size * 0.4
            y -= 2 * fs * k
        elif b.kind == "table":
            ncol = len(b.content[0])
            widths = [max(surf.width(r[j], size, "bold" if i == 0 else "sans")
                          for i, r in enumerate(b.content)) for j in range(ncol)]
            gap = min(10 * fs * k, max(3.0, (width - sum(widths)) / max(ncol - 1, 1)))
            xs = [0.0]
            for wdt in widths[:-1]:
                xs.append(xs[-1] + wdt + gap)
            for i, row in enumerate(b.content):
                y -= size * 1.38
                for j, cell in enumerate(row):
                    if j == 0:
                        ops.append(("text", xs[j], y, cell, size, "bold", "left", INK))
                    else:
                        ops.append(("text", xs[j] + widths[j], y, cell, size, "bold" if i == 0 else "sans",
                                    "right", INK))
                if i == 0:
                    ops.append(("rule", 0.0, y - 2.0, xs[-1] + widths[-1]))
            y -= 5 * fs * k
        out.append((b.kind, -y, ops))
    return out


def _flow(items, height, columns):
    """Place blocks top-down in columns; a heading stays with the block after it.
    Returns [(column, top offset, ops)] or None when they do not fit."""
    placed, col, used = [], 0, 0.0
    i = 0
    while i < len(items):
        group = [items[i]]
        if items[i][0] == "heading" and i + 1 < len(items):
            group.append(items[i + 1])
        need = sum(g[1] for g in group)
        if used + need > height:
            col += 1
            used = 0.0
            if col >= columns or need > height:
                return None
        for g in group:
            placed.append((col, used, g[2]))
            used += g[1]
        i += len(group)
    return placed


#: Font factors tried for the reading panel; below 0.8 the text is too small to read in print.
PANEL_FACTORS = (1.0, 0.93, 0.86, 0.8)


class _Measure:
    """Text widths without a canvas (the same DejaVu metrics both renderers use)."""

    def width(self, s, size, font="sans"):
        from reportlab.pdfbase.pdfmetrics import stringWidth

        from .fonts import SANS, SANS_BOLD, register
        register()
        return stringWidth(s, SANS_BOLD if font == "bold" else SANS, size)


def _factors(fs: float, min_pt: float | None) -> tuple:
    """The panel's font factors that keep its smallest text at or above ``min_pt``."""
    if not min_pt:
        return PANEL_FACTORS
    return tuple(k for k in PANEL_FACTORS if SMALLEST_PT * fs * k >= min_pt - 1e-9) or PANEL_FACTORS[:1]


def panel_fits(blocks, lay: Layout, min_pt: float | None = None) -> bool:
    qx, qy, qw, qh = lay.panel
    cw = (qw - 14.0 * lay.scale * (lay.columns - 1)) / lay.columns
    return any(_flow(_panel_ops(_Measure(), blocks, cw, lay.scale, k), qh - 4 * lay.scale, lay.columns)
               is not None for k in _factors(lay.scale, min_pt))


def _draw_panel(surf, blocks, rect, fs, columns, min_pt=None):
    qx, qy, qw, qh = rect
    gap = 14.0 * fs
    cw = (qw - gap * (columns - 1)) / columns
    placed = None
    for k in _factors(fs, min_pt):
        placed = _flow(_panel_ops(surf, blocks, cw, fs, k), qh - 4 * fs, columns)
        if placed is not None:
            break
    if placed is None:      # cannot happen within the spec limits; keep what fits, never overprint
        placed, col, acc = [], 0, 0.0
        for _, h, ops in _panel_ops(surf, blocks, cw, fs, 0.62):
            if acc + h > qh - 4 * fs:
                col, acc = col + 1, 0.0
            if col < columns:
                placed.append((col, acc, ops))
            acc += h
    for col, top, ops in placed:
        ox = qx + col * (cw + gap)
        oy = qy + qh - 4 * fs - top
        for op in ops:
            if op[0] == "text":
                _, x, y, text, size, font, align, rgb = op
                surf.text(ox + x, oy + y, text, size, font, align, rgb=rgb)
            elif op[0] == "dot":
                _, x, y, r, hollow = op
                if hollow:
                    surf.circle(ox + x, oy + y, r, (1, 1, 1), BLACK, 1.0 * fs)
                else:
                    surf.circle(ox + x, oy + y, r, BLACK, (1, 1, 1), 0.6 * fs)
            elif op[0] == "sample":
                _, x, y, length, style = op
                w, dash, rgb = STYLES[style]
                surf.polyline([(ox + x, oy + y), (ox + x + length, oy + y)], w, dash, rgb)
            elif op[0] == "rule":
                _, x, y, length = op
                surf.polyline([(ox + x, oy + y), (ox + x + length, oy + y)], 0.4, None, INK)


def _wrap(surf, text, size, width, font="sans"):
    words = text.split(" ")
    out, cur = [], ""
    for w in words:
        t = w if not cur else cur + " " + w
        if surf.width(t, size, font) <= width or not cur:
            cur = t
        else:
            out.append(cur)
            cur = w
    if cur:
        out.append(cur)
    return out


# --------------------------------------------------------------------------
# reportlab renderer

class _PdfSurface(_Surface):
    def __init__(self, canvas):
        from .fonts import MONO, SANS, SANS_BOLD, SANS_OBLIQUE, register
        register()
        self.c = canvas
        self.fonts = {"sans": SANS, "bold": SANS_BOLD, "oblique": SANS_OBLIQUE, "mono": MONO}

    def width(self, s, size, font="sans"):
        from reportlab.pdfbase.pdfmetrics import stringWidth
        return stringWidth(s, self.fonts[font], size)

    def polyline(self, pts, width, dash, rgb, clip=None):
        c = self.c
        pts = np.asarray(pts, float)
        if len(pts) < 2:
            return
        c.saveState()
        if clip is not None:
            p = c.beginPath()
            p.rect(*clip)
            c.clipPath(p, stroke=0, fill=0)
        c.setLineWidth(width)
        c.setStrokeColorRGB(*rgb)
        c.setLineJoin(1)
        c.setLineCap(0 if dash else 1)
        if dash:
            c.setDash(list(dash), 0)
        p = c.beginPath()
        p.moveTo(float(pts[0, 0]), float(pts[0, 1]))
        for x, y in pts[1:]:
            p.lineTo(float(x), float(y))
        c.drawPath(p, stroke=1, fill=0)
        c.restoreState()

    def polygon(self, pts, fill, stroke=None, width=0.0):
        c = self.c
        c.saveState()
        c.setFillColorRGB(*fill)
        if stroke is not None:
            c.setStrokeColorRGB(*stroke)
            c.setLineWidth(width)
        p = c.beginPath()
        p.moveTo(*pts[0])
        for q in pts[1:]:
            p.lineTo(*q)
        p.close()
        c.drawPath(p, stroke=1 if stroke is not None else 0, fill=1)
        c.restoreState()

    def circle(self, x, y, r, fill, stroke, width):
        c = self.c
        c.saveState()
        c.setFillColorRGB(*fill)
        c.setStrokeColorRGB(*stroke)
        c.setLineWidth(width)
        c.circle(x, y, r, stroke=1, fill=1)
        c.restoreState()

    def text(self, x, y, s, size, font="sans", align="left", angle=0.0, rgb=INK):
        c = self.c
        c.saveState()
        c.setFillColorRGB(*rgb)
        c.setFont(self.fonts[font], size)
        c.translate(x, y)
        if angle:
            c.rotate(angle)
        if align == "center":
            c.drawCentredString(0, 0, s)
        elif align == "right":
            c.drawRightString(0, 0, s)
        else:
            c.drawString(0, 0, s)
        c.restoreState()


def draw_chart(canvas, model: ChartModel, x: float, y: float, width: float, height: float,
               page_text: str = "", part: str = "whole") -> None:
    """Draw the chart as vector graphics into the box (points) of a reportlab canvas.

    The box holds the whole chart page design (title band, plot, reading panel,
    footer); a landscape A4 or A3 page box gives the intended proportions.
    ``part``: "whole"; or, for a model built with ``panel_page``, "plot" (title band
    and plot) and "panel" (title band and reading panel), two facing pages.
    """
    _compose(_PdfSurface(canvas), model, x, y, width, height, page_text, part)


def chart_pdf(models, *, title: str = "tablegen charts", date_text: str = "") -> bytes:
    """A PDF with one landscape page per chart model (reproducible bytes)."""
    import io

    from .. import __version__
    from . import fonts
    from .fonts import SANS, register
    register()
    buf = io.BytesIO()
    first = PAPERS[models[0].paper]
    c = fonts.canvas(buf, pagesize=first, initialFontName=SANS, initialFontSize=8, pageCompression=1)
    c.setTitle(title)
    c.setAuthor("tablegen")
    c.setCreator(f"tablegen {__version__}")
    c.setSubject("ideal-gas T-s and h-s charts")
    n = len(models)
    for i, m in enumerate(models):
        size = PAPERS[m.paper]
        c.setPageSize(size)
        page = f"page {i + 1} of {n}" + (f" · {date_text}" if date_text else "")
        draw_chart(c, m, 0.0, 0.0, size[0], size[1], page_text=page)
        c.showPage()
    c.save()
    return buf.getvalue()


# --------------------------------------------------------------------------
# matplotlib renderer

class _MplSurface(_Surface):
    def __init__(self, ax):
        from matplotlib.font_manager import FontProperties

        from .fonts import font_dir
        d = font_dir()
        self.ax = ax
        self.fp = {"sans": FontProperties(fname=str(d / "DejaVuSans.ttf")),
                   "bold": FontProperties(fname=str(d / "DejaVuSans-Bold.ttf")),
                   "oblique": FontProperties(fname=str(d / "DejaVuSans-Oblique.ttf")),
                   "mono": FontProperties(fname=str(d / "DejaVuSansMono.ttf"))}
        self.z = 0            # drawing order is stacking order, as on the PDF page

    def _z(self):
        self.z += 1
        return self.z

    def width(self, s, size, font="sans"):
        from reportlab.pdfbase.pdfmetrics import stringWidth

        from .fonts import MONO, SANS, SANS_BOLD, SANS_OBLIQUE, register
        register()
        names = {"sans": SANS, "bold": SANS_BOLD, "oblique": SANS_OBLIQUE, "mono": MONO}
        return stringWidth(s, names[font], size)

    def polyline(self, pts, width, dash, rgb, clip=None):
        from matplotlib.lines import Line2D
        from matplotlib.patches import Rectangle
        pts = np.asarray(pts, float)
        ln = Line2D(pts[:, 0], pts[:, 1], linewidth=width, color=rgb, solid_joinstyle="round",
                    solid_capstyle="round" if not dash else "butt", dash_capstyle="butt",
                    linestyle=(0, tuple(dash)) if dash else "-", antialiased=True, zorder=self._z())
        self.ax.add_line(ln)
        if clip is not None:
            r = Rectangle(clip[:2], clip[2], clip[3], transform=self.ax.transData)
            ln.set_clip_path(r)

    def polygon(self, pts, fill, stroke=None, width=0.0):
        from matplotlib.patches import Polygon
        self.ax.add_patch(Polygon(pts, closed=True, facecolor=fill,
                                  edgecolor=stroke if stroke is not None else "none",
                                  linewidth=width if stroke is not None else 0.0, zorder=self._z()))

    def circle(self, x, y, r, fill, stroke, width):
        from matplotlib.patches import Circle
        self.ax.add_patch(Circle((x, y), r, facecolor=fill, edgecolor=stroke, linewidth=width,
                                 zorder=self._z()))

    def text(self, x, y, s, size, font="sans", align="left", angle=0.0, rgb=INK):
        self.ax.text(x, y, s, fontproperties=self.fp[font], fontsize=size, ha=align, va="baseline",
                     rotation=angle, rotation_mode="anchor", color=rgb, zorder=self._z())


def chart_png(model: ChartModel, paper: str | None = None, dpi: int = 300) -> bytes:
    """The chart as a PNG page (landscape A4 or A3) at ``dpi``; reproducible bytes."""
    import io

    import matplotlib
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    paper = (paper or model.paper).upper()
    if paper not in PAPERS:
        raise TablegenError(f"paper {paper!r} is not known; allowed: A4, A3")
    W, H = PAPERS[paper]
    with matplotlib.rc_context({"lines.scale_dashes": False, "path.simplify": False,
                                "text.usetex": False, "svg.hashsalt": "tablegen",
                                "text.parse_math": False}):
        fig = Figure(figsize=(W / 72.0, H / 72.0), dpi=dpi, facecolor="white")
        FigureCanvasAgg(fig)
        ax = fig.add_axes((0, 0, 1, 1))
        ax.set_xlim(0, W)
        ax.set_ylim(0, H)
        ax.set_axis_off()
        _compose(_MplSurface(ax), model, 0.0, 0.0, W, H, page_text="")
        buf = io.BytesIO()
        fig.savefig(buf, format="png", dpi=dpi, facecolor="white",
                    metadata={"Software": None, "Title": model.title[:200],
                              "Description": f"tablegen chart {model.fingerprint}"})
    return buf.getvalue()
