"""Stated uncertainty of every printed column: the budget and its parts.

A budget holds, per property key and temperature, standard uncertainties of
independent components, and combines them into an expanded uncertainty
U = k·sqrt(Σ u²) with coverage factor k = 2 (JCGM 100:2008, the GUM, §6):

data          the evaluation behind the printed functions (tablegen.calc.evidence):
              CODATA key values for S°(298.15 K) and the enthalpy of formation;
              across temperature, the spread against independent evaluations
              of comparable quality; otherwise a class default, "estimated".
fit residual  a refit's stated residual against the table it was fitted to.
composition   user-given uncertainties of mole or mass fractions, propagated by
              linear sensitivity (central differences on the collapsed mixture,
              the other fractions renormalised).
rounding      half a unit of the last printed digit, as a rectangular
              distribution (u = step / (2 sqrt 3)).

U covers these and nothing else: an ideal-gas column is exactly the ideal-gas
function. Stated beside U, never inside it:

interpolation the largest error of linear interpolation between printed rows
              (a printed row carries none);
validity      how far the real gas departs from the ideal-gas values at the
              stated maximum pressure (tablegen.calc.realgas: second virial
              coefficient, Tsonopoulos 1974), as the table's range of validity.

Correlation assumptions (stated in every budget): within one species the
errors of one source are fully correlated across temperature (a band figure is
applied whole); between species they are independent, so a mixture's standard
uncertainty is sqrt(Σ (y_i u_i)²); components are independent of each other;
h and s of one species are treated as independent where both enter (g°).

The molar-mass uncertainty (IUPAC standard atomic weights, below 1e-5
relative for the gases shipped) and that of R (exact since 2019) are neglected.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..core.errors import InputError, NameLookupError, RangeError
from ..core.constants import P_STD, R_MOLAR, T_REF
from .evidence import BAND_EDGES_K, SQRT3, agreement_index, by_species, record_for, species_data
from .interpolation import ENERGY_KEYS, STANDARD_STATE_KEYS, UNITS, _check_keys, interpolation_bounds
from .realgas import departure_bounds, model_statements, virial_mixture

#: Coverage factor of every stated expanded uncertainty (about 95 % for a
#: normal distribution; JCGM 100:2008 §6.2).
COVERAGE = 2.0

# ----------------------------------------------------------------- the budget
#: Components of U, in the order they are listed.
COMPONENTS = ("data", "fit residual", "composition", "rounding")


@dataclass(frozen=True, slots=True)
class Band:
    """Largest stated uncertainty of one key in one temperature band."""

    key: str
    T_lo_K: float
    T_hi_K: float
    U_max: float                  # expanded, k = 2, SI unit of the key
    U_rel_max: float              # relative to |value| (NaN for energies with a datum)
    components: dict              # component -> largest expanded part in the band
    interpolation_max: float      # largest interpolation error between rows, or NaN
    estimated: bool               # any class default used in the band
    upper: bool = False           # only a less accurate evaluation compared somewhere in the band
    departure_max: float = math.nan   # largest real-gas departure bound at P_max (not in U), SI


@dataclass(frozen=True, slots=True, eq=False)
class Budget:
    """An uncertainty budget of one substance on a temperature grid.

    Use :func:`budget` to make one.  ``u[key][component]`` are standard
    uncertainties (arrays over ``T_K``, SI); :meth:`U` the combined expanded one.
    """

    substance_id: str
    T_K: np.ndarray
    keys: tuple
    P_max_Pa: float
    values: dict
    u: dict
    estimated: np.ndarray
    interpolation: dict
    statements: tuple
    assumptions: tuple
    sources: tuple
    edges: tuple = BAND_EDGES_K
    extra: dict = field(default_factory=dict)
    #: the range of validity of the ideal-gas values at P_max (tablegen.calc.realgas), beside U
    validity: tuple = ()
    #: key -> upper bound of |real - ideal| at P_max, SI (keys it applies to), beside U
    departures: dict = field(default_factory=dict)
    #: bool over T_K: only a less accurate evaluation compared (an upper estimate)
    upper: np.ndarray | None = None
    #: bands() worked out, per key (a memo: the budget itself does not change)
    _bands: dict = field(default_factory=dict, repr=False)

    def U(self, key: str, component: str | None = None) -> np.ndarray:
        """Expanded uncertainty (k = 2), SI unit of ``key``; one component if named."""
        parts = self._parts(key)
        if component is not None:
            if component not in parts:
                raise NameLookupError(f"uncertainty component {component!r} is not known; "
                                    f"allowed: {', '.join(parts)}")
            return COVERAGE * parts[component]
        return COVERAGE * np.sqrt(sum(v ** 2 for v in parts.values()))

    def _parts(self, key):
        if key not in self.u:
            raise NameLookupError(f"no uncertainty for {key!r} in this budget; "
                                f"allowed: {', '.join(self.keys)}")
        return self.u[key]

    def bands(self, key: str) -> tuple:
        """Per temperature band: the largest U, its parts and the interpolation bound
        (worked out once per key: a book asks for them several times)."""
        got = self._bands.get(key)
        if got is None:
            got = self._bands[key] = self._make_bands(key)
        return got

    def _make_bands(self, key: str) -> tuple:
        U = self.U(key)
        parts = self._parts(key)
        val = self.values[key]
        T = self.T_K
        inter = self.interpolation.get(key)
        out = []
        cuts = sorted({float(T.min()), float(T.max()), *(e for e in self.edges if T.min() < e < T.max())})
        for i, (lo, hi) in enumerate(zip(cuts[:-1], cuts[1:])):
            m = (T >= lo) & ((T < hi) if i < len(cuts) - 2 else (T <= hi))
            if not np.any(m):
                continue
            with np.errstate(divide="ignore", invalid="ignore"):
                rel = np.nan if key in ENERGY_KEYS else float(np.max(U[m] / np.abs(val[m])))
            im = np.nan
            if inter is not None:
                mids = 0.5 * (T[1:] + T[:-1])
                mm = (mids >= lo) & (mids <= hi)
                if np.any(mm):
                    im = float(np.max(inter[mm]))
            dep = self.departures.get(key)
            out.append(Band(key, lo, hi, float(np.max(U[m])), rel,
                            {c: float(np.max(COVERAGE * v[m])) for c, v in parts.items()},
                            im, bool(np.any(self.estimated[m])),
                            bool(self.upper is not None and np.any(self.upper[m])),
                            math.nan if dep is None else float(np.max(dep[m]))))
        return tuple(out)

    def summary(self, key: str, *, unit_factor: float = 1.0, unit: str = "") -> str:
        """One line for a table's notes: the largest U per band, relative where
        that is meaningful, else in ``unit`` (SI value of one unit: unit_factor)."""
        parts = []
        for b in self.bands(key):
            if np.isfinite(b.U_rel_max):
                fig = f"{b.U_rel_max * 100:.2g} %"
            else:
                fig = f"{b.U_max / unit_factor:.2g} {unit}".rstrip()
            est = " (estimated)" if b.estimated else " (upper estimate)" if b.upper else ""
            parts.append(f"{fig} at {b.T_lo_K:g}-{b.T_hi_K:g} K{est}")
        return f"{key}: U (k = 2) at most " + ", ".join(parts)

    def columns(self) -> dict:
        """U_<key> arrays for a CSV (expanded, k = 2, SI unit of the key)."""
        return {f"U_{k}": self.U(k) for k in self.keys}

    def to_json(self) -> dict:
        """The budget as plain JSON data for the book's sidecar (figures to 3 digits)."""
        def r3(x):
            return None if not np.isfinite(x) else float(f"{x:.3g}")
        keys = {}
        for k in self.keys:
            keys[k] = {
                "unit": UNITS.get(k, ""),
                "bands": [{
                    "T_lo_K": b.T_lo_K, "T_hi_K": b.T_hi_K, "U": r3(b.U_max),
                    "U_rel": r3(b.U_rel_max), "estimated": b.estimated, "upper_estimate": b.upper,
                    "components": {c: r3(v) for c, v in b.components.items()},
                    "interpolation_max": r3(b.interpolation_max),
                    "real_gas_departure_max": r3(b.departure_max),
                } for b in self.bands(k)],
            }
        return {
            "substance": self.substance_id, "coverage_factor": COVERAGE,
            "P_max_Pa": self.P_max_Pa, "T_range_K": [float(self.T_K.min()), float(self.T_K.max())],
            "keys": keys, "statements": list(self.statements), "assumptions": list(self.assumptions),
            "sources": list(self.sources), "components": list(COMPONENTS),
            "validity": {"P_max_Pa": self.P_max_Pa, "statements": list(self.validity)},
        }


