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

from ..constants import P_STD, R_MOLAR, T_REF  # noqa: F401  (re-exported)
from ..errors import RangeError, TablegenError
from .polynomial import Polynomial

#: Relative tolerance of the inverse functions (in T).
INVERSE_RTOL = 1e-10


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
            raise TablegenError(f"enthalpy datum {self.kind!r} is not known; allowed: formation, sensible")
        if not (math.isfinite(self.T_ref_K) and self.T_ref_K > 0):
            raise TablegenError(f"enthalpy datum temperature {self.T_ref_K} K must be above 0 K")

    def describe(self) -> str:
        if self.kind == "formation":
            return "h(298.15 K) = enthalpy of formation (NASA/JANAF convention)"
        return f"h({self.T_ref_K:g} K) = {self.h_ref_J_per_kg / 1000:g} kJ/kg (sensible enthalpy)"


@dataclass(frozen=True, slots=True)
class Anchor:
    """Scale of relative pressure and relative volume: Pr(T_K) = Pr, vr(T_K) = vr."""

    T_K: float = T_REF
    Pr: float = 1.0
    vr: float = 1.0

    def __post_init__(self):
        for name, v in (("temperature", self.T_K), ("Pr", self.Pr), ("vr", self.vr)):
            if not (math.isfinite(v) and v > 0):
                raise TablegenError(f"Pr/vr anchor {name} must be a positive number, got {v}")


@dataclass(frozen=True, slots=True)
class Component:
    id: str
    mole_fraction: float
    mass_fraction: float
    M: float
    source: str


