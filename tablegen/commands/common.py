"""Pieces the commands share: option parsing for datums, JSON output, messages."""

from __future__ import annotations

import sys

from ..core.errors import InputError, NameLookupError


#: --h-datum help where the default follows tablegen.thermo.substance.default_datum.
H_DATUM_DEFAULT_HELP = ("sensible[:T[:h]] (h(T) = h; the default, with T = 0 °C and h = 0, as no "
                        "reaction takes place here) or formation (h(298.15 K) = enthalpy of "
                        "formation, for reacting energy balances), e.g. sensible:25C")
#: --h-datum help of a reference chart (default_datum with reacting=None).
H_DATUM_REFERENCE_HELP = ("formation (h(298.15 K) = enthalpy of formation; the default, except for "
                          "combustion products) or sensible[:T[:h]] (h(T) = h; the default for "
                          "combustion products, with T = 0 °C and h = 0), e.g. sensible:25C")


def add_datum_options(p, *, with_pressure: bool = True, default: str | None = "formation",
                      datum_help: str = H_DATUM_DEFAULT_HELP):
    """--h-datum, --p-ref, --anchor, --extrapolate; ``default=None``: the substance's default
    datum (``datum_help`` says which)."""
    g = p.add_argument_group("datums and scales")
    g.add_argument("--h-datum", default=default, metavar="DATUM",
                   help=datum_help if default is None else
                   "formation (default: h(298.15 K) = enthalpy of formation) or "
                   "sensible[:T[:h]] (h(T) = h kJ/kg, default 298.15 K and 0), e.g. sensible:0C")
    g.add_argument("--p-ref", default="1bar", metavar="P",
                   help="entropy reference pressure P°: 1bar (default) or 1atm (any absolute pressure with a unit)")
    g.add_argument("--anchor", default=None, metavar="T=..,Pr=..,vr=..",
                   help="Pr/vr scale: Pr and vr at temperature T (default T=298.15K,Pr=1,vr=1)")
    g.add_argument("--extrapolate", action="store_true",
                   help="allow temperatures outside the data range; such values are marked")
    # what a refusal outside the data range names as the way to opt in (cli.main)
    p.set_defaults(extrapolate_option="--extrapolate")


def add_unit_options(p, *, pressure: bool = True, flow: str | None = None):
    """--units, --T-unit; --P-unit and --barometer where pressures are taken; --flow with help ``flow``."""
    g = p.add_argument_group(("flow, and " if flow else "") + "units of the answer (default: the units you typed)")
    if flow:
        g.add_argument("--flow", default=None, metavar="FLOW", help=flow)
    g.add_argument("--units", default=None, metavar="SYSTEM",
                   help="auto (default: the units of the question), SI (°C and K, bar, kJ/kg, kW, kg/s) "
                        "or US (°F and °R, psia, Btu/lbm, hp, lb/h)")
    g.add_argument("--T-unit", dest="T_unit", default=None, metavar="UNIT",
                   help="temperature unit of the answer: C, K, F or R (°C and °F come with K or °R beside)")
    if pressure:
        g.add_argument("--P-unit", dest="P_unit", default=None, metavar="UNIT",
                       help="pressure unit of the answer: bar, kPa, MPa, psia, ..., or a gauge unit "
                            "barg, mbarg, kPag, psig (then the absolute pressure is printed beside)")
        g.add_argument("--barometer", default=None, metavar="P",
                       help="barometric pressure that gauge values (barg, mbarg, kPag, psig) are read against, "
                            "absolute, e.g. 0.95bar or 950mbar (default 1.01325bar); printed beside "
                            "every converted value")


