"""Checks of the uncertainty budget (tablegen/calc/uncertainty.py) against outside sources.

Sources named beside each check: CoolProp (reference equations of state and
their ideal-gas parts), the CODATA key values (Cox, Wagman & Medvedev 1989,
shipped from memory), NASA TM-4513 (the shipped data), JCGM 101:2008 (Monte
Carlo propagation of distributions).
"""

from __future__ import annotations

import json
import math
import subprocess
import sys

import numpy as np
import scipy.constants
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import tablegen
from tablegen.calc import uncertainty as un
from tablegen.calc import evidence as ev, interpolation as ip, realgas as rg
from tablegen.data.library import library
from tablegen.core.errors import TablegenError
from tablegen.core.rounding import round_steps_down

# reference library from the test extra: a missing one fails the run, never skips it
import CoolProp.CoolProp as CoolProp  # noqa: E402
from CoolProp import AbstractState  # noqa: E402

R = scipy.constants.R   # CODATA 2018 (N_A k, exact) via scipy.constants

#: tablegen species -> CoolProp fluid, for the reference-equation checks
COOLPROP_FLUIDS = {
    "N2": "Nitrogen", "O2": "Oxygen", "Ar": "Argon", "CO2": "CarbonDioxide", "H2O": "Water",
    "CH4": "Methane", "CO": "CarbonMonoxide", "H2": "Hydrogen", "C2H6": "Ethane", "C3H8": "Propane",
    "NH3": "Ammonia", "SO2": "SulfurDioxide", "He": "Helium", "N2O": "NitrousOxide",
    "H2S": "HydrogenSulfide", "C2H4": "Ethylene", "Ne": "Neon", "HCl": "HydrogenChloride",
    "Kr": "Krypton", "Xe": "Xenon",
}


# ------------------------------------------------------------------ CODATA
def test_codata_key_values_from_memory_agree_with_nasa_tm4513():
    """CODATA 1989 S°(298.15 K) and ΔfH° (shipped from memory) against the shipped
    NASA TM-4513 functions: agreement within the CODATA uncertainty for the
    combustion species, which both evaluations rest on the same spectroscopy for."""
    cd = ev.codata_values()
    for sid in ("N2", "O2", "H2", "Ar", "He", "H2O", "CO", "CO2", "O", "H", "N", "NH3", "SO2", "H2S", "HCl"):
        v = cd[sid]
        e = library().record(sid, source="nasa1993").poly.evaluate(np.array([298.15]))
        assert abs(e["s"][0] * R - v["S298"]) <= v["U_S298"], sid
        # reference elements: ΔfH = 0 by definition, the fits give it within 1 J/mol
        assert abs(e["h"][0] * R - v["dfH"]) <= max(v["U_dfH"], 1.0), sid


def test_codata_difference_widens_the_stated_uncertainty():
    """Where the printed source differs from the CODATA value by more than CODATA's
    U (S2: NASA TM-4513 takes newer data), the budget's S°(298.15 K) standard
    uncertainty is at least that difference as a rectangular half-width."""
    rec = library().record("S2", source="nasa1993")
    sd = ev.species_data(rec, np.array([500.0]), {})
    e = rec.poly.evaluate(np.array([298.15]))
    d = abs(e["s"][0] * R - ev.codata_values()["S2"]["S298"])
    assert d > ev.codata_values()["S2"]["U_S298"]
    assert sd.S298 >= d / math.sqrt(3)


# ------------------------------------------------------------ budget structure
def test_class_defaults_equal_what_tools_class_defaults_derives():
    """CLASS_DEFAULTS are the figures tools/class_defaults.py derives from NASA TM-4513
    against NIST-JANAF 4th ed. (janaf package): the two must not drift apart."""
    import importlib.util
    from pathlib import Path
    path = Path(__file__).resolve().parents[1] / "tools" / "class_defaults.py"
    spec = importlib.util.spec_from_file_location("class_defaults_tool", path)
    tool = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(tool)
    derived = tool.derive()
    assert set(derived) == set(ev.CLASS_DEFAULTS)
    for cls, figs in derived.items():
        for what, vals in figs.items():
            assert ev.CLASS_DEFAULTS[cls][what] == pytest.approx(vals, rel=1e-9), (cls, what)


