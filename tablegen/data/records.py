"""Library records: one species of a gasdata file, validated, with its polynomial.

:func:`build_record` checks a raw record (tablegen.data.validate) and builds its
polynomial; :class:`Summary` is what a listing shows without building it. The
files they come from are read by tablegen.data.datasets.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..core.constants import R_MOLAR
from ..core.errors import DataError
from ..thermo.polynomial import FORMS, SEVEN, Polynomial, seven_to_nine
from . import former_names
from . import validate

#: Reference pressure of every polynomial once loaded (NASA 1993 and 2002 use 1 bar).
P_STD_PA = 100000.0

#: Relative tolerance of the molar-mass check of a record against its elements.
#: Common practice: weights are abridged to 5 significant figures, so 1e-4.
M_TOLERANCE = 1e-4


def norm_name(s: str) -> str:
    return s.strip().casefold()


@dataclass(frozen=True, slots=True)
class AtomicWeights:
    weights: dict
    citation: str

    def molar_mass(self, elements: dict, where: str = "") -> float:
        total = 0.0
        for el, n in elements.items():
            if el not in self.weights:
                raise DataError(f"{where}unknown element {el!r}; known: {', '.join(sorted(self.weights))}")
            total += self.weights[el] * n
        return total


@dataclass(frozen=True, slots=True)
class Record:
    """One species record of a dataset, validated, with its polynomial."""

    id: str
    name: str
    aliases: tuple
    elements: dict
    M: float                      # g/mol = kg/kmol
    phase: str
    form: str
    poly: Polynomial              # molar, reference pressure 1 bar
    h_formation_298: float | None  # J/mol, derived from the polynomial
    dataset: str
    citation: str
    source_note: str
    file: str
    line: int
    extra: dict = field(default_factory=dict)
    #: validation findings that did not refuse the record (tablegen.data.validate.Finding)
    warnings: tuple = ()

    @property
    def T_min(self) -> float:
        return self.poly.T_min

    @property
    def T_max(self) -> float:
        return self.poly.T_max

    @property
    def source_text(self) -> str:
        note = f" [{self.source_note}]" if self.source_note else ""
        return f"{self.citation}{note}"


@dataclass(frozen=True, slots=True)
class Summary:
    """What a listing shows of a record, read without building or validating it."""

    id: str
    name: str
    aliases: tuple
    elements: dict
    M: float
    T_min: float
    T_max: float
    form: str
    dataset: str
    source_note: str


def summary_of(rec: Record) -> Summary:
    return Summary(rec.id, rec.name, rec.aliases, rec.elements, rec.M, rec.T_min, rec.T_max, rec.form,
                   rec.dataset, rec.source_note)


def _req(raw: dict, key: str, types, where: str):
    if key not in raw:
        raise DataError(f"{where}record lacks {key!r}")
    v = raw[key]
    if not isinstance(v, types) or isinstance(v, bool):
        raise DataError(f"{where}{key!r} has the wrong type ({type(v).__name__})")
    return v


def build_record(raw: dict, *, dataset, where: str, line: int) -> Record:
    """Validate one raw record and build its polynomial (molar, 1 bar).

    User data (``dataset.user``) are refused on any finding of
    tablegen.data.validate.check_polynomial that is an error; for shipped data
    those findings are kept in ``Record.warnings`` (``tablegen species --check``
    lists them) so that a shipped set never stops a table being made.
    """
    checks = raw.pop("_checks", {}) if isinstance(raw, dict) else {}
    hf = raw.get("h_formation_298_J_per_mol") if isinstance(raw, dict) else None
    if "h_formation_J_per_mol" not in checks and isinstance(hf, (int, float)) and not isinstance(hf, bool):
        checks = {**checks, "h_formation_J_per_mol": float(hf)}
    sid = _req(raw, "id", str, where)
    where = f"{where}{sid}: "
    elements = _req(raw, "elements", dict, where)
    form = former_names.form(_req(raw, "form", str, where))
    if form not in FORMS:
        raise DataError(f"{where}form {form!r} is not known; allowed: {', '.join(FORMS)}")
    bounds = [float(x) for x in _req(raw, "T_bounds_K", list, where)]
    rows = _req(raw, "coefficients", list, where)
    if len(rows) != len(bounds) - 1 or not rows:
        raise DataError(f"{where}{len(bounds)} bounds need {len(bounds) - 1} coefficient rows, found {len(rows)}")
    n_expect = 7 if form == SEVEN else 9
    c9 = []
    for k, r in enumerate(rows):
        if not isinstance(r, list) or len(r) != n_expect:
            raise DataError(f"{where}interval {k + 1} needs {n_expect} coefficients for {form}")
        try:
            r = [float(x) for x in r]
        except (TypeError, ValueError):
            raise DataError(f"{where}interval {k + 1} has a non-numeric coefficient") from None
        if not all(math.isfinite(x) for x in r):
            raise DataError(f"{where}interval {k + 1} has a non-finite coefficient")
        c9.append(seven_to_nine(r) if form == SEVEN else r)
    c9 = np.array(c9)
    if bounds != sorted(bounds) or len(set(bounds)) != len(bounds):
        raise DataError(f"{where}temperature bounds {bounds} must increase: the intervals must be "
                        f"contiguous and in order")
    if dataset.P_ref != P_STD_PA:
        # s°(1 bar) = s°(P_ref) + R ln(P_ref / 1 bar): shift the s/R constant
        c9[:, 8] += math.log(dataset.P_ref / P_STD_PA)
    try:
        poly = Polynomial(np.array(bounds), c9, form)
    except DataError as e:
        raise DataError(f"{where}{e}") from None
    M_el = dataset.weights.molar_mass(elements, where)
    M = float(raw.get("molar_mass_g_per_mol", M_el))
    # A card format rounds a fractional element count (a mixture written as one
    # record) to its field; the molar-mass check allows for that rounding, and
    # the printed molar mass is then the better value.
    res = checks.get("count_resolution", {})
    u_M = sum(dataset.weights.weights[e] * r for e, r in res.items() if e in dataset.weights.weights)
    if not (math.isfinite(M) and M > 0) or abs(M - M_el) > M_TOLERANCE * max(M_el, 1e-3) + u_M:
        raise DataError(f"{where}molar mass {M:.8g} g/mol does not match its elements "
                        f"({M_el:.8g} g/mol from {', '.join(f'{e} {n:g}' for e, n in elements.items())}); "
                        f"allowed difference {M_TOLERANCE * max(M_el, 1e-3) + u_M:.2g} g/mol")
    if u_M > 0:
        M_el = M
    found = validate.check_polynomial(poly, user=bool(getattr(dataset, "user", False)))
    errors = [f for f in found if f.severity == "error"]
    if errors and getattr(dataset, "user", False):
        raise DataError(f"{where}{errors[0].text}")
    found += validate.check_printed_enthalpy(poly, checks, R_MOLAR)
    for f in found:
        if f.severity == "warning" and getattr(dataset, "user", False):
            dataset.notes.append(f"{where}{f.text}")
    h298 = None
    if poly.T_min <= 298.15 <= poly.T_max:
        h298 = float(poly.evaluate(np.array([298.15]), want=("h",))["h"][0]) * R_MOLAR
    known = {"id", "name", "aliases", "elements", "molar_mass_g_per_mol", "phase", "form", "T_bounds_K",
             "coefficients", "h_formation_298_J_per_mol", "source", "source_note"}
    return Record(
        id=sid,
        name=str(raw.get("name", sid)),
        aliases=tuple(str(a) for a in raw.get("aliases", [])),
        elements={str(k): v for k, v in elements.items()},
        M=M_el,
        phase=str(raw.get("phase", "gas")),
        form=form,
        poly=poly,
        h_formation_298=h298,
        dataset=dataset.id,
        citation=dataset.citation,
        source_note=str(raw.get("source_note", "")),
        file=str(dataset.path),
        line=line,
        extra={k: v for k, v in raw.items() if k not in known},
        warnings=tuple(found),
    )