def datum_from_text(text: str | None, substance=None, *, by_rule: bool = False,
                    reacting: bool | None = False):
    """--h-datum text -> Datum.

    ``by_rule`` (state, process, chart): no text gives the substance's default
    datum (thermo.substance.default_datum with ``reacting``: False for state and
    process, None for a chart) and a bare ``sensible`` puts h = 0 at 0 °C, as
    that default does. Otherwise (compare) no text is the formation datum and a
    bare ``sensible`` means h = 0 at 298.15 K.
    """
    from ..core.constants import T_REF
    from ..thermo.substance import SENSIBLE_DATUM_T_K, Datum, default_datum
    from ..core.units import quantity, temperature_K
    if text is None:
        return default_datum(substance, reacting=reacting) if by_rule else Datum("formation")
    t = text.strip()
    if t == "formation":
        return Datum("formation")
    if t == "sensible" or t.startswith("sensible:"):
        parts = t.split(":")[1:]
        T = temperature_K(parts[0], "--h-datum temperature") if parts and parts[0] else \
            (SENSIBLE_DATUM_T_K if by_rule else T_REF)
        h = quantity(parts[1], "specific_energy", "--h-datum enthalpy") if len(parts) > 1 else 0.0
        return Datum("sensible", T, h)
    raise NameLookupError(f"--h-datum {text!r} is not known; allowed: formation, sensible, sensible:T, sensible:T:h")


def anchor_from_text(text: str | None):
    from ..thermo.substance import Anchor
    from ..core.units import temperature_K
    if not text:
        return Anchor()
    vals = {}
    for part in text.split(","):
        if "=" not in part:
            raise InputError(f"--anchor {text!r}: write T=298.15K,Pr=1,vr=1")
        k, v = (x.strip() for x in part.split("=", 1))
        if k not in ("T", "Pr", "vr"):
            raise NameLookupError(f"--anchor: unknown key {k!r}; allowed: T, Pr, vr")
        if k == "T":
            vals["T_K"] = temperature_K(v, "--anchor T")
        else:
            try:
                vals[k] = float(v)
            except ValueError:
                raise InputError(f"--anchor {k}={v!r} is not a number") from None
    return Anchor(**vals)


def data_notices(args):
    """Print the library's notices, on stderr unless --quiet: once in each run, however
    often a command asks (notice() says a text once per run; the library itself is
    cached for the process, so a flag on it would silence a second run in one process).

    They say which user records replace shipped ones and what validation
    found in user files (tablegen.data.library.Library.messages).
    """
    from ..data.library import library
    lib = library(tuple(getattr(args, "data", ()) or ()))
    for m in lib.messages:
        notice(args, f"note: {m}")
    return lib


def substance_with_options(args, name: str, *, by_rule: bool = False, reacting: bool | None = False):
    """Resolve a substance and apply --h-datum, --p-ref and --anchor (see datum_from_text)."""
    from ..calc import names as api
    from ..core.units import pressure_Pa
    data_notices(args)
    sub = api.substance(name, source=args.source, data=args.data)
    return sub.with_options(datum=datum_from_text(getattr(args, "h_datum", None), sub, by_rule=by_rule,
                                                  reacting=reacting),
                            P_ref_Pa=pressure_Pa(getattr(args, "p_ref", "1bar") or "1bar", "--p-ref"),
                            anchor=anchor_from_text(getattr(args, "anchor", None)))


def published(args, out, files, notes, what: str, detail: str = "", paths: bool = True) -> None:
    """After a folder was published: its notes, one 'wrote' line, and (paths) every file on stdout."""
    from ..core.outfiles import MANIFEST
    for n in notes:
        notice(args, n)
    notice(args, f"wrote {len(files)} {what} and their manifest {MANIFEST} to {out}/{detail}")
    if paths:
        for name in sorted([*files, MANIFEST]):
            print(out / name)


#: Notices of the running command, printed only once it has succeeded (None: print at once).
_held: list | None = None
#: Notices already given in this run: each is said once (a note repeated per table or per
#: substance tells the reader nothing new).
_said: set = set()


def hold_notices() -> None:
    """Keep notices until the command ends, so a refusal is the only line on stderr."""
    global _held
    _held = []
    _said.clear()


def release_notices(print_them: bool) -> None:
    """Print the held notices (after success) or drop them (after a refusal)."""
    global _held
    held, _held = _held or [], None
    if print_them:
        for text in held:
            print(text, file=sys.stderr)


def notice(args, text: str):
    """A message line on stderr (held until the command succeeds; each text once per run)."""
    if getattr(args, "quiet", False) or text in _said:
        return
    _said.add(text)
    if _held is not None:
        _held.append(text)
    else:
        print(text, file=sys.stderr)
