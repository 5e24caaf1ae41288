"""Every documented example runs: README.md, docs/*.md and every command's --help.

An example is a command line that starts with ``tablegen `` (after an optional
``$ ``):

* in Markdown, a line of a fenced or indented code block, or an inline code span
  in the prose; a trailing ``\\`` continues it on the next line;
* in a command's help, a line of its ``example:`` block (tablegen --help too).

Usage synopses are not examples: in code blocks they begin with ``usage:``; an
inline span is a synopsis when it holds a placeholder (a word of PLACEHOLDERS, or
``[``, ``|``, ``..``). A text states another exit status in a comment on the line
(``# exit 1``, ``# exits 2: ...``); otherwise 0 is expected.

The examples of one text run in order in one temporary folder (a later example
may read what an earlier one wrote), through tablegen.cli.main in a worker
process that tests/conftest.py starts once the session's tests are collected, so
they take a second core while the rest of the suite runs. The
folder holds a copy of docs/examples/ twice: under docs/examples/ (as a reader in
a checkout types the paths) and at its top level (as the help texts name the
files). DEVELOPERS.md, "Documented examples", says how to add one.
"""

from __future__ import annotations

import contextlib
import io
import os
import re
import shlex
import shutil
import tempfile
from pathlib import Path

import pytest

from tablegen import cli

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = ROOT / "docs" / "examples"
DOCS = [ROOT / "README.md", *sorted((ROOT / "docs").glob("*.md"))]

#: Words that stand for something the reader fills in (synopses, not examples).
PLACEHOLDERS = {"SPEC.toml", "SUBSTANCE", "SUBSTANCE-OR-SPEC", "REFERENCE", "LIST", "STEP", "SPEC", "P",
                "ID", "PATH", "TABLE.csv", "FILE", "FORMULA", "DIR", "SET", "NAME", "FILE.toml", "KEYS"}

_EXIT = re.compile(r"#.*?\bexit(?:s| status)?\s+(\d+)")
_FENCE = re.compile(r"^\s*(```|~~~)")
_SPAN = re.compile(r"`(tablegen [^`]+)`")


def _command(line: str) -> str | None:
    s = line.strip()
    if s.startswith("$ "):
        s = s[2:].lstrip()
    return s if s.startswith("tablegen ") else None


def _join(lines: list[str], i: int) -> tuple[str, int]:
    """Line i with its '\\' continuations, and the index after them."""
    text = lines[i].rstrip()
    while text.endswith("\\") and i + 1 < len(lines):
        i += 1
        text = text[:-1].rstrip() + " " + lines[i].strip()
    return text, i + 1


def _is_synopsis(cmd: str) -> bool:
    """A synopsis or a mere command name (`tablegen compare` in a heading), not an example."""
    try:
        words = shlex.split(cmd, comments=True)
    except ValueError:
        return False
    return len(words) < 3 or any(w in PLACEHOLDERS or "[" in w or "|" in w or ".." in w for w in words)


def markdown_examples(path: Path) -> list[tuple[int, str]]:
    """(line number, command line) of every example in a Markdown file."""
    lines = path.read_text(encoding="utf-8").splitlines()
    out, i, fenced, prev_blank = [], 0, False, True
    while i < len(lines):
        line = lines[i]
        if _FENCE.match(line):
            fenced = not fenced
            i += 1
            prev_blank = False
            continue
        indented = not fenced and line.startswith("    ") and (prev_blank or _in_indented(lines, i))
        if fenced or indented:
            cmd = _command(line)
            if cmd is not None:
                text, j = _join(lines, i)
                out.append((i + 1, _command(text)))
                i = j
                prev_blank = False
                continue
        else:
            for m in _SPAN.finditer(line):
                if not _is_synopsis(m.group(1)):
                    out.append((i + 1, m.group(1)))
        prev_blank = not line.strip()
        i += 1
    return out


def _in_indented(lines, i) -> bool:
    """Whether line i continues an indented code block (every line back to a blank one is indented)."""
    k = i - 1
    while k >= 0 and lines[k].strip():
        if not lines[k].startswith("    "):
            return False
        k -= 1
    return True


def help_examples(command: str | None) -> list[tuple[int, str]]:
    """(line number, command line) of the example block of a command's help (None: tablegen --help)."""
    parser = cli.make_parser(command)
    if command is not None:
        sub = next(a for a in parser._actions if a.__class__.__name__ == "_SubParsersAction")
        parser = sub.choices[command]
    lines = parser.format_help().splitlines()
    out, i, inside = [], 0, False
    while i < len(lines):
        if lines[i].strip().lower().startswith("example"):
            inside = True
        elif inside and not lines[i].strip():
            inside = False
        elif inside and _command(lines[i]):
            text, j = _join(lines, i)
            out.append((i + 1, _command(text)))
            i = j
            continue
        i += 1
    return out


