"""Write gasdata/agreement-compiled.json from gasdata/agreement.toml and agreement-janaf.toml.

Run it after either file changes (tools/agreement.py and tools/janaf_agreement.py say so);
tests/test_curation.py fails while the compiled file does not match its sources, and
tablegen reads the TOML instead of a stale compiled file. Usage:

    python tools/compile_agreement.py
"""

import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from tablegen.calc import agreement_compiled, evidence  # noqa: E402


def compiled_bytes(gasdata: Path) -> bytes:
    sources = {}
    for name in evidence.AGREEMENT_FILES:
        p = gasdata / name
        if p.is_file():
            sources[name] = (p.read_bytes(), evidence._read_agreement(str(p)))
    return agreement_compiled.to_bytes(agreement_compiled.compile_rows(sources))


def main() -> int:
    gasdata = ROOT / "gasdata"
    out = gasdata / agreement_compiled.COMPILED
    data = compiled_bytes(gasdata)
    tmp = out.with_suffix(".json.tmp")
    tmp.write_bytes(data)
    tmp.replace(out)
    print(f"wrote {out.relative_to(ROOT)} ({len(data):,} bytes)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
