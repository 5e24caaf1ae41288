"""Uncertainty of a combustion calculation's inputs, carried into its results.

The inputs a plant states with an uncertainty are the parts of the fuel analysis
(``CH4=87%±0.5%``, or a fuel table's ``uncertainty``) and a measured flue-gas O2
(``--o2-dry 3.5%±0.2%``). Each ``±U`` is an expanded uncertainty with coverage
factor k = 2, as certificates of analysis state it; its standard uncertainty is
u = U/2.

Propagation is the law of propagation of uncertainty of JCGM 100:2008 (GUM),
5.1.2, for independent inputs: for a result Y = f(x1, ..., xN),

    u(Y)^2 = sum_i (c_i u(x_i))^2,   c_i = df/dx_i,

with each sensitivity coefficient c_i a central difference of the whole
combustion calculation (5.1.3 allows a numerical derivative). A part of the
analysis is moved by ±δ and the analysis renormalised to a sum of 1, so the other
parts scale (the convention of the composition part of tablegen.calc.uncertainty); the
measured O2 is moved by ±δ directly. The results so treated: λ and the other
figures of the result (FIGURES, keys of tablegen.calc.burn_result.figure_values),
and the wet and dry flue-gas mole fractions, whose change per standard uncertainty
of each input (a signed vector, so the correlation between CO2, H2O and N2 is
kept) is handed to the uncertainty budget of every table of the flue gas (tablegen.calc.uncertainty, ``composition_inputs``).
"""

from __future__ import annotations

from dataclasses import dataclass

from ..core.errors import InputError

#: Figures (figure_values keys) whose uncertainty is stated (every scalar a combustion engineer reads off).
FIGURES = ("lambda", "excess_air_percent", "phi", "afr_mass", "afr_mass_dry_oxidant", "afr_molar", "afr_volume",
           "afr_mass_stoich", "afr_molar_stoich", "afr_volume_stoich", "oxidant_volume_per_kg",
           "flue_gas_mass_wet_per_kg", "flue_gas_mass_dry_per_kg", "flue_gas_volume_wet_per_kg",
           "flue_gas_volume_dry_per_kg", "flue_gas_volume_wet_per_m3_fuel", "flue_gas_volume_dry_per_m3_fuel",
           "M_flue_wet", "M_flue_dry", "dew_point_K", "lhv_mass", "hhv_mass", "lhv_molar", "hhv_molar",
           "lhv_volume", "hhv_volume", "t_adiabatic_K")
#: Step of a central difference in a fraction of the analysis (absolute), and in the O2 (% by volume).
STEP_FRACTION = 1e-5
STEP_O2_PERCENT = 1e-3
COVERAGE = 2.0


@dataclass(frozen=True, slots=True)
class Input:
    """One input stated with an uncertainty."""

    key: str          # "fuel:CH4" or "o2_dry" / "o2_wet"
    label: str        # "fuel CH4", "measured O2 (dry)"
    value: float      # as used: a fraction of the analysis, or the O2 in %
    U: float          # expanded (k = 2), same unit
    unit: str         # "fraction" or "%"


@dataclass(frozen=True, slots=True, eq=False)
class Propagation:
    """The stated input uncertainties and what they give.

    ``figures[name]`` = {"U": expanded (k = 2) uncertainty of that figure,
    "parts": {input label: signed standard contribution c u}}; ``wet`` and ``dry``
    = {input label: {species: signed change of its mole fraction for one standard
    uncertainty of the input}}; ``products`` = {"wet"/"dry": {species: U (k = 2)}}.
    """

    inputs: tuple
    figures: dict
    wet: dict
    dry: dict
    products: dict

    def U(self, figure: str) -> float | None:
        f = self.figures.get(figure)
        return None if f is None else f["U"]

    def to_json(self) -> dict:
        return {
            "coverage_factor": COVERAGE,
            "method": "JCGM 100:2008 5.1.2, independent inputs, sensitivity coefficients by central "
                      "differences of the combustion calculation; the analysis renormalised to 1",
            "inputs": [{"key": i.key, "label": i.label, "value": i.value, "U_k2": i.U, "unit": i.unit}
                       for i in self.inputs],
            "figures": {k: {"U_k2": v["U"], "standard_parts": dict(v["parts"])} for k, v in self.figures.items()},
            "products_U_k2": {b: dict(v) for b, v in self.products.items()},
            "products_wet_per_standard_uncertainty": {k: dict(v) for k, v in self.wet.items()},
            "products_dry_per_standard_uncertainty": {k: dict(v) for k, v in self.dry.items()},
        }


