"""Ideal-gas substances: one species or a fixed-composition mixture.

Both are one collapsed ``Polynomial`` (molar, 1 bar) plus a molar mass, so every
property costs the same whatever the number of species. The datums and scales
chosen by the user (enthalpy datum, entropy reference pressure, Pr/vr anchor)
are applied here and nowhere else.

Relations used (ideal gas, R the molar gas constant, M the molar mass):
  cv = cp - R;  k = cp/cv;  u = h - R T;  g° = h - T s°;  a = sqrt(k R T / M)
  s(T, P) = s°(T) - R ln(P/P°)
  Pr(T) = Pr_a exp((s°(T) - s°(T_a))/R),  vr(T) = vr_a (T/T_a) (Pr_a/Pr(T))
so that Pr2/Pr1 = P2/P1 and vr2/vr1 = v2/v1 along an isentrope.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

import numpy as np

from ..core.constants import P_STD, R_MOLAR, T_REF
from ..core.errors import DataRangeError, InputError, NameLookupError, RangeError
from .inverse import INVERTIBLE, bad_value, solve
from .polynomial import Polynomial

#: The function that gives U_<key> columns for ``properties(uncertainty=True)``. The
#: budget lives in the calc layer, above this one, so thermo never imports it: the
#: public API registers it (tablegen/calc/names.py) through :func:`use_uncertainty_columns`.
_UNCERTAINTY_COLUMNS: list = []


def use_uncertainty_columns(fn) -> None:
    """Register ``fn(substance, T, P) -> {"U_<key>": array}`` for ``properties(uncertainty=True)``."""
    _UNCERTAINTY_COLUMNS[:] = [fn]


def _uncertainty_columns():
    if not _UNCERTAINTY_COLUMNS:
        raise InputError("uncertainty=True needs the uncertainty budget, which is not registered; "
                         "allowed: use tablegen.substance() or tablegen.mixture(), or call "
                         "tablegen.thermo.substance.use_uncertainty_columns(tablegen.calc.uncertainty."
                         "uncertainty_columns) first")
    return _UNCERTAINTY_COLUMNS[0]


#: Extrapolation reaches at most this factor beyond the data range: from T_min / 2 to
#: 2 T_max (a polynomial fit says nothing further out; docs/spec.md, "extrapolate").
EXTRAPOLATION_FACTOR = 2.0
#: Largest |ln Pr| and |ln vr| given: Pr and vr stay between 1e-300 and 1e300.
LN_SCALE_MAX = 690.0


@dataclass(frozen=True, slots=True)
class Datum:
    """Enthalpy datum.

    kind "formation": h(298.15 K) = enthalpy of formation (NASA/JANAF
    convention, fit for reacting energy balances). kind "sensible":
    h(T_ref_K) = h_ref_J_per_kg (0 unless given).
    """

    kind: str = "formation"
    T_ref_K: float = T_REF
    h_ref_J_per_kg: float = 0.0

    def __post_init__(self):
        if self.kind not in ("formation", "sensible"):
            raise NameLookupError(f"enthalpy datum {self.kind!r} is not known; allowed: formation, sensible")
        if not (math.isfinite(self.T_ref_K) and self.T_ref_K > 0):
            raise RangeError(f"enthalpy datum temperature {self.T_ref_K} K must be above 0 K")

    def describe(self) -> str:
        if self.kind == "formation":
            return "h(298.15 K) = enthalpy of formation (NASA/JANAF convention)"
        return f"h({self.T_ref_K:g} K) = {self.h_ref_J_per_kg / 1000:g} kJ/kg (sensible enthalpy)"


#: Temperature of the sensible datum a substance gets by default, K (0 °C).
SENSIBLE_DATUM_T_K = 273.15


def products_of_combustion(substance) -> bool:
    """True for the products of a combustion, computed or measured (tablegen.calc.burn).

    They are the substances that carry the combustion cautions
    (``Substance.cautions``, which tablegen.calc.burn gives every flue gas it makes
    and no other substance has).
    """
    return bool(getattr(substance, "cautions", ()))


def default_datum(substance=None, *, reacting: bool | None = False, basis: str = "mass") -> Datum:
    """The enthalpy datum a substance gets where the user names none.

    The rule, by what the values are for and what the substance is:

    * ``reacting=False``, nothing reacts in the calculation at hand (``state``,
      ``process``): the sensible datum h = 0 at 0 °C (273.15 K).
    * ``reacting=True``, a reacting energy balance uses these enthalpies
      (``combust``): the formation datum, h(298.15 K) = ΔfH°.
    * ``reacting=None``, a reference table or chart that may serve either (a
      table book, ``tablegen chart``): the sensible datum h = 0 at 0 °C for the
      products of combustion and for values per volume (``basis="volumetric"``),
      the formation datum for every other substance.

    Why: without reaction only differences of h enter an answer (work, heat,
    duty), and h read as the heat content above 0 °C is what a person checks
    against a gauge or a heat balance (air at 15 °C: h = +15.07 kJ/kg rather
    than the -10.05 kJ/kg of the formation datum). In a reacting balance the
    enthalpies of formation must be in h, or the heat of reaction is lost, so a
    table of a fuel, an oxidant or a species keeps them by default. A flue gas
    is already burnt: its table is read for the heat it gives up as it cools,
    and on the formation datum its h would be large and negative (about
    -2630 kJ/kg at 300 K for the flue gas of methane at 15 % excess air), so it gets the sensible
    datum; so do values per normal m³, the heat content of a gas stream in
    boiler practice, and the mean heat capacities from 0 °C that go with them.

    Parameters
    ----------
    substance : the Substance (its kind: :func:`products_of_combustion`)
    reacting : True, False, or None for a reference table or chart (above)
    basis : "mass", "molar" or "volumetric": the basis of the values (reference
        tables only)
    """
    if reacting:
        return Datum("formation")
    if reacting is None and not (basis == "volumetric" or products_of_combustion(substance)):
        return Datum("formation")
    return Datum("sensible", SENSIBLE_DATUM_T_K, 0.0)


@dataclass(frozen=True, slots=True)
class Anchor:
    """Scale of relative pressure and relative volume: Pr(T_K) = Pr, vr(T_K) = vr."""

    T_K: float = T_REF
    Pr: float = 1.0
    vr: float = 1.0

    def __post_init__(self):
        for name, v in (("temperature", self.T_K), ("Pr", self.Pr), ("vr", self.vr)):
            if not (math.isfinite(v) and v > 0):
                raise RangeError(f"Pr/vr anchor {name} must be a positive number, got {v}")


@dataclass(frozen=True, slots=True)
class Component:
    id: str
    mole_fraction: float
    mass_fraction: float
    M: float
    source: str


@dataclass(frozen=True, slots=True, eq=False)
class Substance:
    """An ideal-gas substance with the datums and scales of one table.

    Use :func:`tablegen.substance` or :func:`tablegen.mixture` to make one.
    All properties are SI; mass basis unless the key ends in ``_molar``.
    """

    id: str
    name: str
    kind: str                      # "species" or "mixture"
    M: float                       # g/mol = kg/kmol
    poly: Polynomial               # molar, 1 bar, mixing entropy included
    components: tuple = ()         # Component, for mixtures (and the species itself)
    sources: tuple = ()            # (species id, data set, citation text)
    datum: Datum = Datum()
    P_ref_Pa: float = P_STD
    anchor: Anchor = Anchor()
    mixing_entropy_R: float = 0.0  # -Σ y ln y, already inside poly
    cautions: tuple = ()           # texts every document that shows this substance must print
    dew_point_K: float | None = None     # water dew point at dew_point_P_Pa (mixtures holding H2O), K
    dew_point_P_Pa: float | None = None  # the pressure it is stated at (the gas's stated pressure), Pa
    origin: object = None          # what the substance was made from (e.g. a combustion result), or None
    _cache: dict = field(default_factory=dict, repr=False)

    # --------------------------------------------------------------- options
    def with_options(self, *, datum: Datum | None = None, P_ref_Pa: float | None = None,
                     anchor: Anchor | None = None) -> Substance:
        """The same substance with another datum, reference pressure or anchor."""
        if P_ref_Pa is not None and not (math.isfinite(P_ref_Pa) and P_ref_Pa > 0):
            raise RangeError(f"reference pressure {P_ref_Pa} Pa must be positive")
        return replace(self, datum=datum or self.datum,
                       P_ref_Pa=self.P_ref_Pa if P_ref_Pa is None else float(P_ref_Pa),
                       anchor=anchor or self.anchor, _cache={})

    @property
    def T_min(self) -> float:
        return self.poly.T_min

    @property
    def T_max(self) -> float:
        return self.poly.T_max

    @property
    def R(self) -> float:
        """Specific gas constant, J/(kg K)."""
        return R_MOLAR / (self.M * 1e-3)

    # ----------------------------------------------------------------- checks
    def check_T(self, T: np.ndarray, extrapolate: bool = False) -> np.ndarray | None:
        """Refuse non-positive or (unless extrapolating) out-of-range temperatures.

        Returns the mask of extrapolated points when extrapolating, else None.
        """
        if T.size == 0:
            return np.zeros(T.shape, bool) if extrapolate else None
        t_lo, t_hi = float(T.min()), float(T.max())   # NaN propagates into both
        if not (math.isfinite(t_lo) and math.isfinite(t_hi)) or t_lo <= 0:
            raise RangeError(f"{self.id}: temperatures must be finite and above 0 K")
        lo, hi = self.T_min, self.T_max
        if extrapolate:
            x_lo, x_hi = lo / EXTRAPOLATION_FACTOR, hi * EXTRAPOLATION_FACTOR
            if t_lo < x_lo or t_hi > x_hi:
                bad = t_lo if t_lo < x_lo else t_hi
                raise RangeError(
                    f"{self.id}: T = {bad:g} K is beyond the extrapolation range {x_lo:g}-{x_hi:g} K "
                    f"(data {lo:g}-{hi:g} K); allowed: from half the lowest to twice the highest "
                    f"temperature of the data")
            return (T < lo) | (T > hi)
        if t_lo >= lo and t_hi <= hi:
            return None
        out = (T < lo) | (T > hi)
        if np.any(out):
            bad = float(T[out].flat[0])
            raise DataRangeError(f"{self.id}: T = {bad:g} K is outside the data range {lo:g}-{hi:g} K",
                                 f"{lo:g} to {hi:g} K")
        return None

    def _check_scales(self, ln_lo: float, ln_hi: float, T_lo: float, T_hi: float) -> None:
        """Refuse Pr or vr beyond 1e300 or below 1e-300 (ln Pr from ln_lo to ln_hi at T_lo-T_hi)."""
        a = self.anchor
        base = self._cache.get("ln_vr_base")
        if base is None:
            base = self._cache["ln_vr_base"] = math.log(a.vr) + math.log(a.Pr) - math.log(a.T_K)
        ln_vr = (base + math.log(T_lo) - ln_hi, base + math.log(T_hi) - ln_lo)
        if max(abs(ln_lo), abs(ln_hi), abs(ln_vr[0]), abs(ln_vr[1])) < LN_SCALE_MAX:
            return
        raise RangeError(f"{self.id}: Pr or vr would be beyond 1e300 or below 1e-300 with the anchor Pr = "
                         f"{a.Pr:g}, vr = {a.vr:g} at {a.T_K:g} K; allowed: an anchor that keeps Pr and vr "
                         f"between 1e-300 and 1e300 over the temperatures asked")

    def _check_cv(self, T, cv_m) -> None:
        """Refuse an extrapolation where the polynomial gives cp <= R (cv <= 0), which no gas has."""
        bad = np.asarray(T)[~(np.asarray(cv_m) > 0)]
        if bad.size:
            raise RangeError(f"{self.id}: extrapolated to T = {float(bad.flat[0]):g} K the polynomial gives "
                             f"cp <= R (cv <= 0), which no gas has; allowed: temperatures nearer the data "
                             f"range {self.T_min:g}-{self.T_max:g} K")

    # ------------------------------------------------------------- constants
    def _constants(self):
        c = self._cache.get("const")
        if c is None:
            ref = self.poly.evaluate(np.array([self.datum.T_ref_K, T_REF, self.anchor.T_K]),
                                     want=("h", "s"))
            if self.datum.kind == "formation":
                h_off = 0.0
            else:
                h_off = -ref["h"][0] * R_MOLAR + self.datum.h_ref_J_per_kg * self.M * 1e-3
            c = {"h_off": float(h_off), "h298R": float(ref["h"][1]), "sR_anchor": float(ref["s"][2]),
                 "lnP": math.log(self.P_ref_Pa / P_STD)}
            self._cache["const"] = c
        return c

    # ------------------------------------------------------------- forward
    def properties(self, T, P=None, *, extrapolate: bool = False, molar_only: bool = False,
                   uncertainty: bool = False, keys=None) -> dict:
        """Ideal-gas properties at temperatures T (K), optionally at pressures P (Pa).

        Parameters
        ----------
        T : array_like, K; a plain number takes the one-state path (no arrays made,
            numpy float64 values back)
        P : array_like, Pa, optional; adds s, s_molar, v and rho
        extrapolate : evaluate outside the data range with the end intervals;
            adds the boolean array ``extrapolated``
        uncertainty : add U_<key>, the expanded uncertainty (k = 2, same unit as
            <key>) of each key, at the largest P given (else 1 bar); see
            tablegen.calc.uncertainty
        keys : the keys wanted (default: all); only what they need is evaluated,
            e.g. ``keys=("cp", "h")`` skips the logarithm and the entropy functions

        Returns
        -------
        dict of numpy arrays (and scalars M, R): T_K, cp, cv, k, h, u, s0, g0, Pr,
        vr, a (J/kg, J/(kg K), m/s), the same with ``_molar`` (J/mol, J/(mol K)),
        dh298_molar = H(T) - H(298.15 K); with ``keys``, T_K, M, R and those keys.
        The returned columns are rows of one block of memory (one allocation is much
        faster than twenty): a column kept alone keeps that block alive, so copy it
        (``np.copy``) to keep one column of a large call, or ask for it with ``keys``.

        Raises
        ------
        RangeError for T <= 0 or out of range (unless extrapolating); TablegenError
        for values that are not real numbers or an unknown key.
        """
        if P is None and not uncertainty and keys is None and type(T) in _SCALARS:
            return self._properties_point(float(T), extrapolate, molar_only)
        T = _as_temperatures(T)
        mask = self.check_T(T, extrapolate)
        want = _wanted(keys, P is not None, molar_only)
        funcs = set()
        for key in want:
            funcs.update(_FUNCTIONS.get(key, ""))
        c = self._constants()
        col = _Columns(want, T.shape)
        raw = self.poly.evaluate(T, want=tuple(f for f in ("cp", "h", "s") if f[0] in funcs),
                                 out=col.given({"cp": "cp_molar", "h": "h_molar"})) if funcs else {}
        Mk = self.M * 1e-3
        out = {"T_K": T, "M": self.M, "R": self.R}
        if "c" in funcs:
            cp_m = raw["cp"]
            cp_m *= R_MOLAR
            cv_m = np.subtract(cp_m, R_MOLAR, out=col("cv_molar"))
            if mask is not None and mask.any():
                self._check_cv(T[mask], cv_m[mask])
            k = np.divide(cp_m, cv_m, out=col("k"))
            out.update(cp_molar=cp_m, cv_molar=cv_m, k=k)
            if "cp" in want:
                out["cp"] = np.divide(cp_m, Mk, out=col("cp"))
            if "cv" in want:
                out["cv"] = np.divide(cv_m, Mk, out=col("cv"))
            if "a" in want:
                a = np.multiply(k, self.R, out=col("a"))
                a *= T
                out["a"] = np.sqrt(a, out=a)
        if "h" in funcs:
            hR = raw["h"]
            if "dh298_molar" in want:
                d = np.subtract(hR, c["h298R"], out=col("dh298_molar"))
                d *= R_MOLAR
                out["dh298_molar"] = _set_where(d, T == T_REF, 0.0)
            h_m = hR
            h_m *= R_MOLAR
            h_m += c["h_off"]
            h_m = self._exact_at_datum(T, h_m, self.M * 1e-3)
            out["h_molar"] = h_m
            if want & {"u", "u_molar"}:
                u_m = np.multiply(R_MOLAR, T, out=col("u_molar"))
                u_m = np.subtract(h_m, u_m, out=u_m)
                out["u_molar"] = u_m
                if "u" in want:
                    out["u"] = np.divide(u_m, Mk, out=col("u"))
            if "h" in want:
                out["h"] = np.divide(h_m, Mk, out=col("h"))
        if "s" in funcs:
            self._entropy_columns(out, T, raw["s"], c, want, col)
        if P is not None:
            self._pressure_columns(out, T, P, want)
        if keys is not None:
            out = {k: v for k, v in out.items() if k in want or k in ("T_K", "M", "R")}
        if mask is not None:
            out["extrapolated"] = mask
        if uncertainty:
            out.update(_uncertainty_columns()(self, T, P))
        return out

    def _entropy_columns(self, out: dict, T: np.ndarray, sR, c: dict, want: set, col) -> None:
        """Add s0_molar and the wanted of s0, Pr, vr, g0, g0_molar to ``out`` (sR: s°/R at 1 bar;
        g0 needs h_molar in ``out`` already; ``col``: where the columns go, :class:`_Columns`)."""
        Mk = self.M * 1e-3
        s0_m = np.subtract(sR, c["lnP"], out=col("s0_molar"))
        s0_m *= R_MOLAR
        out["s0_molar"] = s0_m
        if "s0" in want:
            out["s0"] = np.divide(s0_m, Mk, out=col("s0"))
        if want & {"Pr", "vr"}:
            lnPr = sR
            lnPr -= c["sR_anchor"] - math.log(self.anchor.Pr)
            if T.size:
                self._check_scales(float(lnPr.min()), float(lnPr.max()), float(T.min()), float(T.max()))
            at_anchor = T == self.anchor.T_K     # the anchor values exactly, as the datum
            if "Pr" in want:
                out["Pr"] = _set_where(np.exp(lnPr, out=col("Pr")), at_anchor, self.anchor.Pr)
            if "vr" in want:
                vr = np.subtract(math.log(self.anchor.Pr), lnPr, out=col("vr"))
                vr = np.exp(vr, out=vr)
                vr *= T
                vr *= self.anchor.vr / self.anchor.T_K
                out["vr"] = _set_where(vr, at_anchor, self.anchor.vr)
        if want & {"g0", "g0_molar"}:
            g0_m = np.multiply(T, s0_m, out=col("g0_molar"))
            g0_m = np.subtract(out["h_molar"], g0_m, out=g0_m)
            out["g0_molar"] = g0_m
            if "g0" in want:
                out["g0"] = np.divide(g0_m, Mk, out=col("g0"))

    def _pressure_columns(self, out: dict, T: np.ndarray, P, want: set) -> None:
        """Add P_Pa and the wanted of s, s_molar, v, rho at pressures P (Pa) to ``out``."""
        Mk = self.M * 1e-3
        P = _as_numbers(P, f"{self.id}: pressures", "in Pa")
        if not np.all(np.isfinite(P)) or np.any(P <= 0):
            raise RangeError(f"{self.id}: pressures must be finite and above 0 Pa")
        try:
            shape = np.broadcast_shapes(P.shape, T.shape)
        except ValueError:
            raise InputError(f"{self.id}: {P.size} pressures for {T.size} temperatures; give one "
                             f"pressure, or one per temperature") from None
        out["P_Pa"] = np.broadcast_to(P, shape)
        if want & {"s", "s_molar"}:
            s_m = out["s0_molar"] - R_MOLAR * np.log(P / self.P_ref_Pa)
            out["s_molar"] = s_m
            if "s" in want:
                out["s"] = s_m / Mk
        if "v" in want:
            out["v"] = self.R * T / P
        if "rho" in want:
            out["rho"] = P / (self.R * T)

    def _exact_at_datum(self, T: np.ndarray, h, per_kg: float):
        """h at the datum temperature is the datum value by definition: set it exactly,
        not as the difference of two evaluations that the paths (one state, small array,
        blocked) round apart by an ulp of the formation enthalpy. ``per_kg``: kg per unit
        of ``h``'s amount (M/1000 for molar values, 1 for mass values)."""
        if self.datum.kind != "sensible":
            return h
        return _set_where(h, T == self.datum.T_ref_K, self.datum.h_ref_J_per_kg * per_kg)

    def _point_constants(self) -> tuple:
        """(R/M, h offset per kg, ln(P°/1 bar)) for the one-state paths."""
        c = self._cache.get("point")
        if c is None:
            k = self._constants()
            Mk = self.M * 1e-3
            c = (R_MOLAR / Mk, k["h_off"] / Mk, k["lnP"])
            self._cache["point"] = c
        return c

    def _check_point(self, T: float, extrapolate: bool) -> bool:
        """check_T for one temperature; True if it is extrapolated."""
        if not (T > 0 and math.isfinite(T)):
            raise RangeError(f"{self.id}: temperatures must be finite and above 0 K")
        outside = T < self.poly._lo or T > self.poly._hi
        if outside:
            self.check_T(np.array([T]), extrapolate)   # raises the usual message, or beyond the extrapolation range
        return outside

    def _properties_point(self, T: float, extrapolate: bool, molar_only: bool) -> dict:
        """properties() of one temperature given as a plain number: the same keys, the
        values as numpy float64 scalars, computed without arrays."""
        outside = self._check_point(T, extrapolate)
        c = self._constants()
        cpR, hR, sR = self.poly.point(T)
        Mk = self.M * 1e-3
        cp_m = cpR * R_MOLAR
        cv_m = cp_m - R_MOLAR
        h_m = hR * R_MOLAR + c["h_off"]
        if self.datum.kind == "sensible" and T == self.datum.T_ref_K:
            h_m = self.datum.h_ref_J_per_kg * Mk
        u_m = h_m - R_MOLAR * T
        s0_m = (sR - c["lnP"]) * R_MOLAR
        g0_m = h_m - T * s0_m
        lnPr = math.log(self.anchor.Pr) + (sR - c["sR_anchor"])
        self._check_scales(lnPr, lnPr, T, T)
        if outside:
            self._check_cv(T, cv_m)
        k = cp_m / cv_m
        vals = {
            "T_K": T, "cp_molar": cp_m, "cv_molar": cv_m, "h_molar": h_m, "u_molar": u_m,
            "s0_molar": s0_m, "g0_molar": g0_m,
            "dh298_molar": 0.0 if T == T_REF else (hR - c["h298R"]) * R_MOLAR,
            "k": k,
            "Pr": self.anchor.Pr if T == self.anchor.T_K else math.exp(lnPr),
            "vr": self.anchor.vr if T == self.anchor.T_K else
            self.anchor.vr * (T / self.anchor.T_K) * math.exp(math.log(self.anchor.Pr) - lnPr),
        }
        if not molar_only:
            vals.update(cp=cp_m / Mk, cv=cv_m / Mk, h=h_m / Mk, u=u_m / Mk, s0=s0_m / Mk, g0=g0_m / Mk,
                        a=math.sqrt(k * self.R * T))
        out = {key: np.float64(v) for key, v in vals.items()}
        out["M"] = self.M
        out["R"] = self.R
        if extrapolate:
            out["extrapolated"] = np.bool_(outside)
        return out

    def cp_h_s0(self, T, *, extrapolate: bool = False):
        """Just cp, h and s° (J/(kg K), J/kg, J/(kg K)) at T: the fast path for bulk work.

        For one temperature given as a plain number the three values come back as
        floats, computed without arrays (about 1 µs a call: a program asking for one
        state at a time pays no array overhead).
        """
        if type(T) in _SCALARS:
            T = float(T)
            poly = self.poly
            if not poly._lo <= T <= poly._hi:     # also true for NaN
                self._check_point(T, extrapolate)
            cpR, hR, sR = poly.point(T)
            f, h_off, lnP = self._point_constants()
            h = hR * f + h_off
            if self.datum.kind == "sensible" and T == self.datum.T_ref_K:
                h = self.datum.h_ref_J_per_kg
            return cpR * f, h, (sR - lnP) * f
        T = _as_temperatures(T)
        self.check_T(T, extrapolate)
        c = self._constants()
        raw = self.poly.evaluate(T)
        f = R_MOLAR / (self.M * 1e-3)
        cp = raw["cp"]
        cp *= f
        h = raw["h"]
        h *= f
        h += c["h_off"] / (self.M * 1e-3)
        h = self._exact_at_datum(T, h, 1.0)
        s0 = raw["s"]
        s0 -= c["lnP"]
        s0 *= f
        return cp, h, s0

    # ------------------------------------------------------------- inverse
    def T_from(self, key: str, values, *, report: bool = False):
        """Temperature (K) at which property ``key`` takes ``values`` (SI units).

        The start is the cubic Hermite interpolant of the inverse function T(f) on a
        tabulation uniform in f (4096 cells, error about 1e-12 relative), then Newton steps,
        each kept inside the bracket of its grid cell with a bisection fallback. A point
        leaves the iteration once its step is below 1e-11 of T; the result is within
        1e-10 relative in T or the call raises. Usually one Newton pass finishes every
        point.

        Parameters
        ----------
        key : one of INVERTIBLE (h, u, s0, Pr, vr and the _molar forms of h, u, s0)
        values : array_like, in the SI unit of ``key``
        report : also return an :class:`InverseReport` (passes, points still
            iterating after each pass, largest last step)

        Raises
        ------
        RangeError if a value lies outside what the data range gives, or the
        iteration does not converge.
        """
        if key not in INVERTIBLE:
            raise NameLookupError(f"cannot solve for T from {key!r}; allowed: {', '.join(INVERTIBLE)}")
        y = _as_numbers(values, f"{self.id}: values of {key}", "in SI units")
        if key == "Pr":
            y = np.log(y) if np.all(y > 0) else bad_value(self, key, values)
        elif key == "vr":
            y = -np.log(y) if np.all(y > 0) else bad_value(self, key, values)
        return solve(self, key, y, report=report)