def test_real_gas_departure_is_stated_apart_from_U():
    """H2O at 300-400 K and 1 bar: the second-virial departure of cp is tens of per cent
    (CoolProp's IAPWS-95, checked in the virial tests below), yet the ideal-gas cp is
    known to 0.05 % (IAPWS-95 ideal part vs NIST-JANAF, tests/test_calibration.py):
    U stays small and the departure goes to the validity statement and bounds."""
    sub = tablegen.substance("H2O")
    T = np.array([300.0, 350.0, 400.0])
    b = un.budget(sub, T, ("cp", "h", "k"), P_max_Pa=1e5)
    assert np.all(b.U("cp") / b.values["cp"] < 1e-3)
    assert np.all(b.departures["cp"] / b.values["cp"] > 0.02)
    assert "ideal-gas model" not in b.u["cp"]
    assert any("within 0.1 % up to" in st for st in b.validity)
    assert b.to_json()["validity"]["statements"] == list(b.validity)
    with pytest.raises(TablegenError):
        b.U("cp", "ideal-gas model")


def test_fit_residual_is_its_own_component():
    """A janaf1998 refit carries its stated residual against NIST-JANAF as a separate part
    of U; a set published as coefficients (nasa1993) has none."""
    T = np.array([400.0, 1200.0])
    b = un.budget(tablegen.substance("CO2"), T, ("cp",))
    rec = library().record("CO2")
    want = 2 * rec.extra["fit_residuals"]["cp_max_rel"] / math.sqrt(3) * b.values["cp"]
    np.testing.assert_allclose(b.U("cp", "fit residual"), want, rtol=1e-9)
    b93 = un.budget(tablegen.substance("CO2", source="nasa1993"), T, ("cp",))
    assert "fit residual" not in b93.u["cp"]


def test_default_janaf_refit_is_not_charged_the_nasa1993_spread():
    """H2O at 1000-2000 K: TM-4513 is 1 % off NIST-JANAF and the IAPWS-95 ideal part, which
    agree to 0.012 % (gasdata/agreement.toml); the default's U rests on IAPWS-95, not on
    the less accurate set, and no class floor (1 % for small polyatomics) is added."""
    T = np.linspace(1000.0, 2000.0, 11)
    b = un.budget(tablegen.substance("H2O"), T, ("cp",))
    assert np.all(b.U("cp") / b.values["cp"] < 5e-4)
    assert not np.any(b.upper)


# ---------------------------------------------------------------- virial
VIRIAL_STATES = {   # (T K, P Pa), gas phase, density below a tenth of critical
    "N2": [(200.0, 10e5), (300.0, 20e5), (500.0, 50e5)],
    "CO2": [(300.0, 5e5), (500.0, 20e5), (1000.0, 50e5)],
    "CH4": [(300.0, 10e5), (450.0, 30e5)],
    "H2O": [(500.0, 5e5), (700.0, 20e5), (1000.0, 50e5)],
}


@pytest.mark.parametrize("sid", list(VIRIAL_STATES))
def test_virial_Z_h_s_cp_within_stated_uncertainty_of_coolprop(sid):
    """Tsonopoulos second-virial departures against CoolProp's real-gas equation of
    state (Span & Wagner N2/CO2, Setzmann & Wagner CH4, IAPWS-95 H2O): Z, h - h°,
    s - s° and cp - cp° within the expanded uncertainty the module states."""
    fluid = COOLPROP_FLUIDS[sid]
    sub = tablegen.substance(sid)
    a = AbstractState("HEOS", fluid)
    for T, P in VIRIAL_STATES[sid]:
        Ta = np.array([T])
        est = rg.virial_mixture(sub.components, Ta)
        dep = rg.model_departures(est, Ta, P)
        bnd = rg.departure_bounds(est, Ta, P)
        a.update(CoolProp.PT_INPUTS, P, T)
        Z, h, s, cp = a.compressibility_factor(), a.hmolar(), a.smolar(), a.cpmolar()
        p0 = 1.0
        a.update(CoolProp.PT_INPUTS, p0, T)
        h0, s0, cp0 = a.hmolar(), a.smolar() - R * math.log(P / p0), a.cpmolar()
        ref = {"Z": Z - 1, "h": h - h0, "s": s - s0, "cp": cp - cp0}
        for q, r in ref.items():
            # stated expanded uncertainty of the estimate = bound - |estimate|
            U = float(bnd[q][0] - abs(dep[q][0]))
            assert abs(dep[q][0] - r) <= U, f"{sid} {T} K {P / 1e5} bar {q}: {dep[q][0]:.4g} vs {r:.4g} (U {U:.3g})"


