"""The chart's axes: tick steps, axis ticks and labels, the right-hand scale.

Part of the chart model (``chart_model.build_chart``): the right-hand scale, h on a
T-s chart and T on an h-s chart, is placed through the substance's h(T).
"""

from __future__ import annotations

import math

import numpy as np

from ..core.rounding import round_step_up
from .chart_data import Axis, SideScale


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


def _scale_ticks(lo: float, hi: float, target: float):
    """Major and minor tick values (scale units) and digits of a right-hand scale on [lo, hi]."""
    step, minor, digits = nice_ticks(lo, hi, target)
    maj = [k * step for k in range(math.ceil(lo / step - 1e-9), math.floor(hi / step + 1e-9) + 1)]
    mnr = [k * minor for k in range(math.ceil(lo / minor - 1e-9), math.floor(hi / minor + 1e-9) + 1)]
    mnr = [v for v in mnr if abs(v / step - round(v / step)) > 1e-6]
    return maj, mnr, digits


def side_scale(substance, kind: str, cv, y_axis: Axis, target: float, T_lo: float, T_hi: float,
               hT) -> SideScale:
    """The right-hand scale: h on T-s, T on h-s (ideal gas: h is a function of T).

    ``T_lo``, ``T_hi``: the temperature range the lines span, K; ``hT``: h (J/kg) at
    the ends of the lines' temperature grid; ``target``: about as many major intervals.
    """
    lo_d, hi_d = substance.T_min, substance.T_max
    if kind == "ts":
        hh_lo = cv.h.from_si(float(substance.properties(np.array([max(lo_d, cv.T.to_si(y_axis.lo))]))["h"][0]))
        hh_hi = cv.h.from_si(float(substance.properties(np.array([min(hi_d, cv.T.to_si(y_axis.hi))]))["h"][0]))
        maj, mnr, digits = _scale_ticks(hh_lo, hh_hi, target)
        pos = lambda vals: tuple(float(cv.T.from_si(t)) for t in
                                 substance.T_from("h", np.array([cv.h.to_si(v) for v in vals]))) if vals else ()
        return SideScale(f"specific enthalpy h  [{cv.sym['h']}]", pos(maj), pos(mnr),
                         tuple(_fmt(v, digits) for v in maj))
    t_lo = cv.T.from_si(max(lo_d, float(substance.T_from("h", np.array([cv.h.to_si(y_axis.lo)]))[0])
                            if cv.h.to_si(y_axis.lo) >= float(hT[0]) else T_lo))
    t_hi = cv.T.from_si(min(hi_d, float(substance.T_from("h", np.array([cv.h.to_si(y_axis.hi)]))[0])
                            if cv.h.to_si(y_axis.hi) <= float(hT[-1]) else T_hi))
    maj, mnr, digits = _scale_ticks(t_lo, t_hi, target)
    pos = lambda vals: tuple(float(cv.h.from_si(x)) for x in
                             substance.properties(np.array([cv.T.to_si(v) for v in vals]))["h"]) if vals else ()
    return SideScale(f"temperature T  [{cv.sym['T']}]", pos(maj), pos(mnr), tuple(_fmt(v, digits) for v in maj))
