"""gasdata/agreement-compiled.json is the shipped agreement TOML in compact form: it matches
its sources byte for byte (tools/compile_agreement.py rewrites it), gives every species the
same rows as the TOML, and a stale one is never read."""

import shutil
import sys
from pathlib import Path

from tablegen.calc import agreement_compiled as ac
from tablegen.calc import evidence

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "tools"))

from compile_agreement import compiled_bytes  # noqa: E402


def test_the_compiled_file_is_that_of_the_shipped_toml():
    # fails when agreement.toml or agreement-janaf.toml changed without
    # `python tools/compile_agreement.py`
    assert (ROOT / "gasdata" / ac.COMPILED).read_bytes() == compiled_bytes(ROOT / "gasdata")


def test_every_species_gets_the_rows_of_the_toml():
    compiled = ac.load(str(ROOT / "gasdata"), evidence.AGREEMENT_FILES)
    assert compiled is not None
    toml_rows = {}
    for name in evidence.AGREEMENT_FILES:
        for r in evidence._read_agreement(str(ROOT / "gasdata" / name)):
            toml_rows.setdefault(r["species"], []).append(r)
    assert set(compiled["rows"]) == set(toml_rows)
    for species, rows in toml_rows.items():
        assert ac.rows_of(compiled, species) == rows, species


def test_a_stale_compiled_file_is_not_read(tmp_path):
    for name in (*evidence.AGREEMENT_FILES, ac.COMPILED):
        shutil.copy(ROOT / "gasdata" / name, tmp_path / name)
    assert ac.load(str(tmp_path), evidence.AGREEMENT_FILES) is not None
    ac.load.cache_clear()
    src = tmp_path / evidence.AGREEMENT_FILES[0]
    src.write_bytes(src.read_bytes() + b"\n# edited\n")
    try:
        assert ac.load(str(tmp_path), evidence.AGREEMENT_FILES) is None
        (tmp_path / evidence.AGREEMENT_FILES[1]).unlink()
        ac.load.cache_clear()
        assert ac.load(str(tmp_path), evidence.AGREEMENT_FILES) is None
    finally:
        ac.load.cache_clear()
