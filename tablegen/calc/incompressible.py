"""Incompressible substances for the process steps: specific heat c(T) and one density.

The shipped entries of gasdata/incompressible.toml, the inline spec
``c=4.18,rho=998[,T=278K:323K]`` and user files; the steps themselves are in
:mod:`tablegen.calc.steps`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache
from types import MappingProxyType

import numpy as np

from ..thermo.inverse import INVERSE_RTOL   # the incompressible inverse T(u) meets the gas one's tolerance
from ..core.errors import DataError, InputError, NameLookupError, RangeError
from ..core.constants import T_REF



@dataclass(frozen=True, slots=True, eq=False)
class Incompressible:
    """A liquid or solid with specific heat c(T) and one density.

    c(T) = Σ c_J_per_kgK[i] (T/K)^i, J/(kg K); v = 1/rho. Datum: u = 0 and
    s = 0 at ``T_ref_K``; h = u + P v.

    Relations (incompressible substance, common practice):
    du = c dT, dh = c dT + v dP, ds = c dT / T.
    """

    id: str
    name: str
    c_J_per_kgK: tuple
    rho_kg_per_m3: float
    T_min: float = 0.0
    T_max: float = math.inf
    T_ref_K: float = T_REF
    source: str = "user input"
    source_note: str = ""
    kind: str = "incompressible"

    def __post_init__(self):
        c = tuple(float(x) for x in self.c_J_per_kgK)
        if not c or not all(math.isfinite(x) for x in c):
            raise InputError(f"{self.id}: specific heat c needs one or more finite coefficients")
        object.__setattr__(self, "c_J_per_kgK", c)
        if not (math.isfinite(self.rho_kg_per_m3) and self.rho_kg_per_m3 > 0):
            raise RangeError(f"{self.id}: density must be a positive number of kg/m³, "
                             f"got {self.rho_kg_per_m3}")
        if not (self.T_min >= 0 and self.T_max > self.T_min):
            raise RangeError(f"{self.id}: temperature range {self.T_min:g}-{self.T_max:g} K "
                             f"is empty; give lo < hi, both above 0 K")
        if not (math.isfinite(self.T_ref_K) and self.T_ref_K > 0):
            raise RangeError(f"{self.id}: datum temperature must be above 0 K")

    @property
    def v(self) -> float:
        return 1.0 / self.rho_kg_per_m3

    def c(self, T):
        return np.polynomial.polynomial.polyval(np.asarray(T, float), self.c_J_per_kgK)

    def _int_c(self, T):
        """Antiderivative of c: Σ a_i T^(i+1)/(i+1)."""
        a = self.c_J_per_kgK
        return np.polynomial.polynomial.polyval(np.asarray(T, float),
                                                (0.0, *(ai / (i + 1) for i, ai in enumerate(a))))

    def _int_c_over_T(self, T):
        """Antiderivative of c/T: a0 ln T + Σ_{i>=1} a_i T^i / i."""
        a = self.c_J_per_kgK
        T = np.asarray(T, float)
        rest = np.polynomial.polynomial.polyval(T, (0.0, *(ai / i for i, ai in enumerate(a) if i)))
        return a[0] * np.log(T) + rest

    def check_T(self, T, what: str = "temperature"):
        T = np.asarray(T, float)
        if not np.all(np.isfinite(T)) or np.any(T <= 0):
            raise RangeError(f"{self.id}: {what} must be finite and above 0 K")
        out = (T < self.T_min * (1 - 1e-12)) | (T > self.T_max * (1 + 1e-12))
        if np.any(out):
            bad = float(T[out].flat[0])
            raise RangeError(f"{self.id}: {what} {bad:g} K is outside the range of its specific heat, "
                             f"{self.T_min:g}-{self.T_max:g} K; allowed: temperatures in that range")

    def check_c_positive(self, Ta, Tb):
        """Refuse a path on which the user's c(T) is not positive (its inverse would fail)."""
        lo = np.minimum(Ta, Tb)
        hi = np.maximum(Ta, Tb)
        x = np.linspace(0.0, 1.0, 33)
        Tg = lo[..., None] + (hi - lo)[..., None] * x
        if np.any(self.c(Tg) <= 0):
            raise RangeError(f"{self.id}: the specific heat c(T) is not positive between "
                             f"{float(np.min(lo)):g} and {float(np.max(hi)):g} K; allowed: c > 0")

    def properties(self, T, P) -> dict:
        """c, u, h, s, v, rho at T (K) and P (Pa); SI, mass basis."""
        T = np.asarray(T, float)
        P = np.asarray(P, float)
        self.check_T(T)
        u = self._int_c(T) - self._int_c(self.T_ref_K)
        s = self._int_c_over_T(T) - self._int_c_over_T(self.T_ref_K)
        shape = np.broadcast_shapes(T.shape, P.shape)
        return {"T_K": np.broadcast_to(T, shape), "c": np.broadcast_to(self.c(T), shape),
                "u": np.broadcast_to(u, shape), "h": u + P * self.v, "s": np.broadcast_to(s, shape),
                "v": np.full(shape, self.v), "rho": np.full(shape, self.rho_kg_per_m3)}

    def T_from_u(self, u, T_start) -> np.ndarray:
        """Temperature at internal energy u (J/kg); Newton inside a bracket, or raise."""
        u = np.asarray(u, float)
        T = np.array(np.broadcast_to(np.asarray(T_start, float), u.shape), dtype=float)
        target = u + self._int_c(self.T_ref_K)
        lo = np.full(u.shape, max(self.T_min, 1e-6))
        hi = np.full(u.shape, min(self.T_max, 1e6))
        f_lo = self._int_c(lo) - target
        f_hi = self._int_c(hi) - target
        if np.any(f_lo > 0) or np.any(f_hi < 0):
            raise RangeError(f"{self.id}: the end state lies outside the range of its specific heat, "
                             f"{self.T_min:g}-{self.T_max:g} K; allowed: steps that end in that range")
        for _ in range(100):
            r = self._int_c(T) - target
            lo = np.where(r < 0, T, lo)
            hi = np.where(r > 0, T, hi)
            with np.errstate(divide="ignore", invalid="ignore"):
                Tn = T - r / self.c(T)
            bad = ~((Tn > lo) & (Tn < hi)) | ~np.isfinite(Tn)
            Tn = np.where(bad, 0.5 * (lo + hi), Tn)
            step = np.abs(Tn - T)
            T = Tn
            if np.all((step <= INVERSE_RTOL * 0.01 * T) | (hi - lo <= INVERSE_RTOL * T)):
                return T
        raise RangeError(f"{self.id}: end temperature did not converge; check that c(T) > 0 on the path")

    def describe(self) -> str:
        c = self.c_J_per_kgK
        if len(c) == 1:
            ctext = f"c = {c[0] / 1000:g} kJ/(kg K)"
        else:
            ctext = "c(T) polynomial of degree " + str(len(c) - 1)
        rng = "" if math.isinf(self.T_max) else f", {self.T_min:g}-{self.T_max:g} K"
        return f"{ctext}, rho = {self.rho_kg_per_m3:g} kg/m³{rng}"


