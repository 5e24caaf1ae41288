"""The import contracts of pyproject.toml ([tool.importlinter]) hold, and they can fail.

import-linter (from the package index) builds the graph of every import in the package,
imports inside functions included, so a lazy import against the flow is caught too.
"""

import shutil
import sys
from pathlib import Path

import pytest
from importlinter.cli import lint_imports

ROOT = Path(__file__).resolve().parents[1]


def _lint(root: Path, monkeypatch) -> int:
    monkeypatch.chdir(root)
    monkeypatch.syspath_prepend(str(root))
    return lint_imports(config_filename=str(root / "pyproject.toml"), no_cache=True, no_logo=True)


def test_import_contracts_hold(monkeypatch):
    assert _lint(ROOT, monkeypatch) == 0


#: (file, lazy import added to it): each breaks one contract of pyproject.toml
WRONG_IMPORTS = [
    ("thermo/polynomial.py", "import matplotlib"),              # thermo draws
    ("thermo/substance.py", "from ..calc import uncertainty"),  # an arrow up the layers
    ("book/pdf.py", "from ..thermo import substance"),          # a renderer evaluates
]


@pytest.mark.parametrize("where, line", WRONG_IMPORTS)
def test_a_wrong_import_breaks_a_contract(where, line, tmp_path, monkeypatch):
    # a scratch copy of the package with one import against the flow, inside a function
    # as a lazy import would be, must fail the contracts
    shutil.copytree(ROOT / "tablegen", tmp_path / "tablegen", ignore=shutil.ignore_patterns("__pycache__"))
    shutil.copy(ROOT / "pyproject.toml", tmp_path / "pyproject.toml")
    module = tmp_path / "tablegen" / where
    module.write_text(module.read_text(encoding="utf-8") + f"\n\ndef _wrong():\n    {line}\n",
                      encoding="utf-8")
    for name in [m for m in list(sys.modules) if m == "tablegen" or m.startswith("tablegen.")]:
        monkeypatch.delitem(sys.modules, name)
    assert _lint(tmp_path, monkeypatch) != 0


def test_every_module_lives_in_a_layer():
    # the layers contract only sees modules inside its layers: a new top-level module would
    # escape it, so the top level holds the public API, the entry point and the CLI only
    top = sorted(p.name for p in (ROOT / "tablegen").iterdir() if p.suffix == ".py")
    assert top == ["__init__.py", "__main__.py", "cli.py"]
    layers = {p.name for p in (ROOT / "tablegen").iterdir() if p.is_dir() and (p / "__init__.py").exists()}
    assert layers == {"core", "data", "thermo", "calc", "spec", "book", "commands"}


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