def _column_parts(sq: dict, props, T: np.ndarray, Mk: float) -> dict:
    """Standard uncertainties of every key from the molar ones of cp, h, dh298, s and ln Pr."""
    u_m = {q: np.sqrt(v) for q, v in sq.items()}
    cv_m = props["cv_molar"]
    k_ = props["k"]
    out = {
        "cp_molar": u_m["cp"], "cv_molar": u_m["cp"], "h_molar": u_m["h"], "u_molar": u_m["h"],
        "dh298_molar": u_m["dh"], "s0_molar": u_m["s"], "s_molar": u_m["s"],
        "g0_molar": np.hypot(u_m["h"], T * u_m["s"]),
        "Pr": props["Pr"] * u_m["lnPr"], "vr": props["vr"] * u_m["lnPr"],
        "k": R_MOLAR * u_m["cp"] / cv_m ** 2,
        "v": np.zeros_like(T), "rho": np.zeros_like(T),
    }
    out["a"] = props["a"] * 0.5 * out["k"] / k_
    for k in ("cp", "cv", "h", "u", "s0", "s", "g0"):
        out[k] = out[f"{k}_molar"] / Mk
    return out


def _data_parts(substance, T, props, rows, held_out):
    """Data and fit-residual parts per key, the estimated and upper-estimate masks, source texts."""
    Mk = substance.M * 1e-3
    names = ("cp", "h", "dh", "s", "lnPr")
    sq = {q: np.zeros_like(T) for q in names}
    sq_fit = {q: np.zeros_like(T) for q in names}
    est = np.zeros(T.shape, bool)
    sq_upper = np.zeros_like(T)
    sources = []
    datum = substance.datum
    Ta = substance.anchor.T_K

    def at(rec, T1):
        return species_data(rec, np.array([T1]), rows, held_out=held_out)

    for c in substance.components:
        rec = record_for(c.id, c.source)
        sd = species_data(rec, T, rows, held_out=held_out)
        y = c.mole_fraction
        d_ref = None if datum.kind == "formation" or abs(datum.T_ref_K - T_REF) < 1e-9 else at(rec, datum.T_ref_K)
        a_ref = None if abs(Ta - T_REF) < 1e-9 else at(rec, Ta)
        for acc, (u_cp, u_dh, u_ds, uS, uH, ref_dh, ref_ds) in (
                (sq, (sd.cp, sd.dh, sd.ds, sd.S298, sd.dfH,
                      0.0 if d_ref is None else d_ref.dh[0], 0.0 if a_ref is None else a_ref.ds[0])),
                (sq_fit, (sd.fit_cp, sd.fit_dh, sd.fit_ds, 0.0, 0.0,
                          0.0 if d_ref is None else d_ref.fit_dh[0], 0.0 if a_ref is None else a_ref.fit_ds[0]))):
            uh = np.hypot(u_dh, uH if datum.kind == "formation" else ref_dh)
            acc["cp"] += (y * u_cp) ** 2
            acc["h"] += (y * uh) ** 2
            acc["dh"] += (y * u_dh) ** 2
            acc["s"] += (y * np.hypot(u_ds, uS)) ** 2
            acc["lnPr"] += (y * np.hypot(u_ds, ref_ds) / R_MOLAR) ** 2
        est |= sd.estimated
        sq_upper += np.where(sd.upper, (y * sd.cp) ** 2, 0.0)
        sources.append(f"{c.id} ({c.source}): across T {', '.join(sd.T_basis)}; "
                       f"S°(298.15 K) {sd.S298_basis}; enthalpy of formation {sd.dfH_basis}")
    has_fit = any(np.any(v > 0) for v in sq_fit.values())
    # a mixture's figure is an upper estimate where such species give most of it (cp)
    upper = sq_upper > 0.5 * sq["cp"]
    return (_column_parts(sq, props, T, Mk), _column_parts(sq_fit, props, T, Mk) if has_fit else None,
            est, upper, sources)


