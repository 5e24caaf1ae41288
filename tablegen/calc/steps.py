"""Process steps: the end state of one state change, with work, heat and entropy.

``process(substance, T1_K, P1_Pa, step, **params)`` takes an ideal gas (a
:class:`~tablegen.thermo.substance.Substance`) or an :class:`Incompressible`
substance from a start state through one step and returns a
:class:`ProcessResult`. Every input broadcasts, so an array of start states is
one call and no Python loop.

Steps and their parameters (SI units):

========== =============================== =========== ==========================
step       parameters                      basis       energy balance
========== =============================== =========== ==========================
compress   P2_Pa or ratio (P2/P1), eta     steady flow w = h2 - h1, q = 0
expand     P2_Pa or ratio (P1/P2), eta     steady flow w = h2 - h1, q = 0
heat_p     T2_K or q_J_per_kg,             steady flow q = h2 - h1, w = 0
           T_boundary_K
heat_v     T2_K or q_J_per_kg,             closed,     q = u2 - u1, w = 0
           T_boundary_K                    rigid
throttle   P2_Pa                           steady flow h2 = h1, w = q = 0
========== =============================== =========== ==========================

Work and heat are per kg of substance, positive into it; kinetic and potential
energy changes are neglected (common practice for machine and heater checks).

Ideal gas (relations of ``Substance``): the isentropic end state follows from
the relative pressure, Pr(T2s) = Pr(T1) P2/P1, which holds exactly because
s(T, P) = s°(T) - R ln(P/P°); the actual end state of a machine with
isentropic efficiency eta follows from the enthalpy,

    compression:  h2 = h1 + (h2s - h1)/eta,   expansion:  h2 = h1 + eta (h2s - h1).

Incompressible substance (specific heat c(T), one density rho, v = 1/rho):
u2 - u1 = ∫c dT, h2 - h1 = ∫c dT + v (P2 - P1), s2 - s1 = ∫c/T dT; the
isentropic end state of a pump or hydraulic turbine keeps T, so
w_s = v (P2 - P1).

Entropy generated: for adiabatic steps s_gen = s2 - s1. For heating and
cooling steps s_gen = s2 - s1 - q/T_boundary when the temperature at which the
heat crosses the boundary (a furnace, a cooling-water bath) is given, and 0
otherwise (heat taken in at the substance's own temperature along the path,
an internally reversible step).

Every result carries a method comparison: the entropy change by the exact
s°(T) (or ∫c/T dT) against constant cp taken at 298.15 K and at the mean
temperature, and for the machine steps of an ideal gas the isentropic end
temperature and the work by the exact relative-pressure route against the
constant-k power law T2s = T1 (P2/P1)^((k-1)/k) with k at 298.15 K, at T1 and
at the mean temperature (iterated); each with its error against the exact
value.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import lru_cache
from types import MappingProxyType

import numpy as np

from ..core.errors import DataError, InputError, NameLookupError, RangeError
from ..thermo.substance import T_REF, Substance

__all__ = ["process", "ProcessResult", "Estimate", "Incompressible", "incompressible",
           "shipped_incompressibles", "parse_incompressible", "STEPS", "MIXING_NOTE"]

#: step -> (parameters allowed, description)
STEPS = MappingProxyType({
    "compress": (("P2_Pa", "ratio", "eta"), "compression (steady flow, adiabatic)"),
    "expand": (("P2_Pa", "ratio", "eta"), "expansion (steady flow, adiabatic)"),
    "heat_p": (("T2_K", "q_J_per_kg", "T_boundary_K"), "heating or cooling at constant pressure (steady flow)"),
    "heat_v": (("T2_K", "q_J_per_kg", "T_boundary_K"), "heating or cooling at constant volume (closed, rigid)"),
    "throttle": (("P2_Pa",), "throttling (steady flow, adiabatic, no work)"),
})

#: True of every mixture, so not among a result's notes: the commands show it on request (--verbose).
MIXING_NOTE = ("mixture s° includes the ideal mixing term -R Σ y ln y "
               "(it cancels in s2 - s1 at fixed composition)")

#: Relative tolerance of the fixed-point iteration of the power law with k at the mean temperature.
MEAN_K_RTOL = 1e-12
#: Relative tolerance of the incompressible inverse T(u), like Substance.T_from.
INVERSE_RTOL = 1e-10


# --------------------------------------------------------------------- results
@dataclass(frozen=True, slots=True)
class Estimate:
    """One quantity by one method, with its error against the exact method.

    ``error`` = value - exact (same unit as value); ``rel_error`` = error/|exact|
    where the exact value is not zero to round-off, else NaN.
    """

    quantity: str        # "ds", "T2s", "w", "q", "T2"
    method: str          # "exact", "cp_298", "cp_mean", "k_298", "k_T1", "k_mean"
    label: str           # how a reader sees the method
    unit: str            # SI unit of value and error
    value: np.ndarray
    error: np.ndarray
    rel_error: np.ndarray
    parameter: np.ndarray | None = None      # the cp or k the method used
    parameter_name: str = ""                 # "cp", "k", "c", "cv"


@dataclass(frozen=True, slots=True)
class ProcessResult:
    """End state, energies and entropy of one process step (SI, mass basis).

    All arrays have the broadcast shape of the inputs. ``T2s_K`` and ``h2s``
    are None where no isentropic end state applies (heating, throttling).
    Per-kmol values: multiply by ``M`` (kg/kmol), or use the ``*_per_kmol``
    properties.
    """

    substance_id: str
    substance_name: str
    kind: str                    # "ideal gas" or "incompressible"
    step: str
    basis: str                   # "steady flow" or "closed"
    M: float | None              # kg/kmol (None for an incompressible substance)
    T1_K: np.ndarray
    P1_Pa: np.ndarray
    v1: np.ndarray
    h1: np.ndarray
    u1: np.ndarray
    s1: np.ndarray
    T2_K: np.ndarray
    P2_Pa: np.ndarray
    v2: np.ndarray
    h2: np.ndarray
    u2: np.ndarray
    s2: np.ndarray
    T2s_K: np.ndarray | None
    h2s: np.ndarray | None
    eta: np.ndarray | None
    w_J_per_kg: np.ndarray
    q_J_per_kg: np.ndarray
    ds_J_per_kgK: np.ndarray
    s_gen_J_per_kgK: np.ndarray
    s_gen_basis: str
    comparison: MappingProxyType = field(default_factory=lambda: MappingProxyType({}))
    notes: tuple = ()
    Pr1: np.ndarray | None = None        # relative pressure and volume (ideal gas only),
    Pr2: np.ndarray | None = None        # on the substance's anchor scale
    vr1: np.ndarray | None = None
    vr2: np.ndarray | None = None

    @property
    def w_J_per_kmol(self):
        return None if self.M is None else self.w_J_per_kg * self.M

    @property
    def q_J_per_kmol(self):
        return None if self.M is None else self.q_J_per_kg * self.M

    @property
    def ds_J_per_kmolK(self):
        return None if self.M is None else self.ds_J_per_kgK * self.M

    @property
    def s_gen_J_per_kmolK(self):
        return None if self.M is None else self.s_gen_J_per_kgK * self.M


# ---------------------------------------------------------- incompressible
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


# ------------------------------------------------------------------ helpers
def _arr(x, what: str) -> np.ndarray:
    try:
        a = np.asarray(x, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"{what} must be a number or an array of numbers") from None
    if not np.all(np.isfinite(a)):
        raise RangeError(f"{what} must be finite")
    return a


def _rel(err, exact, floor):
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(np.abs(exact) > floor, err / np.abs(exact), np.nan)


def _estimate(quantity, method, label, unit, value, exact, floor, parameter=None, pname=""):
    value = np.asarray(value, float)
    err = value - exact
    return Estimate(quantity, method, label, unit, value, err, _rel(err, exact, floor),
                    None if parameter is None else np.asarray(parameter, float), pname)


def _check_params(step: str, params: dict) -> None:
    if step not in STEPS:
        raise NameLookupError(f"unknown process step {step!r}; allowed: {', '.join(STEPS)}")
    allowed = STEPS[step][0]
    extra = sorted(set(params) - set(allowed))
    if extra:
        raise NameLookupError(f"step {step!r} takes no parameter {extra[0]!r}; allowed: {', '.join(allowed)}")
    given = {k for k, v in params.items() if v is not None}
    pairs = {"compress": ("P2_Pa", "ratio"), "expand": ("P2_Pa", "ratio"),
             "heat_p": ("T2_K", "q_J_per_kg"), "heat_v": ("T2_K", "q_J_per_kg"), "throttle": ("P2_Pa",)}
    need = pairs[step]
    n = sum(1 for k in need if k in given)
    if n != 1:
        which = " or ".join(need)
        raise InputError(f"step {step!r} needs {'exactly one of ' if len(need) > 1 else ''}{which}"
                         f"{'; got both' if n > 1 else ''}")


def _eta(params) -> np.ndarray:
    eta = _arr(1.0 if params.get("eta") is None else params["eta"], "isentropic efficiency eta")
    if np.any(eta <= 0) or np.any(eta > 1):
        bad = float(eta[(eta <= 0) | (eta > 1)].flat[0])
        raise RangeError(f"isentropic efficiency eta = {bad:g} is not allowed; allowed: 0 < eta <= 1")
    return eta


def _end_pressure(step, P1, params) -> np.ndarray:
    if params.get("ratio") is not None:
        r = _arr(params["ratio"], "pressure ratio")
        if np.any(r <= 0):
            raise RangeError(f"pressure ratio {float(r[r <= 0].flat[0]):g} is not allowed; "
                             f"allowed: a ratio above 0 (compress: P2/P1 >= 1, expand: P1/P2 >= 1)")
        P2 = P1 * r if step == "compress" else P1 / r
    else:
        P2 = _arr(params["P2_Pa"], "end pressure P2")
        if np.any(P2 <= 0):
            raise RangeError("end pressure must be above 0 Pa (absolute pressure)")
    P2 = np.broadcast_to(P2, np.broadcast_shapes(np.shape(P1), np.shape(P2)))
    if step == "compress" and np.any(P2 < P1 * (1 - 1e-15)):
        raise RangeError("compress: the end pressure is below the start pressure; allowed: P2 >= P1 "
                         "(ratio >= 1); use expand for a pressure drop through a machine")
    if step == "expand" and np.any(P2 > P1 * (1 + 1e-15)):
        raise RangeError("expand: the end pressure is above the start pressure; allowed: P2 <= P1 "
                         "(ratio >= 1, the ratio being P1/P2); use compress to raise the pressure")
    if step == "throttle" and np.any(P2 > P1 * (1 + 1e-15)):
        raise RangeError("throttle: the end pressure is above the start pressure; allowed: P2 <= P1")
    return np.array(P2, dtype=float)


def _s_gen(step, ds, q, params, T1, T2):
    Tb = params.get("T_boundary_K")
    if step not in ("heat_p", "heat_v"):
        return ds, "adiabatic: s_gen = s2 - s1"
    if Tb is None:
        return np.zeros_like(ds), ("internally reversible: heat crosses the boundary at the "
                                   "substance's own temperature (give a boundary temperature for s_gen)")
    Tb = _arr(Tb, "boundary temperature")
    if np.any(Tb <= 0):
        raise RangeError("boundary temperature must be above 0 K")
    sg = ds - q / Tb
    # A source colder than the end state cannot heat to it (nor a warmer sink cool to it).
    impossible = (q > 0) & (Tb < np.maximum(T1, T2) * (1 - 1e-12)) | \
                 (q < 0) & (Tb > np.minimum(T1, T2) * (1 + 1e-12))
    if np.any(impossible):
        raise RangeError("boundary temperature: heat cannot flow from a source colder than the "
                         "substance (or into a sink warmer than it); allowed: a heat source at or "
                         "above the hottest state, a sink at or below the coldest state")
    return sg, "heat crosses the boundary at T_boundary: s_gen = s2 - s1 - q/T_boundary"


def _range_T(sub, T, what):
    T = np.asarray(T, float)
    if not np.all(np.isfinite(T)) or np.any(T <= 0):
        raise RangeError(f"{what} must be finite and above 0 K")
    out = (T < sub.T_min) | (T > sub.T_max)
    if np.any(out):
        raise RangeError(f"{what} {float(T[out].flat[0]):g} K is outside the data range of {sub.id}, "
                         f"{sub.T_min:g}-{sub.T_max:g} K; allowed: {sub.T_min:g} to {sub.T_max:g} K")


def _T_from(sub, key, values, what, allowed):
    try:
        return sub.T_from(key, values)
    except RangeError:
        raise RangeError(f"{what} leaves the data range of {sub.id}, {sub.T_min:g}-{sub.T_max:g} K; "
                         f"allowed: {allowed}") from None


# ------------------------------------------------------------------- gas
def _gas(sub: Substance, step, T1, P1, params):
    _range_T(sub, T1, "start temperature")
    p1 = sub.properties(T1, P1)
    h1, u1, s1, v1 = p1["h"], p1["u"], p1["s"], p1["v"]
    T2s = h2s = eta = None
    notes = []
    if step in ("compress", "expand"):
        eta = _eta(params)
        P2 = _end_pressure(step, P1, params)
        Pr2 = p1["Pr"] * (P2 / P1)
        if step == "compress":
            rmax = sub.properties(sub.T_max)["Pr"] / p1["Pr"]
            allowed = f"pressure ratios up to {float(np.min(rmax)):.6g} from this start"
        else:
            rmax = p1["Pr"] / sub.properties(sub.T_min)["Pr"]
            allowed = f"pressure ratios P1/P2 up to {float(np.min(rmax)):.6g} from this start"
        T2s = _T_from(sub, "Pr", Pr2, f"{step}: the isentropic end state", allowed)
        h2s = sub.properties(T2s)["h"]
        h2 = h1 + (h2s - h1) / eta if step == "compress" else h1 + eta * (h2s - h1)
        T2 = np.where(eta >= 1.0, T2s, _T_from(sub, "h", h2, f"{step}: the actual end state",
                                                "a higher efficiency or a smaller ratio"))
        p2 = sub.properties(T2, P2)
        w = p2["h"] - h1
        q = np.zeros_like(w)
        basis = "steady flow"
    elif step == "throttle":
        P2 = _end_pressure(step, P1, params)
        T2 = np.broadcast_to(T1, np.broadcast_shapes(T1.shape, P2.shape)).astype(float)
        p2 = sub.properties(T2, P2)       # ideal gas: h = h(T), so T2 = T1
        w = np.zeros(T2.shape)
        q = np.zeros(T2.shape)
        basis = "steady flow"
        notes.append("ideal gas: enthalpy depends on T only, so throttling keeps T "
                     "(a real gas shows a Joule-Thomson change)")
    else:
        key = "h" if step == "heat_p" else "u"
        e1 = h1 if step == "heat_p" else u1
        if params.get("T2_K") is not None:
            T2 = _arr(params["T2_K"], "end temperature")
            _range_T(sub, T2, f"{step}: end temperature")
            T2 = np.broadcast_to(T2, np.broadcast_shapes(T2.shape, e1.shape)).astype(float)
        else:
            qg = _arr(params["q_J_per_kg"], "heat q")
            ends = sub.properties(np.array([sub.T_min, sub.T_max]))[key]
            qlo, qhi = ends[0] - e1, ends[1] - e1
            allowed = (f"q from {float(np.max(qlo)) / 1000:.6g} to {float(np.min(qhi)) / 1000:.6g} kJ/kg "
                       f"from this start")
            if np.any(e1 + qg < ends[0]) or np.any(e1 + qg > ends[1]):
                raise RangeError(f"{step}: heat q takes the end state outside the data range of {sub.id}, "
                                 f"{sub.T_min:g}-{sub.T_max:g} K; allowed: {allowed}")
            T2 = _T_from(sub, key, e1 + qg, f"{step}: heat q", allowed)
        P2 = P1 * np.ones_like(T2) if step == "heat_p" else P1 * (T2 / T1)
        p2 = sub.properties(T2, P2)
        q = p2[key] - e1
        w = np.zeros_like(q)
        basis = "steady flow" if step == "heat_p" else "closed"
    ds = p2["s"] - s1
    s_gen, s_gen_basis = _s_gen(step, ds, q, params, T1, T2)
    comp = _gas_comparison(sub, step, T1, P1, T2, P2, ds, T2s, w, q, eta, params, p1, p2)
    return dict(kind="ideal gas", basis=basis, M=sub.M, v1=v1, h1=h1, u1=u1, s1=s1,
                T2_K=np.asarray(T2, float), P2_Pa=np.asarray(P2, float) * np.ones_like(T2),
                v2=p2["v"], h2=p2["h"], u2=p2["u"], s2=p2["s"], T2s_K=T2s, h2s=h2s, eta=eta,
                w_J_per_kg=w, q_J_per_kg=q, ds_J_per_kgK=ds, s_gen_J_per_kgK=s_gen,
                s_gen_basis=s_gen_basis, comparison=comp, notes=tuple(notes),
                Pr1=p1["Pr"], Pr2=p2["Pr"], vr1=p1["vr"], vr2=p2["vr"])


def _cpk(sub, T):
    """cp, cv (J/(kg K)) and k at T, and whether any T lies outside the data range.

    The comparison may evaluate slightly outside the range (a power-law end
    temperature beyond T_max); only cp/R is evaluated, as the iterations call
    this often.
    """
    T = np.asarray(T, float)
    cpR = sub.poly.evaluate(T, want=("cp",))["cp"]
    R = sub.R
    return cpR * R, (cpR - 1.0) * R, cpR / (cpR - 1.0), bool(np.any((T < sub.T_min) | (T > sub.T_max)))


def _gas_comparison(sub, step, T1, P1, T2, P2, ds, T2s, w, q, eta, params, p1, p2):
    R = sub.R
    out = {}
    lnP = np.log(P2 / P1)
    lnT = np.log(T2 / T1)
    Tm = 0.5 * (T1 + T2)
    cp298, cv298, k298, x298 = _cpk(sub, np.array(T_REF))
    cpm, cvm, _, xm = _cpk(sub, Tm)
    ext = " (extrapolated)" if x298 else ""
    floor_s = 1e-9 * R
    out["ds"] = (
        _estimate("ds", "exact", "exact s°(T)", "J/(kg K)", ds, ds, floor_s),
        _estimate("ds", "cp_298", f"cp at {T_REF:g} K{ext}", "J/(kg K)", cp298 * lnT - R * lnP, ds,
                  floor_s, cp298, "cp"),
        _estimate("ds", "cp_mean", "cp at mean T (T1+T2)/2", "J/(kg K)", cpm * lnT - R * lnP, ds,
                  floor_s, cpm, "cp"),
    )
    if step in ("compress", "expand"):
        ratio = P2 / P1
        k1 = sub.properties(T1)["k"]
        cp1 = sub.properties(T1)["cp"]

        def power(k):
            return T1 * ratio ** ((k - 1.0) / k)

        T_k298 = power(k298)
        T_k1 = power(k1)
        T_km = T_k1
        for _ in range(200):
            cp_mean, _, k_mean, _ = _cpk(sub, 0.5 * (T1 + T_km))
            Tn = power(k_mean)
            done = np.all(np.abs(Tn - T_km) <= MEAN_K_RTOL * Tn)
            T_km = Tn
            if done:
                break
        else:
            raise RangeError("the power law with k at the mean temperature did not converge")
        cp_mean, _, k_mean, _ = _cpk(sub, 0.5 * (T1 + T_km))
        floor_T = 1e-12 * T1
        out["T2s"] = (
            _estimate("T2s", "exact", "exact, Pr route", "K", T2s, T2s, floor_T),
            _estimate("T2s", "k_298", f"power law, k at {T_REF:g} K{ext}", "K", T_k298, T2s, floor_T,
                      k298, "k"),
            _estimate("T2s", "k_T1", "power law, k at T1", "K", T_k1, T2s, floor_T, k1, "k"),
            _estimate("T2s", "k_mean", "power law, k at mean T (iterated)", "K", T_km, T2s, floor_T,
                      k_mean, "k"),
        )

        def work(cp, Ts):
            ws = cp * (Ts - T1)
            return ws / eta if step == "compress" else ws * eta

        floor_w = 1e-12 * cp1 * T1
        out["w"] = (
            _estimate("w", "exact", "exact, h(T2) - h(T1)", "J/kg", w, w, floor_w),
            _estimate("w", "k_298", f"cp and k at {T_REF:g} K{ext}", "J/kg", work(cp298, T_k298), w,
                      floor_w, cp298, "cp"),
            _estimate("w", "k_T1", "cp and k at T1", "J/kg", work(cp1, T_k1), w, floor_w, cp1, "cp"),
            _estimate("w", "k_mean", "cp and k at mean T (iterated)", "J/kg", work(cp_mean, T_km), w,
                      floor_w, cp_mean, "cp"),
        )
    elif step in ("heat_p", "heat_v"):
        c298, cm, name = (cp298, cpm, "cp") if step == "heat_p" else (cv298, cvm, "cv")
        scale = 1e-12 * c298 * T1
        if params.get("T2_K") is not None:
            out["q"] = (
                _estimate("q", "exact", "exact, " + ("h(T2) - h(T1)" if name == "cp" else "u(T2) - u(T1)"),
                          "J/kg", q, q, scale),
                _estimate("q", "cp_298", f"{name} at {T_REF:g} K{ext}", "J/kg", c298 * (T2 - T1), q, scale,
                          c298, name),
                _estimate("q", "cp_mean", f"{name} at mean T (T1+T2)/2", "J/kg", cm * (T2 - T1), q, scale,
                          cm, name),
            )
        else:
            T_m = T1 + q / c298
            for _ in range(200):
                cc = _cpk(sub, 0.5 * (T1 + T_m))[0 if name == "cp" else 1]
                Tn = T1 + q / cc
                done = np.all(np.abs(Tn - T_m) <= MEAN_K_RTOL * np.abs(Tn))
                T_m = Tn
                if done:
                    break
            else:
                raise RangeError(f"{step}: the mean-{name} estimate of T2 did not converge")
            floor_T = 1e-12 * T1
            out["T2"] = (
                _estimate("T2", "exact", "exact, from " + ("h" if name == "cp" else "u"), "K", T2, T2, floor_T),
                _estimate("T2", "cp_298", f"{name} at {T_REF:g} K{ext}", "K", T1 + q / c298, T2, floor_T,
                          c298, name),
                _estimate("T2", "cp_mean", f"{name} at mean T (iterated)", "K", T_m, T2, floor_T, cc, name),
            )
    return MappingProxyType(out)


# ------------------------------------------------------------ incompressible
def _liquid(sub: Incompressible, step, T1, P1, params):
    sub.check_T(T1, "start temperature")
    p1 = sub.properties(T1, P1)
    h1, u1, s1, v = p1["h"], p1["u"], p1["s"], sub.v
    T2s = h2s = eta = None
    notes = []
    if step == "heat_v":
        raise InputError("heat_v: an incompressible substance cannot be heated at constant volume "
                         "without unbounded pressure; allowed for incompressible: compress, expand, "
                         "heat_p, throttle")
    if step in ("compress", "expand"):
        eta = _eta(params)
        P2 = _end_pressure(step, P1, params)
        T2s = np.broadcast_to(T1, P2.shape).astype(float)
        h2s = h1 + v * (P2 - P1)
        w = (h2s - h1) / eta if step == "compress" else eta * (h2s - h1)
        u2 = (h1 + w) - P2 * v
        T2 = sub.T_from_u(u2, T2s)
        q = np.zeros_like(w)
        notes.append("pump or hydraulic machine: isentropic end state keeps T; w_s = v (P2 - P1)")
    elif step == "throttle":
        P2 = _end_pressure(step, P1, params)
        u2 = h1 - P2 * v
        T2 = sub.T_from_u(u2, np.broadcast_to(T1, P2.shape))
        w = np.zeros(T2.shape)
        q = np.zeros(T2.shape)
    else:
        if params.get("T2_K") is not None:
            T2 = _arr(params["T2_K"], "end temperature")
            sub.check_T(T2, f"{step}: end temperature")
            T2 = np.broadcast_to(T2, np.broadcast_shapes(T2.shape, h1.shape)).astype(float)
        else:
            qg = _arr(params["q_J_per_kg"], "heat q")
            T2 = sub.T_from_u(u1 + qg, np.broadcast_to(T1, np.broadcast_shapes(np.shape(qg), u1.shape)))
        P2 = P1 * np.ones_like(T2)
        q = sub.properties(T2, P2)["h"] - h1
        w = np.zeros_like(q)
    sub.check_T(T2, f"{step}: end temperature")
    sub.check_c_positive(np.broadcast_to(T1, T2.shape), T2)
    p2 = sub.properties(T2, P2)
    if step in ("heat_p",):
        q = p2["h"] - h1
    ds = p2["s"] - s1
    s_gen, s_gen_basis = _s_gen(step, ds, q, params, T1, T2)
    # Method comparison: c at 298.15 K and at the mean temperature against ∫c/T dT.
    lnT = np.log(T2 / T1)
    c298 = sub.c(T_REF)
    cm = sub.c(0.5 * (T1 + T2))
    floor_s = 1e-12 * max(abs(float(c298)), 1.0)
    comp = {"ds": (
        _estimate("ds", "exact", "exact, ∫c/T dT", "J/(kg K)", ds, ds, floor_s),
        _estimate("ds", "cp_298", f"c at {T_REF:g} K", "J/(kg K)", c298 * lnT, ds, floor_s, c298, "c"),
        _estimate("ds", "cp_mean", "c at mean T (T1+T2)/2", "J/(kg K)", cm * lnT, ds, floor_s, cm, "c"),
    )}
    return dict(kind="incompressible", basis="steady flow", M=None, v1=p1["v"], h1=h1, u1=u1, s1=s1,
                T2_K=np.asarray(T2, float), P2_Pa=np.asarray(P2, float), v2=p2["v"], h2=p2["h"],
                u2=p2["u"], s2=p2["s"], T2s_K=T2s, h2s=h2s, eta=eta, w_J_per_kg=w, q_J_per_kg=q,
                ds_J_per_kgK=ds, s_gen_J_per_kgK=s_gen, s_gen_basis=s_gen_basis,
                comparison=MappingProxyType(comp), notes=tuple(notes))


# --------------------------------------------------------------- public API
def process(substance, T1_K, P1_Pa, step: str, **params) -> ProcessResult:
    """One process step from start states (T1_K, P1_Pa); every input broadcasts.

    Parameters
    ----------
    substance : Substance (ideal gas), Incompressible, or a name for
        :func:`tablegen.substance`
    T1_K, P1_Pa : array_like, start temperature (K) and absolute pressure (Pa)
    step : "compress", "expand", "heat_p", "heat_v" or "throttle"
    P2_Pa : end pressure (compress, expand, throttle)
    ratio : pressure ratio of the machine: P2/P1 for compress, P1/P2 for
        expand (instead of P2_Pa); both >= 1
    eta : isentropic efficiency, 0 < eta <= 1 (default 1)
    T2_K : end temperature (heat_p, heat_v)
    q_J_per_kg : heat added per kg, negative for cooling (heat_p, heat_v;
        instead of T2_K)
    T_boundary_K : temperature at which the heat crosses the boundary, for
        the entropy generated (heat_p, heat_v; default: internally reversible)

    Returns
    -------
    ProcessResult

    Raises
    ------
    TablegenError for an unknown step or parameter, an efficiency outside
    (0, 1], a ratio <= 0 or a pressure change against the step;
    RangeError for a start or end state outside the data range.

    References
    ----------
    Isentropic relation Pr2/Pr1 = P2/P1 and the constant-k power law: the
    ideal-gas T ds relations (common practice); efficiencies on enthalpy as
    defined for adiabatic machines (common practice).
    """
    if isinstance(substance, str):
        from .names import substance as lookup
        substance = lookup(substance)
    _check_params(step, params)
    T1 = _arr(T1_K, "start temperature T1")
    P1 = _arr(P1_Pa, "start pressure P1")
    if np.any(P1 <= 0):
        raise RangeError("start pressure must be above 0 Pa (absolute pressure)")
    if np.any(T1 <= 0):
        raise RangeError("start temperature must be above 0 K")
    T1, P1 = (np.array(a, dtype=float) for a in np.broadcast_arrays(T1, P1))
    if isinstance(substance, Incompressible):
        parts = _liquid(substance, step, T1, P1, params)
    elif isinstance(substance, Substance):
        parts = _gas(substance, step, T1, P1, params)
    else:
        raise InputError("process: substance must be a gas (tablegen.substance) or an "
                         "Incompressible entry")
    return ProcessResult(substance_id=substance.id, substance_name=substance.name, step=step,
                         T1_K=T1, P1_Pa=P1, **parts)
