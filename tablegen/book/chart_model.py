"""The T-s and h-s chart model: what a chart draws, computed from the substance.

The flow is one way, as everywhere in tablegen:

    parse_charts(raw spec)  ->  ChartSpec (tablegen/spec/chart.py; frozen, validated once)
    build_chart(substance, spec)  ->  ChartModel (chart_data.py; pure data: lines as
        arrays in chart units, inline label positions, ticks, overlay states, panel text)
    draw_chart(canvas, model, ...)  ->  vector page (chart_pdf.py, reportlab)
    chart_png(model, paper)  ->  PNG bytes (chart_png.py, matplotlib, Agg)

Only the chart model calls the thermodynamic engine (here, and through its parts:
``chart_overlays`` for the overlay end states, ``chart_axes`` for the right-hand scale,
``chart_labels`` for label placement, ``chart_panel`` for the reading panel); both
renderers lay out finished numbers through one composer (``chart_compose``), so the
PDF page and the PNG look the same.

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

import numpy as np

from ..core.errors import RangeError
from ..spec.chart import (DEFAULT_PRESSURES, DEFAULT_T_RANGE_K, PAPERS, T_UNITS, UNIT_SYSTEMS, ChartSpec, _fail,
                          _system)
from .chart_axes import _axis, nice_ticks, side_scale
from .chart_data import ChartModel, Line
from .chart_labels import place_labels
from .chart_layout import layout, panel_fits, panel_layout
from .chart_overlays import overlay_geometry, overlay_states
from .chart_panel import reading_panel


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
    title, subtitle = _titles(substance, spec, cv)
    box = box_pt or PAPERS[spec.paper]
    lay = layout(*box, panel_page=panel_page, min_pt=min_pt, title=title, subtitle=subtitle)
    fs = lay.scale
    notes = []
    lo, hi = _T_range(substance, spec, T_range_K, notes)

    # overlay states (the engine's process calculation); the range widens to show them
    ov_states, ov_steps = overlay_states(substance, spec)
    all_T = [s[1] for st in ov_states for s in st]
    all_P = [s[2] for st in ov_states for s in st]
    if all_T:
        span = hi - lo
        lo = max(substance.T_min, min(lo, min(all_T) - 0.03 * span))
        hi = min(substance.T_max, max(hi, max(all_T) + 0.03 * span))
    pressures, decade = _pressures(spec, cv, system, all_P)

    # y axis first; the lines then fill it out to its rounded ends (inside the data)
    plot = lay.plot
    y_axis, lo, hi = _y_axis(substance, spec.kind, cv, plot, lo, hi)
    T = np.unique(np.concatenate([np.geomspace(lo, hi, 240), [lo, hi]]))
    props = substance.properties(T)
    yconv = (lambda TK, hJ: cv.T.from_si(TK)) if spec.kind == "ts" else (lambda TK, hJ: cv.h.from_si(hJ))
    lines = _pressure_lines(substance, spec, cv, yconv, T, props, pressures, decade)
    x_axis = _x_axis(substance, cv, lines, all_T, all_P, plot)
    if spec.kind == "hs":
        lines += _isotherms(substance, spec, cv, x_axis, lo, hi, pressures)
    lines += _dew_line(substance, spec.kind, cv, x_axis, lo, hi)
    side = side_scale(substance, spec.kind, cv, y_axis, plot[3] / 50.0, lo, hi, props["h"])

    ov_lines, points, arrows = overlay_geometry(substance, cv, yconv, ov_states, ov_steps)
    arrow_objs, placed_points, labelled = place_labels(lay, x_axis, y_axis, lines, ov_lines, points, arrows,
                                                       cv, substance, fs)

    # panel
    used = {ln.style for ln in labelled}
    if hi > 2200.0:
        notes.append("Fixed composition: dissociation, which sets in above about 2000 K (common "
                     "practice), is not included.")
    panel = reading_panel(substance, spec, cv, ov_states, ov_steps, placed_points, system, notes, fs, used)
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


def _titles(substance, spec: ChartSpec, cv) -> tuple:
    """The chart's title (the spec's, else the substance's name) and subtitle."""
    kind_name = "Temperature-entropy (T-s) chart" if spec.kind == "ts" else "Enthalpy-entropy (h-s) chart"
    title = spec.title or (substance.name if substance.name == substance.id
                           else f"{substance.name} ({substance.id})")
    subtitle = (f"{kind_name} · ideal gas · M = {substance.M:.4f} kg/kmol · "
                f"R = {cv.s.from_si(substance.R):.5f} {cv.sym['s']} · s° at P° = "
                f"{cv.P.from_si(substance.P_ref_Pa):.6g} {cv.sym['P']}")
    return title, subtitle


def _T_range(substance, spec: ChartSpec, T_range_K, notes: list) -> tuple:
    """The chart's temperature range, K, inside the data range (a note when it was clipped)."""
    lo_d, hi_d = substance.T_min, substance.T_max
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
    return lo, hi


def _pressures(spec: ChartSpec, cv, system: str, all_P) -> tuple:
    """The isobars' pressures, Pa (the defaults widened by decades to the overlay states), and
    the decade values among them drawn heavier."""
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
    return pressures, decade


def _y_axis(substance, kind: str, cv, plot, lo: float, hi: float) -> tuple:
    """The y axis (T on T-s, h on h-s) and the temperature range its rounded ends span, K."""
    lo_d, hi_d = substance.T_min, substance.T_max
    if kind == "ts":
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
    return y_axis, lo, hi


def _pressure_lines(substance, spec: ChartSpec, cv, yconv, T, props, pressures, decade) -> list:
    """Isobars and lines of constant specific volume over the temperature grid ``T``."""
    s0 = props["s0"]
    hT = props["h"]
    R = substance.R
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
    return lines


def _x_axis(substance, cv, lines, all_T, all_P, plot):
    """The entropy axis, from the drawn lines and the overlay states."""
    xs = [ln.x for ln in lines]
    ov_s = [float(substance.properties(np.array([t]), p)["s"][0]) for t, p in zip(all_T, all_P)]
    x_lo = min(float(a.min()) for a in xs)
    x_hi = max(float(a.max()) for a in xs)
    if ov_s:
        x_lo = min(x_lo, cv.s.from_si(min(ov_s)))
        x_hi = max(x_hi, cv.s.from_si(max(ov_s)))
    pad = 0.015 * (x_hi - x_lo)
    x_axis = _axis(f"specific entropy s  [{cv.sym['s']}]", x_lo - pad, x_hi + pad, plot[2] / 52.0)
    return x_axis


def _isotherms(substance, spec: ChartSpec, cv, x_axis, lo: float, hi: float, pressures) -> list:
    """Isotherms on h-s: horizontal lines across the isobar fan."""
    R = substance.R
    lines = []
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
    return lines


def _dew_line(substance, kind: str, cv, x_axis, lo: float, hi: float) -> list:
    """The gas's water dew point (its one figure, at its stated pressure), a labelled line."""
    dew = getattr(substance, "dew_point_K", None)
    if dew is not None and lo <= dew <= hi:
        y_dew = cv.T.from_si(dew) if kind == "ts" else \
            cv.h.from_si(float(substance.properties(np.array([dew]))["h"][0]))
        xx = np.linspace(x_axis.lo, x_axis.hi, 24)
        return [Line("dewpoint", xx, np.full(xx.shape, float(y_dew)), "dewpoint", value_SI=float(dew),
                     T_K=np.full(xx.shape, dew), P_Pa=np.full(xx.shape, substance.dew_point_P_Pa))]
    return []
