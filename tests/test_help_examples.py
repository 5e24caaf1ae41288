"""Every example at the end of a command's --help runs as printed.

The examples are read from the help text itself (the block after the last 'example:' line,
continuation lines joined) and run in a scratch folder, in the order printed. The files they
name are made first from outside sources or from the documentation: NIST-JANAF tables (janaf
package) for the QA references and the fitted tables, the annotated spec of docs/spec.md, the
chart spec of docs/examples, the fuel-oil file of docs/combustion.md.
"""

import shlex
from pathlib import Path

import pytest

from janaf_ref import table
from tablegen.cli import COMMANDS, main

DOCS = Path(__file__).resolve().parents[1] / "docs"


def help_text(capsys, cmd: str | None) -> str:
    with pytest.raises(SystemExit) as e:
        main([cmd, "--help"] if cmd else ["--help"])
    assert e.value.code == 0
    return capsys.readouterr().out


def examples(text: str) -> list[list[str]]:
    """The command lines of the last 'example:' block, as argument lists (without 'tablegen')."""
    block = text[text.rfind("\nexample") + 1:].splitlines()[1:]
    lines, cur = [], ""
    for ln in block:
        s = ln.strip()
        if not s:
            break
        cur = f"{cur} {s}".strip()
        if cur.endswith("\\"):
            cur = cur[:-1].rstrip()
            continue
        lines.append(cur)
        cur = ""
    out = [shlex.split(ln) for ln in lines]
    assert out and all(a[0] == "tablegen" for a in out), lines
    return [a[1:] for a in out]


def _toml_block(doc: str, containing: str) -> str:
    for part in (DOCS / doc).read_text(encoding="utf-8").split("```toml\n")[1:]:
        body = part.split("```", 1)[0]
        if containing in body:
            return body
    raise AssertionError(f"no toml block with {containing!r} in docs/{doc}")


def _janaf_cp_csv(path: Path, species: str, with_h=False):
    t = table(species)
    keep = (t["T"] >= 200) & (t["T"] <= 6000)
    head = "T [K],cp_molar [J/(mol K)]" + (",dh298_molar [kJ/mol]" if with_h else "")
    rows = [f"{T:g},{cp:.3f}" + (f",{h / 1e3:.3f}" if with_h else "")
            for T, cp, h in zip(t["T"][keep], t["Cp"][keep], t["dH"][keep])]
    path.write_text("\n".join([head, *rows]) + "\n", encoding="utf-8")


def _state_rows(capsys, *argv):
    import json
    assert main(["state", *argv, "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def make_files(cmd: str, capsys):
    """The files the examples of ``cmd`` read, in the current folder."""
    if cmd == "build":
        Path("plant-tables.toml").write_text(_toml_block("spec.md", "[document]"), encoding="utf-8")
    elif cmd == "chart":
        Path("plant-charts.toml").write_text((DOCS / "examples" / "harwick-gt2-charts.toml").read_text(
            encoding="utf-8"), encoding="utf-8")
    elif cmd == "combust":
        Path("fuels").mkdir()
        Path("fuels/heavy-oil.toml").write_text(_toml_block("combustion.md", "analysis ="), encoding="utf-8")
    elif cmd == "fit":
        _janaf_cp_csv(Path("co2-table.csv"), "CO2")
        # an invented site gas: the cp of a methane-rich mixture, as a lab would tabulate it
        rows = _state_rows(capsys, "methane", "--T", ",".join(f"{t}K" for t in range(200, 6001, 100)))
        Path("site-gas-cp.csv").write_text("T [K],cp_molar [J/(mol K)]\n" + "".join(
            f"{r['T_K']:g},{r['cp_molar']:.4f}\n" for r in rows), encoding="utf-8")
    elif cmd == "species":
        assert main(["export", "CO2", "--format", "toml", "--id", "MYGAS", "--out", "my-gases.toml"]) == 0
    elif cmd == "compare":
        _janaf_cp_csv(Path("janaf-n2.csv"), "N2", with_h=True)
        T = [f"{t}K" for t in range(250, 2001, 50)]
        rows = _state_rows(capsys, "air", "--T", ",".join(T), "--h-datum", "sensible:0C")
        Path("handbook-air.txt").write_text("T [K]   h [kJ/kg]   Pr [-]   vr [-]\n" + "".join(
            f"{r['T_K']:g}  {r['h']:.3f}  {r['Pr'] * 1.2:.5g}  {r['vr'] * 0.8:.5g}\n" for r in rows), encoding="utf-8")
        rows = _state_rows(capsys, "CO2", "--T", ",".join(T), "--h-datum", "formation")
        Path("earlier-issue.csv").write_text("T [K],cp [kJ/(kg K)],h [kJ/kg]\n" + "".join(
            f"{r['T_K']:g},{r['cp']:.5f},{r['h']:.3f}\n" for r in rows), encoding="utf-8")
        Path("book.toml").write_text(_toml_block("spec.md", "[document]"), encoding="utf-8")
        assert main(["build", "book.toml", "--quiet"]) == 0
    capsys.readouterr()


#: Exit status of a run that worked: compare's 1 means "some cell out of tolerance", a verdict.
OK_STATUS = {"compare": (0, 1)}


@pytest.mark.parametrize("cmd", [None] + [c[0] for c in COMMANDS])
def test_every_help_example_runs(cmd, tmp_path, monkeypatch, capsys):
    text = help_text(capsys, cmd)
    monkeypatch.chdir(tmp_path)
    make_files(cmd, capsys)
    for argv in examples(text):
        code = main(argv)
        out, err = capsys.readouterr()
        assert code in OK_STATUS.get(cmd, (0,)), (argv, err)
        assert "Traceback" not in err