#: Properties that ``T_from`` can invert (all monotonic in T for an ideal gas).
INVERTIBLE = ("h", "u", "s0", "Pr", "vr", "h_molar", "u_molar", "s0_molar")


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
            raise TablegenError(f"reference pressure {P_ref_Pa} Pa must be positive")
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
            return (T < lo) | (T > hi)
        if t_lo >= lo and t_hi <= hi:
            return None
        out = (T < lo) | (T > hi)
        if np.any(out):
            bad = float(T[out].flat[0])
            raise RangeError(
                f"{self.id}: T = {bad:g} K is outside the data range {lo:g}-{hi:g} K; "
                f"allowed: {lo:g} to {hi:g} K, or opt in to extrapolation (--extrapolate), "
                f"which marks every extrapolated value")
        return None

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
                   uncertainty: bool = False) -> dict:
        """All ideal-gas properties at temperatures T (K), optionally at pressures P (Pa).

        Parameters
        ----------
        T : array_like, K
        P : array_like, Pa, optional; adds s, s_molar, v and rho
        extrapolate : evaluate outside the data range with the end intervals;
            adds the boolean array ``extrapolated``
        uncertainty : add U_<key>, the expanded uncertainty (k = 2, same unit as
            <key>) of each key, at the largest P given (else 1 bar); see
            tablegen.uncertainty

        Returns
        -------
        dict of numpy arrays (and scalars M, R): T_K, cp, cv, k, h, u, s0, g0, Pr,
        vr, a (J/kg, J/(kg K), m/s), the same with ``_molar`` (J/mol, J/(mol K)),
        dh298_molar = H(T) - H(298.15 K).

        Raises
        ------
        RangeError for T <= 0 or out of range (unless extrapolating).
        """
        T = np.asarray(T, dtype=float)
        mask = self.check_T(T, extrapolate)
        c = self._constants()
        raw = self.poly.evaluate(T)
        cpR, hR, sR = raw["cp"], raw["h"], raw["s"]
        Mk = self.M * 1e-3
        cp_m = cpR * R_MOLAR
        cv_m = cp_m - R_MOLAR
        h_m = hR * R_MOLAR + c["h_off"]
        u_m = h_m - R_MOLAR * T
        s0_m = (sR - c["lnP"]) * R_MOLAR
        g0_m = h_m - T * s0_m
        lnPr = math.log(self.anchor.Pr) + (sR - c["sR_anchor"])
        Pr = np.exp(lnPr)
        vr = self.anchor.vr * (T / self.anchor.T_K) * np.exp(math.log(self.anchor.Pr) - lnPr)
        k = cp_m / cv_m
        out = {
            "T_K": T,
            "cp_molar": cp_m, "cv_molar": cv_m, "h_molar": h_m, "u_molar": u_m,
            "s0_molar": s0_m, "g0_molar": g0_m,
            "dh298_molar": (hR - c["h298R"]) * R_MOLAR,
            "k": k, "Pr": Pr, "vr": vr,
            "M": self.M, "R": self.R,
        }
        if not molar_only:
            out.update(cp=cp_m / Mk, cv=cv_m / Mk, h=h_m / Mk, u=u_m / Mk, s0=s0_m / Mk,
                       g0=g0_m / Mk, a=np.sqrt(k * self.R * T))
        if P is not None:
            P = np.asarray(P, dtype=float)
            if not np.all(np.isfinite(P)) or np.any(P <= 0):
                raise RangeError(f"{self.id}: pressures must be finite and above 0 Pa")
            s_m = s0_m - R_MOLAR * np.log(P / self.P_ref_Pa)
            out["P_Pa"] = np.broadcast_to(P, np.broadcast_shapes(P.shape, T.shape))
            out["s_molar"] = s_m
            out["s"] = s_m / Mk
            out["v"] = self.R * T / P
            out["rho"] = P / (self.R * T)
        if mask is not None:
            out["extrapolated"] = mask
        if uncertainty:
            from ..uncertainty import uncertainty_columns  # lazy: budgets load more data
            out.update(uncertainty_columns(self, T, P))
        return out

    def cp_h_s0(self, T, *, extrapolate: bool = False):
        """Just cp, h and s° (J/(kg K), J/kg, J/(kg K)) at T: the fast path for bulk work."""
        T = np.asarray(T, dtype=float)
        self.check_T(T, extrapolate)
        c = self._constants()
        raw = self.poly.evaluate(T)
        f = R_MOLAR / (self.M * 1e-3)
        cp = raw["cp"]
        cp *= f
        h = raw["h"]
        h *= f
        h += c["h_off"] / (self.M * 1e-3)
        s0 = raw["s"]
        s0 -= c["lnP"]
        s0 *= f
        return cp, h, s0

    # ------------------------------------------------------------- inverse
    def _target(self, key: str, T: np.ndarray):
        """Monotonic increasing function f(T) for ``key`` and its derivative."""
        p = self.properties(T, extrapolate=True, molar_only=key.endswith("_molar"))
        Mk = 1.0 if key.endswith("_molar") else self.M * 1e-3
        cp = p["cp_molar"] / Mk
        cv = p["cv_molar"] / Mk
        R = R_MOLAR / Mk
        if key in ("h", "h_molar"):
            return p["h_molar"] / Mk, cp
        if key in ("u", "u_molar"):
            return p["u_molar"] / Mk, cv
        if key in ("s0", "s0_molar"):
            return p["s0_molar"] / Mk, cp / T
        if key == "Pr":
            return np.log(p["Pr"]), cp / (R * T)
        if key == "vr":
            return -np.log(p["vr"]), cv / (R * T)
        raise TablegenError(f"cannot solve for T from {key!r}; allowed: {', '.join(INVERTIBLE)}")

    def _grid(self, key: str):
        g = self._cache.get(("grid", key))
        if g is None:
            Tg = np.unique(np.concatenate([
                np.geomspace(self.T_min, self.T_max, 2049), self.poly.T_bounds]))
            f, _ = self._target(key, Tg)
            # Small jumps at breakpoints may break strict monotonicity; keep the
            # running maximum so the bracket search stays valid.
            f = np.maximum.accumulate(f)
            g = (Tg, f)
            self._cache[("grid", key)] = g
        return g

    def T_from(self, key: str, values) -> np.ndarray:
        """Temperature (K) at which property ``key`` takes ``values`` (SI units).

        Newton iterations from an interpolated start, kept inside the bracket
        of the tabulation grid and falling back to bisection; converges to
        1e-10 relative in T or raises.

        Raises
        ------
        RangeError if a value lies outside what the data range gives.
        """
        if key not in INVERTIBLE:
            raise TablegenError(f"cannot solve for T from {key!r}; allowed: {', '.join(INVERTIBLE)}")
        y = np.asarray(values, dtype=float)
        shape = y.shape
        if key == "Pr":
            y = np.log(y) if np.all(y > 0) else _bad_value(self, key, values)
        elif key == "vr":
            y = -np.log(y) if np.all(y > 0) else _bad_value(self, key, values)
        y = y.ravel()
        Tg, fg = self._grid(key)
        if not np.all(np.isfinite(y)) or np.any(y < fg[0] - 1e-12 * abs(fg[0])) or \
                np.any(y > fg[-1] + 1e-12 * abs(fg[-1])):
            lo, hi = self.T_min, self.T_max
            raise RangeError(f"{self.id}: a value of {key} lies outside what the data range "
                             f"{lo:g}-{hi:g} K gives; allowed: values between {key}({lo:g} K) and {key}({hi:g} K)")
        j = np.clip(np.searchsorted(fg, y, side="right") - 1, 0, Tg.size - 2)
        lo, hi = Tg[j].copy(), Tg[j + 1].copy()
        f_lo, f_hi = fg[j], fg[j + 1]
        span = np.where(f_hi > f_lo, f_hi - f_lo, 1.0)
        T = lo + (hi - lo) * np.clip((y - f_lo) / span, 0.0, 1.0)
        for _ in range(60):
            f, df = self._target(key, T)
            r = f - y
            lo = np.where(r < 0, T, lo)
            hi = np.where(r > 0, T, hi)
            with np.errstate(divide="ignore", invalid="ignore"):
                Tn = T - r / df
            outside = ~((Tn > lo) & (Tn < hi)) | ~np.isfinite(Tn)
            Tn = np.where(outside, 0.5 * (lo + hi), Tn)
            step = np.abs(Tn - T)
            T = Tn
            if np.all((step <= INVERSE_RTOL * 0.01 * T) | (hi - lo <= INVERSE_RTOL * T)):
                break
        else:
            raise RangeError(f"{self.id}: T from {key} did not converge (a value may fall in a "
                             f"jump of the data at a breakpoint)")
        return T.reshape(shape)


def _bad_value(sub, key, values):
    raise RangeError(f"{sub.id}: {key} values must be positive")
