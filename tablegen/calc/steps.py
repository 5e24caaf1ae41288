"""Process steps: the end state of one state change, with work, heat and entropy.

``process(substance, T1_K, P1_Pa, step, **params)`` takes an ideal gas (a
:class:`~tablegen.thermo.substance.Substance`) or an
:class:`~tablegen.calc.incompressible.Incompressible`
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
value (tablegen.calc.step_methods).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from types import MappingProxyType

import numpy as np

from ..core.errors import InputError, NameLookupError, RangeError
from ..thermo.substance import Substance
from .incompressible import Incompressible
from .step_methods import gas_comparison, liquid_comparison

__all__ = ["process", "ProcessResult", "STEPS", "MIXING_NOTE"]

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


# --------------------------------------------------------------------- results
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


# ------------------------------------------------------------------ helpers
def _arr(x, what: str) -> np.ndarray:
    try:
        a = np.asarray(x, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"{what} must be a number or an array of numbers") from None
    if not np.all(np.isfinite(a)):
        raise RangeError(f"{what} must be finite")
    return a


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
    comp = gas_comparison(sub, step, T1, P1, T2, P2, ds, T2s, w, q, eta, params, p1, p2)
    return dict(kind="ideal gas", basis=basis, M=sub.M, v1=v1, h1=h1, u1=u1, s1=s1,
                T2_K=np.asarray(T2, float), P2_Pa=np.asarray(P2, float) * np.ones_like(T2),
                v2=p2["v"], h2=p2["h"], u2=p2["u"], s2=p2["s"], T2s_K=T2s, h2s=h2s, eta=eta,
                w_J_per_kg=w, q_J_per_kg=q, ds_J_per_kgK=ds, s_gen_J_per_kgK=s_gen,
                s_gen_basis=s_gen_basis, comparison=comp, notes=tuple(notes),
                Pr1=p1["Pr"], Pr2=p2["Pr"], vr1=p1["vr"], vr2=p2["vr"])



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
    return dict(kind="incompressible", basis="steady flow", M=None, v1=p1["v"], h1=h1, u1=u1, s1=s1,
                T2_K=np.asarray(T2, float), P2_Pa=np.asarray(P2, float), v2=p2["v"], h2=p2["h"],
                u2=p2["u"], s2=p2["s"], T2s_K=T2s, h2s=h2s, eta=eta, w_J_per_kg=w, q_J_per_kg=q,
                ds_J_per_kgK=ds, s_gen_J_per_kgK=s_gen, s_gen_basis=s_gen_basis,
                comparison=liquid_comparison(sub, T1, T2, ds), notes=tuple(notes))


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
