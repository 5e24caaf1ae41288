"""The package works from an installed layout (gasdata inside the package as
tablegen/_gasdata, as the wheel ships it), not only from a checkout."""

import os
import shutil
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def test_runs_from_wheel_layout(tmp_path):
    pkg = tmp_path / "site"
    shutil.copytree(ROOT / "tablegen", pkg / "tablegen", ignore=shutil.ignore_patterns("__pycache__"))
    shutil.copytree(ROOT / "gasdata", pkg / "tablegen" / "_gasdata")
    env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
    env["PYTHONPATH"] = str(pkg)
    res = subprocess.run([sys.executable, "-m", "tablegen", "state", "CO2", "--T", "300K", "--json"],
                         cwd=tmp_path, env=env, capture_output=True, text=True)
    assert res.returncode == 0, res.stderr
    assert '"substance": "CO2"' in res.stdout
    res = subprocess.run([sys.executable, "-c", "import tablegen.data.library as l; print(l.gasdata_dir())"],
                         cwd=tmp_path, env=env, capture_output=True, text=True)
    assert res.stdout.strip().endswith("_gasdata")