def _inputs(fuel, amount: dict, o2_U) -> list:
    out = []
    for part, U in fuel.uncertainty.items():
        out.append(Input(f"fuel:{part}", f"fuel {part}", float(fuel.given["fractions"][part]), float(U),
                         "fraction"))
    if o2_U:
        k = "o2_dry" if "o2_dry" in amount else "o2_wet"
        out.append(Input(k, f"measured O2 ({'dry' if k == 'o2_dry' else 'wet'})", float(amount[k]), float(o2_U), "%"))
    return out


def _moved(fuel, amount: dict, inp: Input, step: float):
    """(fuel, amount) with one input moved by ``step``."""
    if inp.key.startswith("fuel:"):
        part = inp.key[5:]
        x = dict(fuel.given["fractions"])
        x[part] = x[part] + step
        tot = sum(x.values())
        x = {k: v / tot for k, v in x.items()}
        if fuel.remake is None:  # pragma: no cover - only fuels with an analysis carry uncertainties
            raise InputError(f"fuel {fuel.id}: its analysis cannot be varied for the uncertainty")
        return fuel.remake(x), amount
    a = dict(amount)
    a[inp.key] = float(a[inp.key]) + step
    return fuel, a


def propagate(figures_at: dict, fuel, amount: dict, o2_U, rerun) -> Propagation:
    """Propagate the stated uncertainties of ``fuel`` and of a measured O2 through ``rerun``.

    Parameters
    ----------
    figures_at : the figures of the calculation at the stated inputs (tablegen.calc.burn_result.figure_values)
    fuel : Fuel with ``uncertainty`` (part -> U, k = 2) and ``remake``
    amount : {amount key: value} as given
    o2_U : expanded uncertainty (k = 2) of a measured O2, % by volume, or None
    rerun : callable(fuel, amount) -> figures of the same calculation
    """
    inputs = _inputs(fuel, amount, o2_U)
    figures = {k: {"U": 0.0, "parts": {}} for k in FIGURES if figures_at.get(k) is not None}
    wet, dry = {}, {}
    for inp in inputs:
        if inp.unit == "fraction":
            d = min(STEP_FRACTION, 0.5 * inp.value)
        else:
            d = min(STEP_O2_PERCENT, 0.5 * inp.value)
        hi = rerun(*_moved(fuel, amount, inp, d))
        lo = rerun(*_moved(fuel, amount, inp, -d))
        u = inp.U / COVERAGE
        for k, fig in figures.items():
            if hi.get(k) is None or lo.get(k) is None:
                continue
            fig["parts"][inp.label] = (hi[k] - lo[k]) / (2 * d) * u
        for basis, out in (("products_wet", wet), ("products_dry", dry)):
            species = dict.fromkeys([*figures_at[basis], *hi[basis], *lo[basis]])
            out[inp.label] = {sp: (hi[basis].get(sp, 0.0) - lo[basis].get(sp, 0.0)) / (2 * d) * u
                              for sp in species}
    for fig in figures.values():
        fig["U"] = COVERAGE * sum(c * c for c in fig["parts"].values()) ** 0.5
    products = {}
    for basis, per in (("wet", wet), ("dry", dry)):
        sp = dict.fromkeys(k for v in per.values() for k in v)
        products[basis] = {k: COVERAGE * sum(v.get(k, 0.0) ** 2 for v in per.values()) ** 0.5 for k in sp}
    return Propagation(tuple(inputs), figures, wet, dry, products)


def composition_inputs(substance) -> dict | None:
    """{input label: {species: change of mole fraction per standard uncertainty}} for the
    uncertainty budget of a flue gas made by a combustion with stated input uncertainties."""
    r = getattr(substance, "origin", None)
    prop = getattr(r, "uncertainty", None)
    if prop is None:
        return None
    ids = {c.id for c in substance.components}
    per = prop.wet if "H2O" in ids or r.products_dry is None else prop.dry
    out = {}
    for label, dy in per.items():
        v = {k: x for k, x in dy.items() if k in ids and x != 0.0}
        if v:
            out[label] = v
    return out or None
