"""Names of our own: the former form names are read (compatibility) and written nowhere.

The data reader maps the former lower-case form names and card-file extensions
(tablegen/data/former_names.py) onto the current ones; every other file of the
package, the docs and the shipped data uses only the current names, and no
composition is written in the former ':' spelling (the refusal tests in
tests/test_composition.py are where that spelling lives).
"""

import re
import shutil
from pathlib import Path

import numpy as np
import pytest

import tablegen
from tablegen.data import former_names
from tablegen.data.library import library

ROOT = Path(__file__).resolve().parents[1]
OLD7, OLD9 = "nasa" + "7", "nasa" + "9"      # spelt apart so this file is no hit of its own grep

#: Where the grep looks (the issue's scope) and the one file allowed to hold the former names.
SCOPE = ["tablegen", "docs", "gasdata", "README.md", "DEVELOPERS.md"]
COMPAT = ROOT / "tablegen" / "data" / "former_names.py"


def _files():
    for entry in SCOPE:
        p = ROOT / entry
        paths = [p] if p.is_file() else sorted(q for q in p.rglob("*") if q.is_file())
        for q in paths:
            if "__pycache__" in q.parts or q.suffix in (".pyc", ".png", ".pdf"):
                continue
            yield q


def test_former_form_names_occur_only_in_the_compatibility_reader():
    hits = []
    for f in _files():
        if f == COMPAT:
            continue
        for n, line in enumerate(f.read_text(encoding="utf-8").splitlines(), 1):
            if OLD7 in line or OLD9 in line:
                hits.append(f"{f.relative_to(ROOT)}:{n}: {line.strip()[:100]}")
    assert not hits, "\n".join(hits)
    text = COMPAT.read_text(encoding="utf-8")
    assert OLD7 in text and OLD9 in text


#: A composition part NAME:number (the former spelling), not an f-string format
#: ({x:.4f}, {sub.M:.4f}), a range (278K:323K) or a datum (sensible:0C); and the former
#: oxidant spelling base:key=value.
_COLON_COMPOSITION = re.compile(r"(?<![{\w.])[A-Z][A-Za-z0-9]*:[0-9.]+(?![0-9.]*[a-zA-Z}])"
                                r"|\b(?:air|oxygen):\w+=")


def test_no_composition_is_written_in_the_former_colon_spelling():
    hits = []
    for f in _files():
        for n, line in enumerate(f.read_text(encoding="utf-8").splitlines(), 1):
            if _COLON_COMPOSITION.search(line):
                hits.append(f"{f.relative_to(ROOT)}:{n}: {line.strip()[:100]}")
    assert not hits, "\n".join(hits)


def test_the_colon_pattern_finds_what_it_is_for():
    """The grep above can fail: it finds the former spellings and passes the look-alikes."""
    for bad in ('"CH4' + ':0.9,N2' + ':0.1"', "--oxidant air" + ":rh=60", "CO2" + ":90%"):
        assert _COLON_COMPOSITION.search(bad), bad
    for fine in ('f"{M:.4f}"', 'f"{sub.M:.4f}"', "T=278K:323K", "sensible:0C", "12:30", "C:/x.toml"):
        assert not _COLON_COMPOSITION.search(fine), fine


# ------------------------------------------------------------------ the compatibility path
def _old_file(tmp_path, name="old-set") -> Path:
    """gasdata/nasa1993.toml's CO2 and the NASA 2002 N2 record, as an earlier version wrote them."""
    src = (ROOT / "gasdata" / "nasa1993.toml").read_text(encoding="utf-8")
    co2 = re.search(r'\[\[species\]\]\nid = "CO2"\n.*?(?=\n\n|\Z)', src, re.S).group(0)
    src9 = (ROOT / "gasdata" / "nasa2002-air.toml").read_text(encoding="utf-8")
    n2 = re.search(r'\[\[species\]\]\nid = "N2"\n.*?(?=\n\n|\Z)', src9, re.S).group(0)
    co2 = co2.replace('id = "CO2"', 'id = "OLD-CO2"').replace('form = "7-coefficient"', f'form = "{OLD7}"')
    n2 = n2.replace('id = "N2"', 'id = "OLD-N2"').replace('form = "9-coefficient"', f'form = "{OLD9}"')
    assert f'form = "{OLD7}"' in co2 and f'form = "{OLD9}"' in n2
    co2 = re.sub(r'aliases = \[.*?\]', "aliases = []", co2)
    n2 = re.sub(r'aliases = \[.*?\]', "aliases = []", n2)
    f = tmp_path / f"{name}.toml"
    f.write_text(f'[dataset]\nid = "{name}"\ncitation = "copy for a test"\n\n{co2}\n\n{n2}\n', encoding="utf-8")
    return f


def test_records_with_the_former_form_names_are_read_as_the_current_forms(tmp_path):
    f = _old_file(tmp_path)
    lib = library((str(f),))
    old7, old9 = lib.record("OLD-CO2"), lib.record("OLD-N2")
    assert old7.form == "7-coefficient" and old9.form == "9-coefficient"
    for old, new in ((old7, lib.record("CO2", source="nasa1993")), (old9, lib.record("N2", source="nasa2002-air"))):
        np.testing.assert_array_equal(old.poly.T_bounds, new.poly.T_bounds)
        np.testing.assert_array_equal(old.poly.coeffs, new.poly.coeffs)   # the same numbers, read the same way
    out = tablegen.substance("OLD-CO2", data=(str(f),))
    assert out.poly.form == "7-coefficient"


@pytest.mark.parametrize("ext,fmt", sorted(former_names.EXTENSIONS.items()))
def test_card_files_with_the_former_extensions_are_read_from_a_folder(tmp_path, ext, fmt):
    sample = {"tm-4513": "tm4513-sample.dat", "tp-2002": "tp2002-sample.inp"}[fmt]
    folder = tmp_path / "site"
    folder.mkdir()
    shutil.copy(ROOT / "tests" / "data" / sample, folder / f"cards{ext}")
    lib = library((str(folder),))
    assert "cards" in lib.datasets and lib.datasets["cards"].format == fmt
    assert len(list(lib.datasets["cards"].records())) > 0


def test_former_names_are_not_accepted_on_the_command_line(capsys):
    """The compatibility path is in the data reader only: options take the current names."""
    from tablegen.cli import main
    for argv in (["export", "CO2", "--format", OLD7], ["fit", "x.csv", "--form", OLD9, "--formula", "CO2"]):
        assert main(argv) == 2
        err = capsys.readouterr().err
        assert len(err.strip().splitlines()) == 1 and "invalid choice" in err
