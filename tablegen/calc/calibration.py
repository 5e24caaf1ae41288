"""Held-out calibration of the data part of the stated uncertainty.

For a reference R (NIST-JANAF, the IAPWS-95 ideal-gas part, the ideal-gas parts
of CoolProp's reference equations of state) and a species, the data-component
budget is rebuilt without R (tablegen.calc.evidence.species_data with ``held_out``:
no agreement figure that rests on R's values, no fit residual of a refit of R),
and the printed functions' deviations from R are checked against it:

coverage      share of R's points where |deviation| <= U (k = 2);
median ratio  median over R's points of U / |deviation| (how informative U is).

Deviations below the reference's printed resolution (half a unit of its last
digit: JANAF prints cp and S to 0.001 J/(mol K) and H - H(298.15 K) to 1 J/mol)
cannot be told from zero and are reduced by it; points within 20 K of 298.15 K
are left out for dh and ds, which vanish there by construction.

A development-time module: the references come from the test extra (janaf,
iapws, CoolProp), imported inside the functions; the tool never imports it.
benchmarks/calibrate_uncertainty.py prints the full table, and
tests/test_calibration.py asserts the targets.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from ..core.errors import NameLookupError
from ..core.constants import T_REF

#: The held-out references and the evaluation each stands for
#: (tablegen.calc.agreement.EVALUATION_OF): IAPWS-95 is CoolProp's "Water".
REFERENCES = {"janaf": "janaf", "iapws95": "eos", "eos": "eos"}

#: Species of the targets (their default sources), 200-3000 K.
TARGET_SPECIES = ("N2", "O2", "CO", "Ar", "CO2", "H2O", "SO2")

T_LO, T_HI = 200.0, 3000.0
N_POINTS = 41
NEAR_298_K = 20.0


@dataclass(frozen=True, slots=True)
class Check:
    """Result of one held-out check of one quantity (cp, dh or ds)."""

    species: str
    reference: str
    quantity: str
    n: int
    coverage: float
    median_ratio: float


@lru_cache(maxsize=None)
def reference_values(reference: str, species: str):
    """(T, cp, dh, ds, resolution) of a reference, molar SI; None if it lacks the species.

    janaf: every tabulated temperature from 200 to 3000 K; iapws95: the `iapws`
    package's IAPWS-95 ideal-gas part, 273.16-1273.15 K (the release's range);
    eos: CoolProp's ideal-gas part from 200 K to the upper temperature CoolProp
    states for the equation (at most 3000 K). ``resolution`` = half a unit of the
    reference's last printed digit (cp, dh, ds), zero for an equation.
    """
    if reference == "janaf":
        from ..data.library import library
        refit = library().datasets["janaf1998"].get(species)     # names its JANAF table
        if refit is None or refit.id != species:
            return None
        import janaf
        df = janaf.Table(refit.extra["janaf_table"]).df
        T = np.asarray(df["T(K)"].to_numpy(), float)
        i298 = int(np.argmin(np.abs(T - T_REF)))
        S = np.asarray(df["S"].to_numpy(), float)
        m = (T >= T_LO) & (T <= T_HI)
        return (T[m], np.asarray(df["Cp"].to_numpy(), float)[m], np.asarray(df["H-H(Tr)"].to_numpy(), float)[m]
                * 1e3, S[m] - S[i298], (0.0005, 0.5, 0.001))
    if reference == "iapws95":
        if species != "H2O":
            return None
        return (*_iapws95_ideal(np.linspace(273.16, 1273.15, N_POINTS)), (0.0, 0.0, 0.0))
    if reference == "eos":
        from .agreement import COOLPROP_FLUIDS, coolprop_ideal
        fluid = COOLPROP_FLUIDS.get(species)
        if fluid is None:
            return None
        from CoolProp.CoolProp import PropsSI
        T = np.linspace(T_LO, min(T_HI, float(PropsSI("Tmax", fluid))), N_POINTS)
        v = coolprop_ideal(fluid, T)
        return T, v["cp"], v["dh"], v["s0"], (0.0, 0.0, 0.0)
    raise NameLookupError(f"unknown reference {reference!r}; allowed: {', '.join(REFERENCES)}")


def _iapws95_ideal(T: np.ndarray):
    """cp°, H°(T) - H°(298.15 K), S°(T) - S°(298.15 K) at 1 bar from the IAPWS-95 ideal-gas
    part phi°(tau, delta) (W. Wagner and A. Pruss, J. Phys. Chem. Ref. Data 31 (2002) 387),
    as the `iapws` package evaluates it: cp°/R = 1 - tau² phi°_tautau,
    h°/(RT) = 1 + tau phi°_tau, s°/R = tau phi°_tau - phi°."""
    from iapws import IAPWS95
    w = IAPWS95()
    M, R_spec, Tc, rho_c = 18.015268, 0.46151805, 647.096, 322.0   # g/mol, kJ/(kg K), K, kg/m3 (IAPWS-95)
    Rm = R_spec * M

    def one(t):
        tau, delta = Tc / t, 1e5 / (R_spec * 1e3 * t) / rho_c
        p = w._phi0(tau, delta)
        return Rm * (1 - tau ** 2 * p["fiott"]), Rm * t * (1 + tau * p["fiot"]), Rm * (tau * p["fiot"] - p["fio"])

    cp, h, s = (np.array(x) for x in zip(*[one(float(t)) for t in T]))
    _, h0, s0 = one(T_REF)
    return np.asarray(T, float), cp, h - h0, s - s0


def held_out(species: str, reference: str, *, source: str | None = None) -> list[Check] | None:
    """The three checks (cp, dh, ds) of one species against one held-out reference.

    ``source``: the data set printed (default: the species' default source).
    """
    from ..data.library import library
    from .evidence import by_species, load_agreement, record_functions, species_data
    ref = reference_values(reference, species)
    if ref is None:
        return None
    T, cp, dh, ds, res = ref
    rec = library().record(species, source=source)
    inside = (T >= rec.T_min) & (T <= rec.T_max)
    T, cp, dh, ds = T[inside], cp[inside], dh[inside], ds[inside]
    sd = species_data(rec, T, by_species(load_agreement()), held_out=REFERENCES[reference])
    mine = record_functions(rec)(T)
    far = np.abs(T - T_REF) >= NEAR_298_K
    out = []
    for q, (m, r, u, uf, rz) in enumerate(zip(mine, (cp, dh, ds), (sd.cp, sd.dh, sd.ds),
                                             (sd.fit_cp, sd.fit_dh, sd.fit_ds), res)):
        U = 2.0 * np.hypot(u, uf)
        dev = np.maximum(np.abs(m - r) - rz, 0.0)
        sel = far if q else np.ones(T.shape, bool)
        with np.errstate(divide="ignore"):
            ratio = np.where(dev[sel] > 0, U[sel] / np.where(dev[sel] > 0, dev[sel], 1.0), np.inf)
        out.append(Check(species, reference, ("cp", "dh", "ds")[q], int(sel.sum()),
                         float(np.mean(dev[sel] <= U[sel])), float(np.median(ratio))))
    return out


def all_checks(species=TARGET_SPECIES, *, source: str | None = None) -> list[Check]:
    """Every held-out check of the given species against every reference that holds them."""
    out = []
    for sid in species:
        for reference in REFERENCES:
            got = held_out(sid, reference, source=source)
            if got:
                out.extend(got)
    return out