def _validity(substance, T, P, props, keys):
    """The range of validity of the ideal-gas values at P (statements) and the departure
    bound of each key it applies to (SI), from the second virial coefficient."""
    vir = virial_mixture(substance.components, T)
    if vir is None:
        return [f"{substance.id}: no critical constants for any component (gasdata/critical.toml): "
                f"the real gas's departure from the ideal-gas values is not estimated"], {}
    up = departure_bounds(vir, T, P)
    Mk = substance.M * 1e-3
    cp_m, cv_m, k_ = props["cp_molar"], props["cv_molar"], props["k"]
    dep = {
        "cp_molar": up["cp"], "cv_molar": up["cv"], "h_molar": up["h"], "u_molar": up["u"],
        "s_molar": up["s"], "v": up["Z"] * props["v"], "rho": up["Z"] * props["rho"],
        "k": k_ * (up["cp"] / cp_m + up["cv"] / cv_m),
    }
    dep["a"] = props["a"] * 0.5 * dep["k"] / k_
    for kk in ("cp", "cv", "h", "u", "s"):
        dep[kk] = dep[f"{kk}_molar"] / Mk
    return model_statements(substance, vir, T, P, props), \
        {k: dep[k] for k in keys if k in dep and k not in STANDARD_STATE_KEYS}


