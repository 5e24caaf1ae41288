"""The typed result of a combustion calculation, and its one JSON form.

:class:`CombustionResult` is what :func:`tablegen.calc.burn.combustion` returns: the
fuel, the oxidant, the flue gas as Substances, and the figures a combustion engineer
checks, grouped in small frozen records (oxidant/fuel ratios, flue-gas quantities,
water dew point, heating values, flame temperature). Figures are SI inside (K, Pa,
J/kg, J/mol, m³ at the metering conditions, kg/kg and mol/kg of fuel); molar masses
are in kg/kmol as everywhere in tablegen.

:func:`to_json` is the one place that turns a result into its JSON object (the
``tablegen combust --json`` keys and units); :func:`figure_values` gives the same
figures flat, by JSON key, for the uncertainty propagation and the book's figure list.
"""

from __future__ import annotations

from dataclasses import dataclass

#: JSON key -> unit, stated in the JSON output under "units".
UNITS = {
    "lambda": "-", "excess_air_percent": "%", "phi": "-",
    "afr_mass_stoich": "kg oxidant/kg fuel", "afr_mass": "kg oxidant/kg fuel",
    "afr_mass_dry_oxidant_stoich": "kg dry oxidant/kg fuel", "afr_mass_dry_oxidant": "kg dry oxidant/kg fuel",
    "afr_molar_stoich": "mol oxidant/mol fuel", "afr_molar": "mol oxidant/mol fuel",
    "afr_volume_stoich": "m³ oxidant/m³ fuel (normal)", "afr_volume": "m³ oxidant/m³ fuel (normal)",
    "oxidant_volume_per_kg_stoich": "m³ (normal)/kg fuel", "oxidant_volume_per_kg": "m³ (normal)/kg fuel",
    "oxygen_stoich_mol_per_kg": "mol O2/kg fuel",
    "products_wet": "mole fraction", "products_dry": "mole fraction",
    "products_wet_mass": "mass fraction", "products_dry_mass": "mass fraction",
    "flue_gas_mol_wet_per_kg": "mol/kg fuel", "flue_gas_mol_dry_per_kg": "mol/kg fuel",
    "flue_gas_mass_wet_per_kg": "kg/kg fuel", "flue_gas_mass_dry_per_kg": "kg/kg fuel",
    "flue_gas_volume_wet_per_kg": "m³ (normal)/kg fuel", "flue_gas_volume_dry_per_kg": "m³ (normal)/kg fuel",
    "flue_gas_volume_wet_per_m3_fuel": "m³/m³ fuel (normal)", "flue_gas_volume_dry_per_m3_fuel": "m³/m³ fuel (normal)",
    "M_flue_wet": "kg/kmol", "M_flue_dry": "kg/kmol", "ash_mass_per_kg": "kg/kg fuel",
    "dew_point_K": "K", "water_partial_pressure_Pa": "Pa", "flue_pressure_Pa": "Pa",
    "lhv_mass": "MJ/kg", "hhv_mass": "MJ/kg", "lhv_molar": "MJ/kmol", "hhv_molar": "MJ/kmol",
    "lhv_volume": "MJ/m³ (normal)", "hhv_volume": "MJ/m³ (normal)",
    "h_vap_water_J_per_kg": "J/kg", "water_formed_kg_per_kg": "kg/kg fuel",
    "combustion_reference_T_K": "K", "metering_T_K": "K", "metering_P_Pa": "Pa",
    "t_adiabatic_K": "K", "T_fuel_K": "K", "T_oxidant_K": "K",
}


@dataclass(frozen=True, slots=True)
class AmountGiven:
    """The amount of oxidant as the user gave it.

    ``key`` is one of excess_air (``value`` in %), air_ratio (λ), phi (φ), o2_dry or
    o2_wet (measured flue-gas O2, % by volume); ``U_k2`` its expanded uncertainty
    (k = 2, same unit) or None; ``unit`` "%" or "-".
    """

    key: str
    value: float
    U_k2: float | None
    unit: str


@dataclass(frozen=True, slots=True)
class OxidantRatios:
    """Oxidant/fuel ratios, stoichiometric and actual (at the result's λ).

    Mass ratios are kg oxidant as supplied (humid if humid) per kg fuel, the
    ``dry_oxidant`` ones kg dry oxidant per kg fuel; molar ratios mol oxidant per mol
    fuel (gas and formula fuels, else None); volume ratios normal m³ oxidant per
    normal m³ fuel (gas fuels, else None; ideal gas, so equal to the molar ratio);
    ``volume_m3_per_kg`` normal m³ oxidant per kg fuel at the metering conditions.
    """

    oxygen_stoich_mol_per_kg: float        # mol O2 needed per kg fuel
    mass_stoich: float
    mass: float
    mass_dry_oxidant_stoich: float
    mass_dry_oxidant: float
    molar_stoich: float | None
    molar: float | None
    volume_stoich: float | None
    volume: float | None
    volume_m3_per_kg_stoich: float
    volume_m3_per_kg: float


