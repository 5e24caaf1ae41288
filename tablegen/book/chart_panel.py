"""The chart's reading panel: key, relations, overlay state tables, data and cautions.

Part of the chart model (``chart_model.build_chart``): the text is written from the
substance and the overlay states; ``chart_layout`` flows it into columns.
"""

from __future__ import annotations

from .chart_axes import _fmt
from .chart_data import PanelBlock


def reading_panel(substance, spec, cv, ov_states, ov_steps, points, system, notes, fs, used) -> tuple:
    """The blocks of the reading panel (``PanelBlock``); ``used``: the line styles drawn."""
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