#: Keys of properties() without pressures, and whether each is molar.
_PROPERTY_KEYS = ("cp_molar", "cv_molar", "h_molar", "u_molar", "s0_molar", "g0_molar", "dh298_molar",
                  "k", "Pr", "vr", "cp", "cv", "h", "u", "s0", "g0", "a")
_IS_MOLAR = {k: k.endswith("_molar") or k in ("k", "Pr", "vr") for k in _PROPERTY_KEYS}
#: The polynomial functions each key needs: c(p), h, s.
_FUNCTIONS = {"cp_molar": "c", "cv_molar": "c", "k": "c", "cp": "c", "cv": "c", "a": "c",
              "h_molar": "h", "u_molar": "h", "dh298_molar": "h", "h": "h", "u": "h",
              "s0_molar": "s", "s0": "s", "Pr": "s", "vr": "s", "s_molar": "s", "s": "s",
              "g0_molar": "hs", "g0": "hs"}

#: Types taken as one temperature by the no-array paths (a 0-d array is not among them).
_SCALARS = (float, int, np.float64, np.float32, np.int64, np.int32)


def _wanted(keys, with_P: bool, molar_only: bool) -> set:
    """The keys properties() returns: all (or the molar ones), or those asked, checked."""
    if keys is None:
        want = set(_PROPERTY_KEYS) if not molar_only else {k for k in _PROPERTY_KEYS if _IS_MOLAR[k]}
        if with_P:
            want |= {"s", "s_molar", "v", "rho", "P_Pa"} if not molar_only else {"s_molar", "P_Pa"}
        return want
    want = set(keys)
    unknown = want - set(_PROPERTY_KEYS) - {"s", "s_molar", "v", "rho", "P_Pa", "T_K"}
    if unknown:
        raise NameLookupError(f"unknown property key {sorted(unknown)[0]!r}; allowed: "
                              + ", ".join(_PROPERTY_KEYS) + ", s, s_molar, v, rho (with P)")
    if not with_P and want & {"s", "s_molar", "v", "rho", "P_Pa"}:
        raise InputError("keys s, s_molar, v, rho need pressures P")
    return want