@lru_cache(maxsize=None)
def shipped_incompressibles() -> MappingProxyType:
    """Entries of gasdata/incompressible.toml: normalised name -> Incompressible."""
    from ..data.library import gasdata_dir
    path = gasdata_dir() / "incompressible.toml"
    return MappingProxyType(_read_entries(path))


def _norm(name: str) -> str:
    return "".join(ch for ch in name.lower() if ch.isalnum())


def _read_entries(path) -> dict:
    from ..core import tomlread
    raw = tomlread.read(path, str(path))
    out = {}
    for i, e in enumerate(raw.get("incompressible", [])):
        where = f"{path}: incompressible[{i}]"
        try:
            lo, hi = (float(x) for x in e["T_range_K"])
            ent = Incompressible(id=str(e["id"]), name=str(e.get("name", e["id"])),
                                 c_J_per_kgK=tuple(e["c_J_per_kgK"]),
                                 rho_kg_per_m3=float(e["density_kg_per_m3"]), T_min=lo, T_max=hi,
                                 T_ref_K=float(e.get("T_ref_K", T_REF)),
                                 source=str(e.get("source", "")), source_note=str(e.get("source_note", "")))
        except (KeyError, TypeError, ValueError) as x:
            raise DataError(f"{where}: needs id, T_range_K = [lo, hi], c_J_per_kgK = [...] and "
                            f"density_kg_per_m3 ({x})") from None
        for n in (ent.id, ent.name, *e.get("aliases", [])):
            out.setdefault(_norm(n), ent)
    if not out:
        raise DataError(f"{path}: no [[incompressible]] entries found")
    return out


