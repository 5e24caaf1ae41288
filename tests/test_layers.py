"""The import contracts of pyproject.toml ([tool.importlinter]) hold, and they can fail.

import-linter (from the package index) builds the graph of every import in the package,
imports inside functions included, so a lazy import against the flow is caught too.
"""

import shutil
from pathlib import Path

from importlinter.cli import lint_imports

ROOT = Path(__file__).resolve().parents[1]


def _lint(root: Path, monkeypatch) -> int:
    monkeypatch.chdir(root)
    monkeypatch.syspath_prepend(str(root))
    return lint_imports(config_filename=str(root / "pyproject.toml"), no_cache=True, no_logo=True)


def test_import_contracts_hold(monkeypatch):
    assert _lint(ROOT, monkeypatch) == 0


def test_a_wrong_import_breaks_a_contract(tmp_path, monkeypatch):
    # a scratch copy of the package with thermo importing matplotlib (inside a function,
    # as a lazy import would) must fail the contracts
    shutil.copytree(ROOT / "tablegen", tmp_path / "tablegen", ignore=shutil.ignore_patterns("__pycache__"))
    shutil.copy(ROOT / "pyproject.toml", tmp_path / "pyproject.toml")
    poly = tmp_path / "tablegen" / "thermo" / "polynomial.py"
    poly.write_text(poly.read_text(encoding="utf-8") + "\n\ndef _plot():\n    import matplotlib\n",
                    encoding="utf-8")
    for name in [m for m in list(__import__("sys").modules) if m == "tablegen" or m.startswith("tablegen.")]:
        monkeypatch.delitem(__import__("sys").modules, name)
    assert _lint(tmp_path, monkeypatch) != 0


def test_no_import_cycles():
    # grimp (import-linter's import graph) sees every import, lazy ones included
    import grimp
    graph = grimp.build_graph("tablegen")
    cycles = set()
    for module in graph.modules:
        for imported in graph.find_modules_directly_imported_by(module):
            chain = graph.find_shortest_chain(importer=imported, imported=module)
            if chain:
                cycles.add(" -> ".join((module, *chain)))
    assert not cycles, "import cycles:\n" + "\n".join(sorted(cycles))
