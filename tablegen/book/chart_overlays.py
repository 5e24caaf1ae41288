"""The chart's process overlays: end states of the steps, state points, process paths.

Part of the chart model (``chart_model.build_chart``). The end states come from the
process calculator (``tablegen.calc.steps.process``); the paths are drawn through the
substance's h and s.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..core.errors import SpecError, TablegenError
from ..spec.chart import StepSpec, _fail
from .chart_data import Line, StatePoint


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


def overlay_states(substance, spec) -> tuple:
    """The states of every overlay of ``spec``, with the steps between them.

    Returns
    -------
    (ov_states, ov_steps): per overlay, a list of (name, T, P, isentropic) and a list of
    (step, (T1, P1), StepEnd).

    Raises
    ------
    SpecError naming the overlay's key path for a state outside the data range.
    """
    lo_d, hi_d = substance.T_min, substance.T_max
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
    return ov_states, ov_steps


def overlay_geometry(substance, cv, yconv, ov_states, ov_steps) -> tuple:
    """State points and process lines (chart units) of the overlays.

    Returns
    -------
    (ov_lines, points, arrows): the process, isentropic and end-isobar lines; the
    state points in overlay order; per actual step (A, B, x, y), the path an arrow is
    put on.
    """
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
    return ov_lines, points, arrows