def test_virial_statement_names_pressure_limit():
    """A budget at 40 bar states where the ideal-gas values hold and cautions for
    condensing water (estimated vapour pressure, Edmister 1958)."""
    b = un.budget(tablegen.substance("H2O"), np.arange(300.0, 1001.0, 50.0), ("cp", "h"), P_max_Pa=40e5)
    text = " ".join(b.validity)
    assert "within 0.1 % up to" in text and "bar above" in text
    assert "may condense" in text


# ---------------------------------------------------------- interpolation
@pytest.mark.parametrize("name", ["N2", "CO2", "air", "CO2=0.09,H2O=0.18,N2=0.71,O2=0.02"])
def test_interpolation_bound_never_exceeded_at_10000_random_temperatures(name):
    """The stated bound of linear interpolation between printed rows is never
    exceeded at 10,000 random temperatures (rows cross the data's 1000 K
    breakpoint; irregular spacing), and it is not loose: somewhere the
    error reaches 90 % of it."""
    sub = tablegen.substance(name)
    rows = np.array([200.0, 260, 300, 400, 550, 700, 900, 1000, 1050, 1300, 1800, 2500, 3000])
    rows = rows[(rows >= sub.T_min) & (rows <= sub.T_max)]
    rng = np.random.default_rng(20261201)
    T = rng.uniform(rows[0], rows[-1], 10000)
    j = np.clip(np.searchsorted(rows, T, side="right") - 1, 0, rows.size - 2)
    for key in ("cp", "h", "s0", "Pr", "vr", "k"):
        bound = ip.interpolation_bound(sub, key, rows)
        f = sub.properties(T)[key]
        fr = sub.properties(rows)[key]
        lin = fr[j] + (fr[j + 1] - fr[j]) * (T - rows[j]) / (rows[j + 1] - rows[j])
        err = np.abs(f - lin)
        assert np.all(err <= bound[j]), f"{name} {key}: exceeded"
        assert np.max(err / bound[j]) >= 0.9, f"{name} {key}: bound loose"


def test_auto_step_is_largest_round_step_meeting_tolerance():
    """auto_step returns a round step that keeps interpolation in cp and h within
    1e-4 relative, and the next larger round step does not."""
    sub = tablegen.substance("air")
    step = ip.auto_step(sub, ("cp", "h"), 300.0, 1500.0, 1e-4)
    assert step in round_steps_down(1200.0)
    steps = round_steps_down(1200.0)
    bigger = steps[steps.index(step) - 1]
    rows = np.append(np.arange(300.0, 1500.0, bigger), 1500.0)
    mid = 0.5 * (rows[1:] + rows[:-1])
    p = sub.properties(mid)
    b_cp = ip.interpolation_bound(sub, "cp", rows) / p["cp"]
    b_h = ip.interpolation_bound(sub, "h", rows) / (p["cp"] * mid)
    assert max(b_cp.max(), b_h.max()) > 1e-4