def _rounding(u: dict, keys, T, printed_step) -> None:
    """Add the rounding part of each key (in place), from the printed step or from digits_for."""
    printed_step = dict(printed_step or {})
    for k, v in printed_step.items():
        try:
            ok = math.isfinite(float(v)) and float(v) > 0
        except (TypeError, ValueError):
            ok = False
        if not ok:
            raise RangeError(f"uncertainty: printed step of {k!r} is {v!r}; allowed: a positive number (SI)")
    for k in keys:
        # digits follow the data uncertainty (not the composition-dependent part,
        # which differs between users of a table)
        U_now = COVERAGE * np.hypot(u[k]["data"], u[k].get("fit residual", 0.0))
        if k in printed_step:
            step = np.full_like(T, float(printed_step[k]))
        else:
            step = 10.0 ** (-digits_for(U_now).astype(float))
        u[k]["rounding"] = step / (2 * SQRT3)


def budget(substance, T_K, keys=("cp", "h", "s0", "Pr", "vr"), *, P_max_Pa: float = P_STD,
           composition_u: dict | None = None, composition_basis: str = "mole",
           printed_step: dict | None = None, agreement=None, T_rows=None,
           held_out: str | None = None, composition_inputs: dict | None = None) -> Budget:
    """The uncertainty budget of ``substance`` at temperatures ``T_K``.

    Parameters
    ----------
    substance : Substance (datum, P_ref and anchor as printed)
    T_K : temperatures, K (within the data range)
    keys : property keys (see UNITS)
    P_max_Pa : largest pressure the values are used at: sets the validity
        statement and the departure bounds stated beside U (not inside it)
    composition_u : species id -> standard uncertainty of its fraction
    composition_basis : "mole" or "mass": the basis of those fractions
    printed_step : key -> value of one unit of the last printed digit, SI; keys
        absent get the step :func:`digits_for` chooses from the data
        uncertainty (decades of the SI unit)
    agreement : agreement rows to use instead of the shipped ones
    T_rows : printed rows, if the interpolation bound is wanted (default T_K
        when it has at least 2 points)
    held_out : an evaluation left out of the evidence (tablegen.calc.evidence.species_data),
        for a calibration against it
    composition_inputs : input label -> {species id: signed change of its mole
        fraction for one standard uncertainty of that input}, for a composition
        computed from uncertain inputs (a flue gas: tablegen.calc.burn_inputs); each input
        is a component of its own, "composition: LABEL"

    Raises
    ------
    NameLookupError for unknown keys, RangeError for bad pressures, InputError for bad composition entries;
    RangeError for temperatures outside the data range.
    """
    keys = tuple(keys)
    _check_keys(substance, keys)
    T = np.atleast_1d(np.asarray(T_K, float))
    if T.ndim != 1 or T.size == 0:
        raise InputError("uncertainty: T_K must be a non-empty list of temperatures")
    if not (isinstance(P_max_Pa, (int, float)) and math.isfinite(P_max_Pa) and P_max_Pa > 0):
        raise RangeError(f"uncertainty: P_max {P_max_Pa!r} Pa must be a positive number")
    P = float(P_max_Pa)
    props = substance.properties(T, P)
    values = {k: np.asarray(props[k], float) * np.ones_like(T) for k in keys}
    rows = agreement_index() if agreement is None else by_species(tuple(agreement))
    data_u, fit_u, est, upper, sources = _data_parts(substance, T, props, rows, held_out)
    u = {k: {"data": data_u[k]} for k in keys}
    if fit_u is not None:
        for k in keys:
            u[k]["fit residual"] = fit_u[k]

    if composition_u is not None and not isinstance(composition_u, dict):
        raise InputError("uncertainty: composition uncertainties must be a mapping of species to "
                            "standard uncertainties of their fractions, e.g. {'H2O': 0.005}")
    if composition_u:
        comp = composition_sensitivity(substance, T, keys, composition_u, composition_basis, P)
        for k in keys:
            u[k]["composition"] = comp[k]
    for label, dy in (composition_inputs or {}).items():
        part = input_sensitivity(substance, T, keys, dy, P)
        for k in keys:
            u[k][f"composition: {label}"] = part[k]
    _rounding(u, keys, T, printed_step)
    validity, departures = _validity(substance, T, P, props, keys)

    # ---- interpolation (beside U)
    statements = []
    rows_T = T if T_rows is None else np.asarray(T_rows, float)
    inter = {}
    if rows_T.size >= 2 and np.all(np.diff(rows_T) > 0):
        inter = interpolation_bounds(substance, keys, rows_T, P_Pa=P)
    if inter:
        worst = []
        for k in keys:
            b = inter[k]
            unit = "" if UNITS[k] == "1" else f" {UNITS[k]}"
            worst.append(f"{k} {float(np.max(b)):.2g}{unit}")
        statements.append("linear interpolation between adjacent printed rows adds at most: "
                          + "; ".join(worst) + " (largest over the table; per band in the figures)")
    if np.any(est):
        statements.append("figures marked 'estimated' rest on class defaults, not on a comparison of sources")
    if np.any(upper):
        statements.append("figures marked 'upper estimate' rest on the spread against a less accurate "
                          "evaluation, the only one that compares there: the printed values are likely "
                          "better than stated")
    assumptions = _assumptions(P, composition_u, composition_basis, fit_u is not None)
    if composition_inputs:
        assumptions.append("composition from uncertain inputs (" + ", ".join(composition_inputs) + "): each "
                           "input's effect on all mole fractions together, propagated through the combustion "
                           "calculation (JCGM 100:2008, 5.1.2), independent between inputs")
    return Budget(substance.id, T, keys, P, values, u, est, inter, tuple(statements),
                  tuple(assumptions),
                  tuple(sources), validity=tuple(validity), departures=departures, upper=upper)