@dataclass(frozen=True, slots=True)
class FlueGasQuantities:
    """The flue gas per unit of fuel and its composition.

    Compositions are {species id: fraction} in the order of the products (the dry
    ones empty when the flue gas is water only); amounts are per kg fuel, normal
    volumes at the metering conditions; the ``per_m3_fuel`` volumes are normal m³
    per normal m³ of a gas fuel (None for other fuels). The dry amounts are 0 and
    ``M_dry_kg_per_kmol`` None when the flue gas is water only.
    """

    mole_fractions_wet: dict
    mole_fractions_dry: dict
    mass_fractions_wet: dict
    mass_fractions_dry: dict
    mol_wet_per_kg: float
    mol_dry_per_kg: float
    kg_wet_per_kg: float
    kg_dry_per_kg: float
    m3_wet_per_kg: float
    m3_dry_per_kg: float
    m3_wet_per_m3_fuel: float | None
    m3_dry_per_m3_fuel: float | None
    M_wet_kg_per_kmol: float
    M_dry_kg_per_kmol: float | None
    ash_kg_per_kg: float                   # inert ash of the fuel, kg per kg fuel


@dataclass(frozen=True, slots=True)
class DewPoint:
    """The water dew point of the wet flue gas (IAPWS-IF97 eq. 31 at the water partial pressure).

    ``T_K`` is None when the water partial pressure is below the triple point
    (frost point, not computed); ``note`` says which.
    """

    T_K: float | None
    flue_pressure_Pa: float
    water_partial_pressure_Pa: float
    note: str


@dataclass(frozen=True, slots=True)
class HeatingValues:
    """Lower and higher heating values at the combustion reference temperature ``T_ref_K``.

    Per kg fuel (J/kg), per mol (J/mol; None without a molar mass) and per normal m³
    of a gas fuel at the metering conditions (J/m³; None for other fuels). The HHV
    condenses ``water_formed_kg_per_kg`` with ``h_vap_water_J_per_kg``.
    """

    lhv_J_per_kg: float
    hhv_J_per_kg: float
    lhv_J_per_mol: float | None
    hhv_J_per_mol: float | None
    lhv_J_per_m3: float | None
    hhv_J_per_m3: float | None
    h_vap_water_J_per_kg: float
    water_formed_kg_per_kg: float
    T_ref_K: float


@dataclass(frozen=True, slots=True)
class Flame:
    """The frozen adiabatic flame temperature and the inlet temperatures it assumes.

    ``T_adiabatic_K`` is None above the data range of the flue gas. The sources say
    where each inlet temperature came from ("as given", "the default", "stated with
    the oxidant"); None on the inner reruns of the uncertainty propagation.
    """

    T_adiabatic_K: float | None
    T_fuel_K: float
    T_oxidant_K: float
    T_fuel_source: str | None = None
    T_oxidant_source: str | None = None


@dataclass(frozen=True, slots=True, eq=False)
class CombustionResult:
    """Complete combustion of a fuel with an oxidant.

    ``products`` is the wet flue gas and ``products_dry`` the dry flue gas, both
    ordinary Substances (``products_dry`` is None when the flue gas is water only);
    ``cautions`` must be shown with every result. ``metering_T_K`` and
    ``metering_P_Pa`` are the conditions of every normal volume.
    """

    fuel: object                # tablegen.calc.fuels.Fuel
    oxidant: object             # tablegen.calc.oxidants.Oxidant
    air_ratio: float            # λ
    products: object
    products_dry: object
    moles_per_kg: dict          # product species -> mol per kg of fuel (wet)
    ratios: OxidantRatios
    flue_gas: FlueGasQuantities
    dew_point: DewPoint
    heating_values: HeatingValues
    flame: Flame
    metering_T_K: float
    metering_P_Pa: float
    notes: list
    cautions: list
    amount_given: AmountGiven | None = None
    uncertainty: object = None  # tablegen.calc.burn_inputs.Propagation of the stated input uncertainties

    @property
    def excess_air_percent(self) -> float:
        """Excess air, % (λ - 1) x 100."""
        return (self.air_ratio - 1) * 100

    @property
    def phi(self) -> float:
        """Equivalence ratio φ = 1/λ."""
        return 1 / self.air_ratio


