"""reportlab's optional C accelerator (rl-accel, from the package index) changes no byte.

rl-accel is a test dependency so that this check runs everywhere the tests do; users may
install it (`pip install 'tablegen[fast]'`) for faster PDF writing. reportlab falls back to
its pure-Python functions when `_rl_accel` cannot be imported (reportlab/lib/rl_accel.py),
which the second build forces.
"""

import hashlib
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
BUILD = ("import sys{block}\nfrom tablegen import cli\n"
         "sys.exit(cli.main(['build', {spec!r}, '--out', {out!r}, '--quiet']))")


def _build(out: Path, *, accelerated: bool) -> dict:
    block = "" if accelerated else "; sys.modules['_rl_accel'] = None"
    code = BUILD.format(block=block, spec=str(ROOT / "docs/examples/plant-tables.toml"), out=str(out))
    subprocess.run([sys.executable, "-c", code], check=True, cwd=ROOT)
    return {p.name: hashlib.sha256(p.read_bytes()).hexdigest() for p in sorted(out.iterdir())}


def test_the_accelerator_is_installed_with_the_tests():
    import _rl_accel  # noqa: F401  (a missing test dependency fails, it does not skip)


def test_books_are_byte_identical_with_and_without_the_accelerator(tmp_path):
    fast = _build(tmp_path / "fast", accelerated=True)
    plain = _build(tmp_path / "plain", accelerated=False)
    assert any(n.endswith(".pdf") for n in fast)
    assert fast == plain
