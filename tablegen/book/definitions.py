"""The words a book prints for its columns and reference pressures: plain text, no
thermodynamics, so renderers (CSV metadata, front matter) read them without the model."""

from __future__ import annotations

#: key -> (printed symbol, name, formula as printed on the "how to read" page)
DEFINITIONS = {
    "T": ("T", "temperature", "the row's temperature; the grid is exact in the unit it was given in"),
    "cp": ("cₚ", "isobaric heat capacity", "cₚ(T) from the NASA polynomial, cₚ/R = Σ aᵢ Tⁱ"),
    "cv": ("cᵥ", "isochoric heat capacity", "cᵥ = cₚ − R"),
    "k": ("k", "ratio of heat capacities", "k = cₚ / cᵥ"),
    "h": ("h", "enthalpy", "h(T) = h(T₀) + ∫ cₚ dT, with the table's enthalpy datum"),
    "u": ("u", "internal energy", "u = h − R T"),
    "s0": ("s°", "entropy at P°", "s°(T) = s°(T₀) + ∫ (cₚ/T) dT at the reference pressure P°; "
                                  "at pressure P: s(T, P) = s°(T) − R ln(P/P°)"),
    "Pr": ("Pr", "relative pressure", "Pr = Prₐ exp[(s°(T) − s°(Tₐ))/R]; along an isentrope "
                                      "P₂/P₁ = Pr₂/Pr₁"),
    "vr": ("vr", "relative volume", "vr = vrₐ (T/Tₐ)(Prₐ/Pr); along an isentrope v₂/v₁ = vr₂/vr₁"),
    "a": ("a", "speed of sound", "a = √(k R T) (ideal gas)"),
    "g0": ("g°", "Gibbs energy at P°", "g° = h − T s°"),
    "cp_mean_h": ("c̄ₚ,h", "mean cₚ for enthalpy",
                  "c̄ₚ,h = [h(T) − h(Tₘ)]/(T − Tₘ); at T = Tₘ the limit cₚ(Tₘ) is printed; "
                  "heat from Tₘ to T is c̄ₚ,h (T − Tₘ)"),
    "cp_mean_s": ("c̄ₚ,s", "mean cₚ for entropy",
                  "c̄ₚ,s = [s°(T) − s°(Tₘ)]/ln(T/Tₘ); at T = Tₘ the limit cₚ(Tₘ) is printed"),
}


def pressure_text(P: float) -> str:
    if abs(P - 1e5) < 1e-6:
        return "1 bar (100 kPa)"
    if abs(P - 101325.0) < 1e-6:
        return "1 atm (101.325 kPa)"
    return f"{P / 1000:g} kPa"