def _assumptions(P: float, composition_u, composition_basis: str, fit: bool) -> list:
    out = [
        f"expanded uncertainties U with coverage factor k = {COVERAGE:g} (about 95 %), JCGM 100:2008",
        "U covers the data, the composition and the rounding of the printed values only: the values are "
        "those of the ideal gas, and the real gas's departure from them is stated apart, as the range of "
        "validity",
        "within a species the errors of one source are fully correlated across temperature; "
        "between species they are independent: u_mix^2 = sum (y_i u_i)^2",
        "data: the spread against independent evaluations of comparable quality (a band's largest "
        "difference is the half-width of a rectangular distribution); a less accurate evaluation only "
        "where no comparable one compares",
        "CODATA uncertainties are taken as k = 2; a difference of the printed source from the CODATA "
        "value is added as a rectangular half-width",
        "h and s of one species treated as independent in g0 = h - T s0",
        "rounding: half a unit of the last printed digit, rectangular",
        f"range of validity: the real gas's departure at P_max = {P / 1e5:g} bar from the second virial "
        "coefficient (Tsonopoulos 1974), bound = estimate + its expanded uncertainty; it does not apply "
        "to the standard-state functions s0, g0, Pr, vr, dh298",
        "molar-mass and gas-constant uncertainties neglected",
        "these figures state how far the tables can be trusted; they are no design margin: for boilers, "
        "flue gas, toxic, asphyxiant or condensing gases follow local codes and licensed engineering practice",
    ]
    if fit:
        out.insert(3, "fit residual: a refit's stated worst residual against its table, the half-width "
                      "of a rectangular distribution over the fitted range")
    if composition_u:
        out.append(f"composition: the given {composition_basis}-fraction uncertainties are "
                   "independent standard uncertainties; the other fractions renormalised")
    return out