# ------------------------------------------------------------ composition
def test_composition_linear_propagation_matches_monte_carlo():
    """Linear sensitivity against a Monte Carlo propagation of distributions
    (JCGM 101:2008): normal mole-fraction errors, renormalised; the standard
    uncertainties agree within the Monte Carlo's own sampling uncertainty
    (3 / sqrt(2 N) relative at N = 1500) plus 2 % for non-linearity."""
    comp = {"CO2": 0.09, "H2O": 0.18, "N2": 0.71, "O2": 0.02}
    u = {"CO2": 0.004, "H2O": 0.01, "O2": 0.002}
    sub = tablegen.mixture(comp)
    T = np.array([300.0, 800.0, 1500.0])
    keys = ("cp", "h", "s0", "k")
    lin = un.composition_sensitivity(sub, T, keys, u)
    rng = np.random.default_rng(5)
    N = 1500
    lib = library()
    recs = {k: lib.record(k) for k in comp}
    vals = {k: [] for k in keys}
    from tablegen.thermo.build import mixture_substance
    for _ in range(N):
        x = dict(comp)
        for k, uk in u.items():
            x[k] = max(comp[k] + rng.normal(0.0, uk), 1e-9)
        tot = sum(x.values())
        m = mixture_substance([(recs[k], x[k] / tot) for k in comp], "mole")
        p = m.properties(T)
        for k in keys:
            vals[k].append(p[k])
    tol = 3 / math.sqrt(2 * N) + 0.02
    for k in keys:
        mc = np.std(np.array(vals[k]), axis=0, ddof=1)
        assert np.all(np.abs(lin[k] / mc - 1) <= tol), (k, lin[k], mc)


def test_composition_uncertainty_enters_the_budget():
    sub = tablegen.mixture({"CO2": 0.09, "H2O": 0.18, "N2": 0.71, "O2": 0.02})
    T = np.array([400.0, 1200.0])
    b0 = un.budget(sub, T, ("cp",))
    b1 = un.budget(sub, T, ("cp",), composition_u={"H2O": 0.01})
    assert np.all(b1.U("cp") > b0.U("cp"))
    assert np.all(b1.U("cp", "composition") > 0)


# ---------------------------------------------------------------- rounding
@settings(max_examples=200, deadline=None)
@given(st.floats(min_value=1e-9, max_value=1e9, allow_nan=False))
def test_digits_for_keeps_rounding_between_U_over_40_and_U_over_4(U):
    """Rule of digits_for: half a unit of the last printed digit lies in (U/40, U/4]."""
    d = int(un.digits_for(U))
    half = 0.5 * 10.0 ** (-d)
    assert U / 40 < half * (1 + 1e-12) and half <= U / 4 * (1 + 1e-12)


def test_digits_for_uses_the_printed_unit():
    # U = 3.2 J/(kg K) printed in kJ/(kg K): last digit 1e-3 kJ/(kg K) (1 J/(kg K) <= U/2)
    assert int(un.digits_for(3.2, unit_factor=1000.0)) == 3


# --------------------------------------------------------------- API glue
def test_properties_with_uncertainty_adds_U_keys_of_the_same_shape():
    sub = tablegen.substance("air")
    T = np.array([[300.0, 1000.0], [500.0, 700.0]])
    p = sub.properties(T, 5e5, uncertainty=True)
    for k in ("cp", "h", "s0", "s", "Pr", "vr", "k", "a", "h_molar"):
        assert p[f"U_{k}"].shape == T.shape
        assert np.all(p[f"U_{k}"] > 0)
    assert "U_cp" not in sub.properties([300.0])


#: A bare N2 built below the public API (no hook registered), for the subprocess checks.
_BARE_N2 = ("import sys; import tablegen.thermo.substance as S; from tablegen.data.library import library; "
            "from tablegen.thermo.build import species_substance; n2 = species_substance(library().record('N2'))\n")


def _python(code: str) -> str:
    return subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout.strip()


def test_thermo_never_imports_the_uncertainty_budget():
    """The budget (calc layer) sits above thermo: thermo gets it through a registered
    hook, so importing thermo and evaluating a substance leaves tablegen.calc.uncertainty out."""
    assert _python(_BARE_N2 + "n2.properties([300.0])\n"
                   "print('tablegen.calc.uncertainty' in sys.modules, 'tablegen.calc.evidence' in sys.modules)") == "False False"


def test_properties_with_uncertainty_unregistered_is_one_clear_refusal():
    assert _python(_BARE_N2 + "try:\n    n2.properties([300.0], uncertainty=True)\n"
                   "except S.InputError as e:\n    print('refused', 'use_uncertainty_columns' in str(e))") \
        == "refused True"