def parse_incompressible(text: str) -> Incompressible:
    """Inline spec 'c=4.18,rho=998[,T=278K:323K]' (c in kJ/(kg K)).

    c may be a polynomial in T/K given as coefficients separated by ':'
    (c = a0 + a1 T + a2 T² ..., kJ/(kg K)); rho in kg/m³; T the range of c.
    """
    from ..core.units import temperature_K
    vals = {}
    for part in text.split(","):
        if "=" not in part:
            raise InputError(f"incompressible {text!r}: write c=4.18,rho=998 "
                             f"(c in kJ/(kg K), rho in kg/m³), optionally T=LO:HI")
        k, v = (x.strip() for x in part.split("=", 1))
        if k in vals:
            raise InputError(f"incompressible {text!r}: {k} given twice")
        vals[k] = v
    unknown = set(vals) - {"c", "rho", "T"}
    if unknown:
        raise NameLookupError(f"incompressible {text!r}: unknown key {sorted(unknown)[0]!r}; allowed: c, rho, T")
    if "c" not in vals or "rho" not in vals:
        raise InputError(f"incompressible {text!r}: give both c (kJ/(kg K)) and rho (kg/m³)")
    try:
        c = tuple(float(x) * 1000.0 for x in vals["c"].split(":"))
        rho = float(vals["rho"])
    except ValueError:
        raise InputError(f"incompressible {text!r}: c and rho must be numbers "
                         f"(c a0[:a1:a2...] in kJ/(kg K) with T in K)") from None
    lo, hi = 0.0, math.inf
    if "T" in vals:
        ends = vals["T"].split(":")
        if len(ends) != 2:
            raise InputError(f"incompressible {text!r}: range T=LO:HI, e.g. T=278K:323K")
        lo, hi = (temperature_K(x, "incompressible range") for x in ends)
    ent = Incompressible(id="incompressible", name="user incompressible substance", c_J_per_kgK=c,
                         rho_kg_per_m3=rho, T_min=lo, T_max=hi, source="user input")
    if math.isinf(hi) and len(c) == 1 and not c[0] > 0:
        raise RangeError(f"incompressible {text!r}: c must be positive")
    return ent


def _from_file(text: str) -> Incompressible:
    """'PATH.toml' (one entry) or 'PATH.toml:NAME', in the format of gasdata/incompressible.toml."""
    from pathlib import Path
    path, _, name = text.partition(".toml:")
    path = Path(path if text.endswith(".toml") and not name else path + ".toml")
    if not path.is_file():
        raise InputError(f"incompressible file {str(path)!r} does not exist")
    entries = _read_entries(path)
    ids = sorted({e.id for e in entries.values()})
    if not name:
        if len(ids) != 1:
            raise InputError(f"{path} holds {len(ids)} entries; name one as {path}:NAME; "
                             f"allowed: {', '.join(ids)}")
        return next(iter(entries.values()))
    ent = entries.get(_norm(name))
    if ent is None:
        raise NameLookupError(f"{path}: no incompressible entry {name!r}; allowed: {', '.join(ids)}")
    return ent


def incompressible(name_or_spec: str) -> Incompressible:
    """An incompressible substance by name, inline spec or file.

    'water-liquid' or an alias ('water', 'ice'): a shipped entry of
    gasdata/incompressible.toml; 'c=4.18,rho=998': inline (see
    :func:`parse_incompressible`); 'PATH.toml' or 'PATH.toml:NAME': a user file
    of ``[[incompressible]]`` tables in the shipped format.
    """
    text = str(name_or_spec).strip()
    if "=" in text:
        return parse_incompressible(text)
    if text.endswith(".toml") or ".toml:" in text:
        return _from_file(text)
    table = shipped_incompressibles()
    ent = table.get(_norm(text))
    if ent is None:
        ids = sorted({e.id for e in table.values()})
        raise NameLookupError(f"incompressible substance {text!r} is not shipped; allowed: "
                              f"{', '.join(ids)}, or an inline spec c=4.18,rho=998")
    return ent