# ------------------------------------------------------------- composition part
def _rebuild(substance, fractions: dict, basis: str):
    from ..thermo.build import mixture_substance
    parts = [(record_for(c.id, c.source), fractions[c.id]) for c in substance.components]
    m = mixture_substance(parts, basis, id=substance.id, name=substance.name, what="uncertainty")
    return m.with_options(datum=substance.datum, P_ref_Pa=substance.P_ref_Pa, anchor=substance.anchor)


def _perturbed(fr: dict, sid: str, delta: float) -> dict:
    out = dict(fr)
    out[sid] = fr[sid] + delta
    tot = sum(out.values())
    return {k: v / tot for k, v in out.items()}


def input_sensitivity(substance, T, keys, dy: dict, P: float = P_STD) -> dict:
    """Standard uncertainty per key from one input that moves all mole fractions together.

    ``dy`` = {species: signed change of its mole fraction for one standard
    uncertainty of the input}; the properties at y + ε dy and y − ε dy give the
    linear change (ε small enough to keep every fraction positive), so
    u = |X(y + ε dy) − X(y − ε dy)| / (2 ε).
    """
    fr = {c.id: c.mole_fraction for c in substance.components}
    bad = [k for k in dy if k not in fr]
    if bad:
        raise NameLookupError(f"uncertainty: {bad[0]!r} is not a component of {substance.id}; "
                            f"allowed: {', '.join(fr)}")
    scale = max((abs(v) / fr[k] for k, v in dy.items() if v), default=0.0)
    if scale == 0.0:
        return {k: np.zeros_like(T) for k in keys}
    eps = min(1.0, 0.5 / scale)

    def at(sign):
        y = {k: v + sign * eps * dy.get(k, 0.0) for k, v in fr.items()}
        tot = sum(y.values())
        return _rebuild(substance, {k: v / tot for k, v in y.items()}, "mole").properties(T, P)
    hi, lo = at(1.0), at(-1.0)
    return {k: np.abs(np.asarray(hi[k], float) - np.asarray(lo[k], float)) / (2 * eps) for k in keys}