def test_thermo_does_not_import_document_libraries():
    code = ("import sys, tablegen; s = tablegen.substance('air'); s.properties([300.0], uncertainty=True); "
            "print(any(m.split('.')[0] in ('reportlab', 'matplotlib') for m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_budget_json_is_plain_sorted_and_reproducible():
    sub = tablegen.substance("CO2")
    T = np.arange(300.0, 2001.0, 100.0)
    j1 = json.dumps(un.budget(sub, T, ("cp", "h", "s0")).to_json(), sort_keys=True)
    j2 = json.dumps(un.budget(sub, T, ("cp", "h", "s0")).to_json(), sort_keys=True)
    assert j1 == j2
    d = json.loads(j1)
    assert d["coverage_factor"] == 2.0
    bands = d["keys"]["cp"]["bands"]
    assert bands[0]["T_lo_K"] == 300.0 and bands[-1]["T_hi_K"] == 2000.0
    assert all(b["U"] > 0 for b in bands)


def test_band_figures_are_the_largest_U_in_the_band():
    sub = tablegen.substance("N2")
    T = np.arange(300.0, 3001.0, 50.0)
    b = un.budget(sub, T, ("cp",))
    U = b.U("cp")
    for band in b.bands("cp"):
        m = (T >= band.T_lo_K) & (T <= band.T_hi_K)
        assert band.U_max <= U[m].max() * (1 + 1e-12)
        assert band.U_max >= U[(T >= band.T_lo_K) & (T < band.T_hi_K)].max() * (1 - 1e-12)


@pytest.mark.parametrize("kwargs, text", [
    ({"keys": ("cp", "nonsense")}, "allowed"),
    ({"P_max_Pa": -1.0}, "positive"),
    ({"composition_u": {"Xe": 0.01}}, "not a component"),
    ({"composition_u": {"N2": -0.1}}, "allowed"),
    ({"composition_u": [0.01]}, "mapping"),
    ({"printed_step": {"cp": "x"}}, "allowed"),
])
def test_bad_input_gives_one_clear_message(kwargs, text):
    sub = tablegen.substance("air")
    keys = kwargs.pop("keys", ("cp",))
    with pytest.raises(TablegenError) as e:
        un.budget(sub, np.array([300.0, 400.0]), keys, **kwargs)
    assert text in str(e.value) and "\n" not in str(e.value)


def test_auto_step_bad_tolerance_gives_one_clear_message():
    from tablegen.core.errors import SpecError
    sub = tablegen.substance("air")
    for tol in ("abc", -1.0, {"cp": None}, {"h": 1.0}):
        with pytest.raises(SpecError) as e:
            ip.auto_step(sub, ("cp",), 300.0, 400.0, tol)
        assert "tolerance" in str(e.value)


def test_species_class_defaults():
    assert ev.species_class({"Ar": 1}) == "noble gas"
    assert ev.species_class({"O": 1}) == "monatomic"
    assert ev.species_class({"N": 2}) == "diatomic"
    assert ev.species_class({"O": 1, "H": 1}, "OH") == "diatomic radical"
    assert ev.species_class({"C": 1, "O": 2}) == "small polyatomic"
    assert ev.species_class({"N": 1, "O": 2}, "NO2") == "polyatomic radical"
    assert ev.species_class({"C": 1, "H": 4}) == "hydrocarbon or larger"
    assert ev.species_class({"C": 6, "H": 14}) == "hydrocarbon or larger"


def test_interpolation_bounds_in_chunks_equal_one_grid_over_the_table(monkeypatch):
    # a long table's fine grids are evaluated chunk by chunk (memory); every chunk stays on
    # the polynomial's array path, so the bounds are the very numbers one grid gives
    from tablegen.thermo.polynomial import SMALL
    assert ip.BOUND_CHUNK // 2 * 33 > SMALL
    sub = tablegen.substance("CO2")
    rows = np.arange(200.0, 200.0 + 2.5 * ip.BOUND_CHUNK + 7)
    keys = ("cp", "h", "s0", "Pr", "vr")
    chunked = ip.interpolation_bounds(sub, keys, rows)
    assert len(ip._chunks(rows.size - 1)) == 3
    monkeypatch.setattr(ip, "BOUND_CHUNK", 10 ** 9)
    whole = ip.interpolation_bounds(sub, keys, rows)
    for k in keys:
        assert np.array_equal(chunked[k], whole[k]), k
