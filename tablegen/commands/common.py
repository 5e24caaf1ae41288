"""Pieces the commands share: option parsing for datums, JSON output, messages."""

from __future__ import annotations

import sys

from ..errors import TablegenError
from ..jsonout import clean, dumps  # noqa: F401  (the commands import them from here)


def add_datum_options(p, *, with_pressure: bool = True):
    g = p.add_argument_group("datums and scales")
    g.add_argument("--h-datum", default="formation", metavar="DATUM",
                   help="formation (default: h(298.15 K) = enthalpy of formation) or "
                        "sensible[:T[:h]] (h(T) = h kJ/kg, default 298.15 K and 0), e.g. sensible:0C")
    g.add_argument("--p-ref", default="1bar", metavar="P",
                   help="entropy reference pressure P°: 1bar (default) or 1atm (any pressure with a unit)")
    g.add_argument("--anchor", default=None, metavar="T=..,Pr=..,vr=..",
                   help="Pr/vr scale: Pr and vr at temperature T (default T=298.15K,Pr=1,vr=1)")
    g.add_argument("--extrapolate", action="store_true",
                   help="allow temperatures outside the data range; such values are marked")


def datum_from_text(text: str):
    from ..thermo.substance import Datum
    from ..units import quantity, temperature_K
    t = (text or "formation").strip()
    if t == "formation":
        return Datum("formation")
    if t == "sensible" or t.startswith("sensible:"):
        parts = t.split(":")[1:]
        T = temperature_K(parts[0], "--h-datum temperature") if parts and parts[0] else 298.15
        h = quantity(parts[1], "specific_energy", "--h-datum enthalpy") if len(parts) > 1 else 0.0
        return Datum("sensible", T, h)
    raise TablegenError(f"--h-datum {text!r} is not known; allowed: formation, sensible, sensible:T, sensible:T:h")


def anchor_from_text(text: str | None):
    from ..thermo.substance import Anchor
    from ..units import temperature_K
    if not text:
        return Anchor()
    vals = {}
    for part in text.split(","):
        if "=" not in part:
            raise TablegenError(f"--anchor {text!r}: write T=298.15K,Pr=1,vr=1")
        k, v = (x.strip() for x in part.split("=", 1))
        if k not in ("T", "Pr", "vr"):
            raise TablegenError(f"--anchor: unknown key {k!r}; allowed: T, Pr, vr")
        if k == "T":
            vals["T_K"] = temperature_K(v, "--anchor T")
        else:
            try:
                vals[k] = float(v)
            except ValueError:
                raise TablegenError(f"--anchor {k}={v!r} is not a number") from None
    return Anchor(**vals)


def data_notices(args):
    """Print the library's notices once, on stderr unless --quiet.

    They say which user records replace shipped ones and what validation
    found in user files (tablegen.data.library.Library.messages).
    """
    from ..data.library import library
    lib = library(tuple(getattr(args, "data", ()) or ()))
    if not lib.announced:
        lib.announced = True
        for m in lib.messages:
            notice(args, f"note: {m}")
    return lib


def substance_with_options(args, name: str):
    """Resolve a substance and apply --h-datum, --p-ref and --anchor."""
    from .. import api
    from ..units import pressure_Pa
    data_notices(args)
    sub = api.substance(name, source=args.source, data=args.data)
    return sub.with_options(datum=datum_from_text(getattr(args, "h_datum", None)),
                            P_ref_Pa=pressure_Pa(getattr(args, "p_ref", "1bar") or "1bar", "--p-ref"),
                            anchor=anchor_from_text(getattr(args, "anchor", None)))


def published(args, out, files, notes, what: str, detail: str = "", paths: bool = True) -> None:
    """After a folder was published: its notes, one 'wrote' line, and (paths) every file on stdout."""
    from ..outfiles import MANIFEST
    for n in notes:
        notice(args, n)
    notice(args, f"wrote {len(files)} {what} and their manifest {MANIFEST} to {out}/{detail}")
    if paths:
        for name in sorted([*files, MANIFEST]):
            print(out / name)


#: Notices of the running command, printed only once it has succeeded (None: print at once).
_held: list | None = None


def hold_notices() -> None:
    """Keep notices until the command ends, so a refusal is the only line on stderr."""
    global _held
    _held = []


def release_notices(print_them: bool) -> None:
    """Print the held notices (after success) or drop them (after a refusal)."""
    global _held
    held, _held = _held or [], None
    if print_them:
        for text in held:
            print(text, file=sys.stderr)


def notice(args, text: str):
    if getattr(args, "quiet", False):
        return
    if _held is not None:
        _held.append(text)
    else:
        print(text, file=sys.stderr)
