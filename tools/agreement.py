"""Write gasdata/agreement.toml and gasdata/defaults.toml.

The figures and the default rule live in tablegen/calc/agreement.py; this script
only runs them over the shipped data and writes the two files (atomically).
Run from the project root after any change to a shipped data set:

    python3 tools/agreement.py

Needs CoolProp (the ideal-gas parts of its equations of state are one of the
compared sources). Same data and CoolProp version in, same bytes out.
"""

from __future__ import annotations

import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
from tablegen.calc.agreement import all_figures, defaults_from, render_agreement, render_defaults  # noqa: E402
from tablegen.core.filewrite import write_bytes  # noqa: E402


def main() -> int:
    rows = all_figures()
    defaults = defaults_from(rows)
    write_bytes(ROOT / "gasdata" / "agreement.toml", render_agreement(rows).encode("utf-8"))
    write_bytes(ROOT / "gasdata" / "defaults.toml", render_defaults(defaults).encode("utf-8"))
    n_species = len({r["species"] for r in rows})
    print(f"wrote gasdata/agreement.toml ({len(rows)} figures, {n_species} species) and "
          f"gasdata/defaults.toml ({len(defaults)} defaults)", file=sys.stderr)
    for sid, d in defaults.items():
        flag = "" if d["sources_agree"] else "  [sources disagree]"
        print(f"  {sid:10s} {d['source']:13s}{flag}", file=sys.stderr)
    import compile_agreement      # the compact copy every budget reads
    return compile_agreement.main()


if __name__ == "__main__":
    raise SystemExit(main())