def sources() -> list[str]:
    """Every text that holds examples: 'doc:<path relative to the root>' or 'help:<command>' ('help:' alone
    for tablegen --help)."""
    return ([f"doc:{p.relative_to(ROOT)}" for p in DOCS] + ["help:"]
            + [f"help:{name}" for name, _, _ in cli.COMMANDS])


def expected_status(cmd: str) -> int:
    m = _EXIT.search(cmd)
    return int(m.group(1)) if m else 0


def run_line(cmd: str) -> tuple[int, str, str]:
    argv = shlex.split(cmd, comments=True)
    assert argv[0] == "tablegen", cmd
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = cli.main(argv[1:])
    return code, out.getvalue(), err.getvalue()


def _folder(tmp: Path) -> Path:
    shutil.copytree(EXAMPLES, tmp / "docs" / "examples")
    for p in EXAMPLES.iterdir():
        if p.is_dir():
            shutil.copytree(p, tmp / p.name)
        else:
            shutil.copy(p, tmp / p.name)
    return tmp


def run_source(source: str) -> tuple[int, list[str]]:
    """Run every example of one text in a fresh folder; (number of examples, failures)."""
    kind, _, where = source.partition(":")
    examples = markdown_examples(ROOT / where) if kind == "doc" else help_examples(where or None)
    failed = []
    if kind == "help" and not examples:
        failed.append(f"the help of tablegen {where} has no example")
    here = os.getcwd()
    saved = os.environ.get("TABLEGEN_DATA")
    with tempfile.TemporaryDirectory() as tmp:
        os.environ["TABLEGEN_DATA"] = str(Path(tmp) / "no-user-data")
        os.chdir(_folder(Path(tmp)))
        try:
            for line, cmd in examples:
                want = expected_status(cmd)
                code, out, err = run_line(cmd)
                if code != want:
                    last = (err.strip().splitlines() or ["(no message)"])[-1]
                    failed.append(f"{source} line {line}: {cmd}\n    exit {code}, expected {want}: {last}")
        finally:
            os.chdir(here)
            if saved is None:
                os.environ.pop("TABLEGEN_DATA", None)
            else:
                os.environ["TABLEGEN_DATA"] = saved
    return len(examples), failed


#: source -> Future of run_source, started by tests/conftest.py when the session's tests are known,
#: so the examples run on a second core while the rest of the suite runs on the first.
STARTED: dict = {}


def start_in_background(selected) -> None:
    """Run the examples of the selected sources in one worker process (spawned: a clean interpreter)."""
    import multiprocessing
    from concurrent.futures import ProcessPoolExecutor
    todo = [s for s in selected if s not in STARTED]
    if not todo:
        return
    pool = ProcessPoolExecutor(max_workers=1, mp_context=multiprocessing.get_context("spawn"))
    for s in todo:
        STARTED[s] = pool.submit(run_source, s)
    pool.shutdown(wait=False)


@pytest.mark.parametrize("source", sources())
def test_documented_examples_run(source):
    if source not in STARTED:
        start_in_background([source])
    n, failed = STARTED[source].result(timeout=900)
    assert not failed, "\n".join(failed)
    if source.startswith("help:"):
        assert n > 0


def test_the_extractor_finds_examples_and_skips_synopses(tmp_path):
    """The rules above, on a text made for the purpose (so this test can fail)."""
    md = tmp_path / "x.md"
    md.write_text("Run `tablegen state air --T 300K` or `tablegen state SUBSTANCE --T LIST`.\n\n"
                  "```sh\ntablegen build a.toml \\\n    --force      # exits 2: no spec\nusage: tablegen x [--y]\n```\n\n"
                  "    tablegen species --check --data site/\n    ok: ...\n", encoding="utf-8")
    got = [c for _, c in markdown_examples(md)]
    assert got == ["tablegen state air --T 300K", "tablegen build a.toml --force      # exits 2: no spec",
                   "tablegen species --check --data site/"]
    assert [expected_status(c) for c in got] == [0, 2, 0]
    assert len(help_examples("state")) >= 3 and help_examples(None)


def test_the_annotated_spec_of_the_docs_is_the_example_file():
    """docs/spec.md prints docs/examples/plant-tables.toml, which the examples build: the two stay one text."""
    text = (ROOT / "docs" / "spec.md").read_text(encoding="utf-8")
    block = re.search(r"## An annotated example.*?```toml\n(.*?)```", text, re.S).group(1)
    assert block == (EXAMPLES / "plant-tables.toml").read_text(encoding="utf-8")