def composition_sensitivity(substance, T, keys, composition_u: dict, basis: str = "mole",
                            P: float = P_STD) -> dict:
    """Standard uncertainty per key from fraction uncertainties (linear sensitivity).

    Each listed fraction x_j is moved by ±δ, the fractions renormalised to a sum
    of 1 (so the others scale), the mixture rebuilt and the property evaluated;
    c_j = (X(+δ) - X(-δ)) / (2δ) and u² = Σ (c_j u_j)², the u_j independent.
    """
    if basis not in ("mole", "mass"):
        raise NameLookupError(f"uncertainty: composition basis {basis!r} is not known; allowed: mole, mass")
    fr = {c.id: (c.mole_fraction if basis == "mole" else c.mass_fraction) for c in substance.components}
    out = {k: np.zeros_like(T) for k in keys}
    for sid, uj in composition_u.items():
        if sid not in fr:
            raise NameLookupError(f"uncertainty: {sid!r} is not a component of {substance.id}; "
                                f"allowed: {', '.join(fr)}")
        try:
            uj = float(uj)
        except (TypeError, ValueError):
            raise InputError(f"uncertainty: the uncertainty of {sid!r} is not a number ({uj!r})") from None
        if not (math.isfinite(uj) and 0 <= uj < 1):
            raise RangeError(f"uncertainty: the uncertainty of {sid!r} is {uj!r}; allowed: 0 <= u < 1")
        if uj == 0:
            continue
        d = min(1e-4, 0.5 * fr[sid]) if fr[sid] > 0 else 1e-4
        lo = fr[sid] - d
        hi_p = _rebuild(substance, _perturbed(fr, sid, d), basis).properties(T, P)
        if lo > 0:
            lo_p = _rebuild(substance, _perturbed(fr, sid, -d), basis).properties(T, P)
            span = 2 * d
        else:
            lo_p = substance.properties(T, P)
            span = d
        for k in keys:
            c = (np.asarray(hi_p[k], float) - np.asarray(lo_p[k], float)) / span
            out[k] += (c * uj) ** 2
    return {k: np.sqrt(v) for k, v in out.items()}


# ------------------------------------------------------------- interpolation
def digits_for(U, *, unit_factor: float = 1.0) -> np.ndarray:
    """Decimals to print so that rounding stays below the uncertainty.

    Rule: the last printed digit has the value 10^-d, the largest power of ten
    not above U/2.  Then half a unit of it is at most U/4 (rounding adds at most
    4 % to the combined uncertainty: no thrown-away precision) and more than
    U/40 (at most about one digit inside the uncertainty: no false precision).

    Parameters
    ----------
    U : expanded uncertainty, array_like, in SI
    unit_factor : SI value of one printed unit (e.g. 1000 for kJ/kg), so the
        decimals apply to the printed number

    Returns
    -------
    integer array of decimals (negative: round to tens, hundreds, ...);
    a zero or non-finite U gives 12 decimals (no uncertainty to round to).
    """
    U = np.asarray(U, float) / float(unit_factor)
    with np.errstate(divide="ignore", invalid="ignore"):
        d = -np.floor(np.log10(U / 2.0))
    d = np.where(np.isfinite(d), d, 12.0)
    return np.clip(d, -12, 12).astype(int)


def significant_for(U_rel) -> int:
    """Significant digits to print for a column of relative uncertainty ``U_rel``.

    The rule of :func:`digits_for` for a value printed to a fixed count of
    significant digits (Pr, vr): n = 1 - log10 of the largest power of ten not
    above U_rel/2, taken where U_rel is smallest. A value printed to n digits has
    its last digit at most |value| · 10^(1-n) <= |value| · U_rel/2 = U/2 at every
    row, so no row prints coarser than :func:`digits_for` asks; where the leading
    digit is large, or U_rel larger, the last digit lies at most about one digit
    inside U.

    Parameters
    ----------
    U_rel : expanded uncertainty relative to |value|, array_like (non-finite or
        zero entries are ignored)

    Returns
    -------
    int between 2 and 12 (12 where no finite U_rel is given)
    """
    r = np.asarray(U_rel, float)
    r = r[np.isfinite(r) & (r > 0)]
    if r.size == 0:
        return 12
    n = 1 - int(np.floor(np.log10(float(r.min()) / 2.0)))
    return int(np.clip(n, 2, 12))


# ------------------------------------------------------------ properties hook
def uncertainty_columns(substance, T, P=None) -> dict:
    """U_<key> for every key the budget knows, for ``Substance.properties(uncertainty=True)``."""
    T = np.asarray(T, float)
    flat = T.ravel()
    Pm = P_STD if P is None else float(np.max(P))
    keys = [k for k in UNITS if P is not None or k not in ("s", "s_molar", "v", "rho")]
    order = np.argsort(flat)
    b = budget(substance, flat[order], keys, P_max_Pa=Pm, T_rows=np.array([]))
    inv = np.empty_like(order)
    inv[order] = np.arange(order.size)
    return {f"U_{k}": b.U(k)[inv].reshape(T.shape) for k in keys}