class _Columns:
    """Where properties() puts its columns: the keys it returns as rows of one block (one
    allocation, freed as one: a script's allocator then keeps the block's pages between
    calls instead of handing them back to the system, which cost half of a large call);
    anything else (a column only computed on the way) in an array of its own, so a kept
    column never holds more than the columns returned with it."""

    __slots__ = ("rows", "shape")

    def __init__(self, want, shape):
        keys = sorted(set(want) & _BLOCK_KEYS)
        self.shape = shape
        self.rows = dict(zip(keys, np.empty((len(keys), *shape)))) if keys and shape else {}

    def __call__(self, key: str) -> np.ndarray:
        r = self.rows.get(key)
        return r if r is not None else np.empty(self.shape)

    def given(self, names: dict) -> dict:
        """The rows for evaluation results that are returned as they are ({result: key})."""
        return {f: self.rows[k] for f, k in names.items() if k in self.rows}


#: Columns of properties() computed into rows of its block.
_BLOCK_KEYS = frozenset(("cp_molar", "cv_molar", "k", "cp", "cv", "a", "dh298_molar", "h_molar", "u_molar",
                         "h", "u", "s0_molar", "s0", "Pr", "vr", "g0_molar", "g0"))


def _set_where(a, mask, value):
    """a with ``value`` where ``mask``; also for the numpy scalars that 0-d arithmetic gives."""
    if np.ndim(a) == 0:
        return np.float64(value) if bool(mask) else a
    a[mask] = value
    return a


def _as_numbers(values, what: str, unit: str) -> np.ndarray:
    """values as a float array; text, complex numbers and other non-numbers are refused."""
    try:
        arr = np.asarray(values)
    except (TypeError, ValueError):
        raise InputError(f"{what} must be real numbers {unit}") from None
    if arr.dtype.kind not in "biuf":
        raise InputError(f"{what} must be real numbers {unit}, got {arr.dtype.name} values"
                            + (" (give numbers, e.g. 300.0, not text)" if arr.dtype.kind in "USO" else ""))
    return arr.astype(float, copy=False)


def _as_temperatures(T) -> np.ndarray:
    return _as_numbers(T, "temperatures", "in K")
