"""Book specs, the [document] table: title block, paper, units, basis and reference conditions.

Parsed once into the frozen :class:`Document` that every table of the book reads
(tablegen.spec.book puts the spec together).
"""

from __future__ import annotations

import datetime as _dt
import difflib
from dataclasses import dataclass

from ..core.units import P_ATM
from .values import (ORIENTATIONS, UNIT_SYSTEMS, _barometer, _check_keys, _choice, _fail, _get, _paper,
                     _pressure, _temperature, _text, _typename)

BASES = ("mass", "molar", "volumetric")

#: Named reference conditions of the volumetric basis: name -> (T_K, P_Pa, text).
REFERENCE_CONDITIONS = {
    "normal": (273.15, 101325.0, "normal conditions, 0 °C and 101.325 kPa (DIN 1343)"),
    "standard-15C": (288.15, 101325.0, "standard conditions, 15 °C and 101.325 kPa (ISO 13443)"),
    # 14.696 psia x 6894.757293168 Pa/psia (exact psi, see tablegen.core.units)
    "standard-60F": ((60 + 459.67) * 5 / 9, 14.696 * 6894.757293168361,
                     "standard conditions, 60 °F and 14.696 psia"),
}


# ---------------------------------------------------------------- dataclasses
@dataclass(frozen=True, slots=True)
class Reference:
    """Reference conditions of the volumetric basis (normal or standard m³, ft³)."""

    name: str
    T_K: float
    P_Pa: float
    text: str


@dataclass(frozen=True, slots=True)
class Document:
    title: str
    number: str
    revision: str
    issue_date: str
    organisation: str
    prepared_by: str
    checked_by: str
    approved_by: str
    paper: str
    orientation: str
    units: str
    basis: str
    reference: Reference
    source: str | None
    subtitle: str
    max_pressure_Pa: float = 1e5      # largest pressure the values are used at (ideal-gas term of U)
    uncertainty_columns: bool = False  # U_<key> columns in the CSV files
    validity_columns: bool = False     # Z and real-gas departure columns in the CSV files
    csv_comments: bool = False         # "#" comment lines above the CSV header (off: plain CSV)
    chart_placement: str = "after-table"  # or "grouped": all chart pages after the last table
    barometer_Pa: float | None = None  # barometric pressure of gauge values (None: not given, 1.01325 bar)
    extrapolate_all: bool = False      # every table extrapolates: the command line asked (build --extrapolate)

    @property
    def barometer(self) -> float:
        """Barometric pressure that the spec's gauge pressures are read against, Pa."""
        return P_ATM if self.barometer_Pa is None else self.barometer_Pa



DOCUMENT_KEYS = ("title", "subtitle", "number", "revision", "issue_date", "organisation",
                 "prepared_by", "checked_by", "approved_by", "paper", "orientation", "units",
                 "basis", "reference", "source", "max_pressure", "uncertainty_columns", "validity_columns",
                 "chart_placement", "csv_comments", "barometer")


def parse_document(raw, where="document") -> Document:
    if not isinstance(raw, dict):
        _fail(where, f"must be a table ([document]), not {_typename(raw)}")
    _check_keys(raw, DOCUMENT_KEYS, where)
    date = raw.get("issue_date")
    if date is None:
        date = _dt.datetime.now(_dt.timezone.utc).date().isoformat()
    elif isinstance(date, _dt.date) and not isinstance(date, _dt.datetime):
        date = date.isoformat()
    elif isinstance(date, str):
        try:
            date = _dt.date.fromisoformat(date.strip()).isoformat()
        except ValueError:
            _fail(f"{where}.issue_date", f"{date!r} is not a date; write YYYY-MM-DD, e.g. 2026-11-30")
    else:
        _fail(f"{where}.issue_date", f"must be a date YYYY-MM-DD, not {_typename(date)}")
    baro = _barometer(raw.get("barometer"), f"{where}.barometer")
    return Document(
        title=_text(raw, "title", where, required=True),
        subtitle=_text(raw, "subtitle", where),
        number=_text(raw, "number", where, required=True, max_len=60),
        revision=_text(raw, "revision", where, required=True, max_len=20),
        issue_date=date,
        organisation=_text(raw, "organisation", where),
        prepared_by=_text(raw, "prepared_by", where, max_len=80),
        checked_by=_text(raw, "checked_by", where, max_len=80),
        approved_by=_text(raw, "approved_by", where, max_len=80),
        paper=_paper(raw, where, "A4"),
        orientation=_choice(raw, "orientation", ORIENTATIONS, where, "portrait"),
        units=_choice(raw, "units", UNIT_SYSTEMS, where, "SI"),
        basis=_choice(raw, "basis", BASES, where, "mass"),
        reference=_reference(raw.get("reference", "normal"), f"{where}.reference"),
        source=_get(raw, "source", str, where, None),
        max_pressure_Pa=_pressure(raw.get("max_pressure", "1 bar"), f"{where}.max_pressure", baro),
        uncertainty_columns=_get(raw, "uncertainty_columns", bool, where, False),
        validity_columns=_get(raw, "validity_columns", bool, where, False),
        csv_comments=_get(raw, "csv_comments", bool, where, False),
        chart_placement=_choice(raw, "chart_placement", ("after-table", "grouped"), where, "after-table"),
        barometer_Pa=None if "barometer" not in raw else baro,
    )


def _reference(v, where) -> Reference:
    if isinstance(v, str):
        if v not in REFERENCE_CONDITIONS:
            close = difflib.get_close_matches(v, list(REFERENCE_CONDITIONS), n=1, cutoff=0.5)
            hint = f"did you mean {close[0]!r}? " if close else ""
            _fail(where, f"{v!r} is not known; {hint}allowed: {', '.join(REFERENCE_CONDITIONS)}, "
                         f"or a table {{name = ..., T = ..., P = ...}}")
        T, P, text = REFERENCE_CONDITIONS[v]
        return Reference(v, T, P, text)
    if isinstance(v, dict):
        _check_keys(v, ("name", "T", "P"), where)
        name = _text(v, "name", where, required=True, max_len=40)
        T = _temperature(_get(v, "T", str, where, required=True), f"{where}.T")
        P = _pressure(_get(v, "P", str, where, required=True), f"{where}.P")
        return Reference(name, T, P, f"{name}, {T:g} K and {P / 1000:g} kPa")
    _fail(where, f"must be a name ({', '.join(REFERENCE_CONDITIONS)}) or a table, not {_typename(v)}")