def _scaled(v, factor):
    return None if v is None else v * factor


def figure_values(r: CombustionResult) -> dict:
    """The figures of a result by JSON key, in the JSON units (MJ/kg, MJ/kmol, MJ/m³ for heating values).

    Includes the four composition members (``products_wet`` ...) as dicts.
    """
    q, fg, dp, hv, fl = r.ratios, r.flue_gas, r.dew_point, r.heating_values, r.flame
    return {
        "lambda": r.air_ratio, "excess_air_percent": r.excess_air_percent, "phi": r.phi,
        "oxygen_stoich_mol_per_kg": q.oxygen_stoich_mol_per_kg,
        "afr_mass_stoich": q.mass_stoich, "afr_mass": q.mass,
        "afr_mass_dry_oxidant_stoich": q.mass_dry_oxidant_stoich, "afr_mass_dry_oxidant": q.mass_dry_oxidant,
        "afr_molar_stoich": q.molar_stoich, "afr_molar": q.molar,
        "afr_volume_stoich": q.volume_stoich, "afr_volume": q.volume,
        "oxidant_volume_per_kg_stoich": q.volume_m3_per_kg_stoich, "oxidant_volume_per_kg": q.volume_m3_per_kg,
        "products_wet": fg.mole_fractions_wet, "products_dry": fg.mole_fractions_dry,
        "products_wet_mass": fg.mass_fractions_wet, "products_dry_mass": fg.mass_fractions_dry,
        "flue_gas_mol_wet_per_kg": fg.mol_wet_per_kg, "flue_gas_mol_dry_per_kg": fg.mol_dry_per_kg,
        "flue_gas_mass_wet_per_kg": fg.kg_wet_per_kg, "flue_gas_mass_dry_per_kg": fg.kg_dry_per_kg,
        "flue_gas_volume_wet_per_kg": fg.m3_wet_per_kg, "flue_gas_volume_dry_per_kg": fg.m3_dry_per_kg,
        "flue_gas_volume_wet_per_m3_fuel": fg.m3_wet_per_m3_fuel,
        "flue_gas_volume_dry_per_m3_fuel": fg.m3_dry_per_m3_fuel,
        "M_flue_wet": fg.M_wet_kg_per_kmol, "M_flue_dry": fg.M_dry_kg_per_kmol,
        "ash_mass_per_kg": fg.ash_kg_per_kg,
        "metering_T_K": r.metering_T_K, "metering_P_Pa": r.metering_P_Pa,
        "combustion_reference_T_K": hv.T_ref_K,
        "flue_pressure_Pa": dp.flue_pressure_Pa, "water_partial_pressure_Pa": dp.water_partial_pressure_Pa,
        "dew_point_K": dp.T_K,
        "lhv_mass": hv.lhv_J_per_kg * 1e-6, "hhv_mass": hv.hhv_J_per_kg * 1e-6,
        "lhv_molar": _scaled(hv.lhv_J_per_mol, 1e-3), "hhv_molar": _scaled(hv.hhv_J_per_mol, 1e-3),
        "lhv_volume": _scaled(hv.lhv_J_per_m3, 1e-6), "hhv_volume": _scaled(hv.hhv_J_per_m3, 1e-6),
        "h_vap_water_J_per_kg": hv.h_vap_water_J_per_kg, "water_formed_kg_per_kg": hv.water_formed_kg_per_kg,
        "t_adiabatic_K": fl.T_adiabatic_K, "T_fuel_K": fl.T_fuel_K, "T_oxidant_K": fl.T_oxidant_K,
    }


def amount_json(a: AmountGiven | None) -> dict | None:
    """The ``amount_given`` member of the JSON."""
    return None if a is None else {"key": a.key, "value": a.value, "U_k2": a.U_k2, "unit": a.unit}


def to_json(r: CombustionResult) -> dict:
    """The JSON object of a result: every figure by key, the inputs as described, notes,
    cautions, units, the flue-gas substance name and (with stated input uncertainties)
    their propagation. ``tablegen combust --json`` prints it (sorted keys), adding the
    command's input as typed and any flows."""
    out = figure_values(r)
    out.update(dew_point_note=r.dew_point.note, fuel=r.fuel.describe(), oxidant=r.oxidant.describe(),
               notes=r.notes, cautions=r.cautions, T_fuel_source=r.flame.T_fuel_source,
               T_oxidant_source=r.flame.T_oxidant_source, amount_given=amount_json(r.amount_given))
    if r.uncertainty is not None:
        out["uncertainty"] = r.uncertainty.to_json()
    out["units"] = dict(UNITS)
    out["products_substance"] = r.products.id
    return out
