"""A book folder holds one complete issue or the previous one, never a mix; writing faults end in one line.

The checks follow what a document-control system promises its auditors (common practice):
after any interruption or fault at any moment, the published folder holds exactly one
complete, self-consistent issue (every file listed in its manifest with the right SHA-256,
the same fingerprint in the PDF, the JSON sidecar, every CSV and every CSVW metadata file),
no temporary file is visible in it, and what a killed run left beside it is removed by
the next run, which says so. Faults are injected where the operating system would raise
them (open, write, fsync, mkdir, rename, the folder exchange); kills are real SIGKILLs of
a subprocess at seeded random moments. The tests build two tiny issues (revision A and B)
once and reuse their bytes, so the whole module runs in a few seconds.
"""

from __future__ import annotations

import errno
import json
import os
import pickle
import random
import signal
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest
from pypdf import PdfReader

from tablegen import cli
from tablegen.core import filewrite, oswrite, outfiles
from tablegen.spec import book as spec
from tablegen.book.build import issue_text, render_files
from tablegen.core.errors import Interrupted, OutputError, OutputExistsError

ROOT = Path(__file__).resolve().parents[1]

SPEC = textwrap.dedent('''
    [document]
    title = "Marsh Lane test rig tables"
    number = "ML-16"
    revision = "REV"
    issue_date = 2026-11-02
    organisation = "Marsh Lane test rig (invented)"
    csv_comments = true

    [[tables]]
    name = "rig-n2"
    substance = "N2"
    columns = ["T", "cp", "h"]
    grid = { list = ["300 K", "GRIDTOP"] }

    [[tables]]
    name = "rig-co2"
    substance = "CO2"
    columns = ["T", "cp", "s0"]
    grid = { list = ["300 K", "500 K"] }
''')


def spec_text(rev: str, top: str) -> str:
    return SPEC.replace("REV", rev).replace("GRIDTOP", top)


@pytest.fixture(scope="module")
def issues(tmp_path_factory):
    """Two issues of one book: {rev: (files, about, fingerprint)}; revision B has another grid."""
    d = tmp_path_factory.mktemp("specs")
    out = {}
    for rev, top in (("A", "400 K"), ("B", "700 K")):
        p = d / "rig.toml"
        p.write_text(spec_text(rev, top), encoding="utf-8")
        files, book = render_files(spec.load(p))
        out[rev] = (files, [f"issue: {issue_text(book)}"], book.fingerprint)
        outfiles.publish_folder(d / rev, files, force=False, about=out[rev][1])
        assert one_issue(d / rev) == book.fingerprint       # each issue is self-consistent, in full
    assert out["A"][2] != out["B"][2]
    return out


def one_issue(dest: Path, quick: dict | None = None) -> str:
    """Assert dest holds exactly one complete, self-consistent issue; its fingerprint.

    With ``quick`` (the issues fixture) the files are compared byte for byte with the two
    known issues, each checked in full once, instead of being read back again.
    """
    import hashlib
    names = sorted(os.listdir(dest))
    found = outfiles.read_manifest(dest)
    assert found is not None, names
    listed, _ = found
    assert names == sorted([*listed, outfiles.MANIFEST]), names       # nothing else, nothing hidden
    for n, h in listed.items():
        assert hashlib.sha256((dest / n).read_bytes()).hexdigest() == h, n
    if quick is not None:
        match = [fp for files, _, fp in quick.values() if set(files) == set(listed) and
                 all((dest / n).read_bytes() == files[n] for n in files)]
        assert len(match) == 1, names
        return match[0]
    meta = json.loads((dest / "rig.json").read_text(encoding="utf-8"))
    fp = meta["fingerprint"]["sha256"]
    assert fp in PdfReader(str(dest / "rig.pdf")).pages[0].extract_text()
    for t in meta["tables"]:
        assert f"# fingerprint sha256 {fp}" in (dest / t["csv"]).read_text(encoding="utf-8")
        csvw = json.loads((dest / t["csv_metadata"]).read_text(encoding="utf-8"))
        assert csvw["prov:wasDerivedFrom"]["@id"] == f"urn:sha256:{fp}"
    return fp


def leftovers(dest: Path) -> list[str]:
    """What tablegen left beside dest: staging, an old issue moved aside, a lock."""
    return sorted(e for e in os.listdir(dest.parent) if e.startswith(f".{dest.name}.tablegen-"))


# ---------------------------------------------------------------- fault injection
class FaultyOs:
    """The os module as tablegen.core.outfiles, filewrite and oswrite see it, with one call failing
    at its k-th use (counted over the three)."""

    def __init__(self, op: str, k: int, exc: BaseException, hook=None):
        self.op, self.k, self.exc, self.hook, self.calls, self.fired = op, k, exc, hook, 0, False

    def __getattr__(self, name):
        real = getattr(os, name)
        if name != self.op:
            return real

        def call(*a, **kw):
            self.calls += 1
            if self.calls == self.k:
                self.fired = True
                if self.hook is not None:
                    self.hook()
                else:
                    raise self.exc
            return real(*a, **kw)
        return call


def patch_os(monkeypatch, fake) -> None:
    """Give every module that writes output the same faulty os module."""
    for module in (outfiles, filewrite, oswrite):
        monkeypatch.setattr(module, "os", fake)


def _exchange_point(monkeypatch, k, exc, counter):
    real = outfiles._exchange

    def fake(a, b):
        counter[0] += 1
        if counter[0] == k:
            raise exc
        return real(a, b)
    monkeypatch.setattr(outfiles, "_exchange", fake)


OPS = ("open", "write", "fsync", "mkdir", "chmod", "rename", "exchange", "rmtree")


def _inject(monkeypatch, op, k, exc):
    """Arm a fault at the k-th call of op; returns a callable telling whether it fired."""
    if op == "exchange":
        c = [0]
        _exchange_point(monkeypatch, k, exc, c)
        return lambda: c[0] >= k
    if op == "rmtree":
        c = [0]
        real = outfiles._remove_tree

        def fake(p):
            c[0] += 1
            if c[0] == k:
                raise exc
            real(p)
        monkeypatch.setattr(outfiles, "_remove_tree", fake)
        return lambda: c[0] >= k
    f = FaultyOs(op, k, exc)
    patch_os(monkeypatch, f)
    return lambda: f.fired


@pytest.mark.parametrize("fallback", [False, True], ids=["exchange", "two-renames"])
def test_a_fault_at_any_step_leaves_the_old_issue_or_the_new_one(tmp_path, issues, monkeypatch, fallback):
    dest = tmp_path / "book"
    fa, about_a, fp_a = issues["A"]
    fb, about_b, fp_b = issues["B"]
    outfiles.publish_folder(dest, fa, force=True, about=about_a)
    fp = fp_a
    for op in OPS:
        for exc in (OSError(errno.ENOSPC, "No space left on device"), KeyboardInterrupt()):
            for k in range(1, 60):
                if fp != fp_a or leftovers(dest):
                    outfiles.publish_folder(dest, fa, force=True, about=about_a)
                with monkeypatch.context() as m:
                    if fallback:
                        m.setattr(outfiles, "_exchange", _no_exchange)
                    fired = _inject(m, op, k, exc)
                    try:
                        notes = outfiles.publish_folder(dest, fb, force=True, about=about_b)
                        error = None
                    except (OutputError, Interrupted) as e:
                        error = str(e)
                    hit = fired()
                fp = one_issue(dest, issues)
                where = f"{op} #{k} {type(exc).__name__}"
                if error is None:
                    # the fault hit a best-effort step: the lock's holder text, or deleting the old issue
                    assert fp == fp_b, where
                    assert not (hit and op == "rmtree") or notes, where
                else:
                    assert "\n" not in error, where
                    assert fp == (fp_b if "holds the new issue" in error else fp_a), (where, error)
                    if isinstance(exc, OSError):
                        assert "No space left on device" in error, where
                # staging and the lock never stay behind; an old issue whose deletion failed is
                # left beside the folder and removed (with a note) by the next run
                rest = leftovers(dest)
                assert all("tablegen-old-" in e or "tablegen-stage-" in e for e in rest), (where, rest)
                assert not rest or op == "rmtree", (where, rest)
                if not hit:
                    break
            else:
                pytest.fail(f"{op}: more calls than expected")


def _no_exchange(a, b):
    raise outfiles._NoExchange


def test_the_next_run_removes_what_a_killed_run_left_and_says_so(tmp_path, issues):
    dest = tmp_path / "book"
    fa, about_a, fp_a = issues["A"]
    outfiles.publish_folder(dest, fa, force=True, about=about_a)
    stage = tmp_path / ".book.tablegen-stage-0badc0de"
    stage.mkdir()
    (stage / "rig.pdf").write_bytes(b"%PDF-1.4 half")
    (tmp_path / ".book.tablegen-lock").write_text("4242 on rig-host\n")      # left by a dead process
    notes = outfiles.publish_folder(dest, issues["B"][0], force=True, about=issues["B"][1])
    assert len(notes) == 1 and "interrupted (process 4242 on rig-host)" in notes[0]
    assert ".book.tablegen-stage-0badc0de" in notes[0]
    assert one_issue(dest) == issues["B"][2] and leftovers(dest) == []


def test_an_issue_moved_aside_by_a_killed_fallback_swap_is_put_back(tmp_path, issues):
    dest = tmp_path / "book"
    fa, about_a, fp_a = issues["A"]
    outfiles.publish_folder(dest, fa, force=True, about=about_a)
    os.rename(dest, tmp_path / ".book.tablegen-old-0badc0de")     # killed between the two renames
    with pytest.raises(OutputExistsError, match="holds an earlier issue"):
        outfiles.publish_folder(dest, issues["B"][0], force=False, about=issues["B"][1])
    assert one_issue(dest) == fp_a and leftovers(dest) == []
    os.rename(dest, tmp_path / ".book.tablegen-old-0badc0de")
    notes = outfiles.publish_folder(dest, issues["B"][0], force=True, about=issues["B"][1])
    assert len(notes) == 1 and "put back the previous issue of" in notes[0]
    assert one_issue(dest) == issues["B"][2] and leftovers(dest) == []


def test_cli_reports_the_clean_up_in_one_note_after_success(tmp_path, issues, capsys):
    dest = tmp_path / "book"
    spec_b = _spec_file(tmp_path, "B")
    assert cli.main(["build", str(spec_b), "--out", str(dest)]) == 0
    (tmp_path / ".book.tablegen-stage-0badc0de").mkdir()
    capsys.readouterr()
    assert cli.main(["build", str(spec_b), "--out", str(dest), "--force"]) == 0
    err = capsys.readouterr().err.splitlines()
    assert err[0].startswith("note: an earlier run into") and "removed its staging folder" in err[0]
    assert err[1].startswith("wrote 6 files and their manifest tablegen-issue.sha256")
    assert len(err) == 2 and leftovers(dest) == []


def _spec_file(tmp_path: Path, rev: str) -> Path:
    p = tmp_path / "rig.toml"
    p.write_text(spec_text(rev, {"A": "400 K", "B": "700 K"}[rev]), encoding="utf-8")
    return p


# ---------------------------------------------------------------- SIGKILL at random moments
PUBLISHER = textwrap.dedent('''
    import pickle, sys
    from tablegen.core import outfiles
    sets = pickle.loads(open(sys.argv[1], "rb").read())
    print("ready", flush=True)
    i = 0
    while True:
        files, about = sets[i % 2]
        outfiles.publish_folder(sys.argv[2], files, force=True, about=about)
        i += 1
''')


def test_sigkill_at_random_moments_leaves_one_complete_issue(tmp_path, issues):
    """24 SIGKILLs of a process that publishes revision A and B in turn, at seeded random moments."""
    dest = tmp_path / "book"
    sets = tmp_path / "sets.pickle"
    sets.write_bytes(pickle.dumps([(issues[r][0], issues[r][1]) for r in ("A", "B")]))
    script = tmp_path / "publisher.py"
    script.write_text(PUBLISHER, encoding="utf-8")
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    outfiles.publish_folder(dest, issues["B"][0], force=True, about=issues["B"][1])
    t0 = time.perf_counter()
    for r in ("A", "B"):
        outfiles.publish_folder(dest, issues[r][0], force=True, about=issues[r][1])
    span = 1.5 * (time.perf_counter() - t0)      # the kills fall within the first few publications
    rng = random.Random(16)
    seen = set()
    for trial in range(24):
        proc = subprocess.Popen([sys.executable, str(script), str(sets), str(dest)], env=env,
                                stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
        assert proc.stdout.readline().strip() == "ready", proc.stderr.read()
        time.sleep(rng.uniform(0.0, span))
        proc.send_signal(signal.SIGKILL)
        proc.wait(timeout=30)
        proc.stdout.close()
        proc.stderr.close()
        seen.add(one_issue(dest))
    assert seen <= {issues["A"][2], issues["B"][2]}
    notes = outfiles.publish_folder(dest, issues["A"][0], force=True, about=issues["A"][1])
    assert len(notes) <= 1
    assert one_issue(dest) == issues["A"][2] and leftovers(dest) == []


# ---------------------------------------------------------------- signals in the command line
@pytest.mark.parametrize("signum,status,word", [(signal.SIGTERM, 143, "terminated"),
                                                (signal.SIGINT, 130, "interrupted")])
def test_a_signal_while_staging_leaves_the_old_issue_and_one_line(tmp_path, issues, capsys, monkeypatch,
                                                                  signum, status, word):
    dest = tmp_path / "book"
    assert cli.main(["build", str(_spec_file(tmp_path, "A")), "--out", str(dest), "--quiet"]) == 0
    spec_b = _spec_file(tmp_path, "B")
    patch_os(monkeypatch, FaultyOs("fsync", 2, None, hook=lambda: os.kill(os.getpid(), signum)))
    rc = cli.main(["build", str(spec_b), "--out", str(dest), "--force"])
    err = capsys.readouterr().err
    assert rc == status and err == f"tablegen: {word}; nothing was published; {dest}/ is as it was\n"
    monkeypatch.undo()
    assert one_issue(dest) == issues["A"][2] and leftovers(dest) == []


def test_a_signal_during_the_swap_is_held_until_the_new_issue_is_in_place(tmp_path, issues, capsys,
                                                                         monkeypatch):
    dest = tmp_path / "book"
    assert cli.main(["build", str(_spec_file(tmp_path, "A")), "--out", str(dest), "--quiet"]) == 0
    real = outfiles._exchange

    def exchange_then_signal(a, b):
        os.kill(os.getpid(), signal.SIGTERM)    # arrives while the swap holds signals
        real(a, b)
    monkeypatch.setattr(outfiles, "_exchange", exchange_then_signal)
    rc = cli.main(["build", str(_spec_file(tmp_path, "B")), "--out", str(dest), "--force"])
    assert rc == 143
    assert capsys.readouterr().err == f"tablegen: terminated; {dest}/ holds the new issue, complete\n"
    assert one_issue(dest) == issues["B"][2] and leftovers(dest) == []


# ---------------------------------------------------------------- one run at a time
def test_a_second_build_into_a_locked_folder_refuses_in_one_line(tmp_path, capsys):
    dest = tmp_path / "book"
    with outfiles.Lock(outfiles._real(dest)):
        rc = cli.main(["build", str(_spec_file(tmp_path, "A")), "--out", str(dest), "--force"])
    err = capsys.readouterr().err
    assert rc == 2 and err.count("\n") == 1
    assert f"{dest}/ is being written by another tablegen run (process {os.getpid()} on " in err
    assert not dest.exists() and leftovers(dest) == []


RACER = textwrap.dedent('''
    import sys, time
    from tablegen import cli
    from tablegen.core import outfiles
    real = outfiles._swap
    def slow_swap(*a):          # a slow network drive
        time.sleep(0.5)
        return real(*a)
    outfiles._swap = slow_swap
    sys.exit(cli.main(["build", sys.argv[1], "--out", sys.argv[2]]))
''')


def test_two_concurrent_builds_never_both_write(tmp_path):
    spec_a = _spec_file(tmp_path, "A")
    script = tmp_path / "racer.py"
    script.write_text(RACER, encoding="utf-8")
    dest = tmp_path / "book"
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    procs = [subprocess.Popen([sys.executable, str(script), str(spec_a), str(dest)], env=env,
                              stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True) for _ in range(2)]
    results = [(p.wait(timeout=120), p.communicate()[1]) for p in procs]
    wrote = [err for rc, err in results if rc == 0 and "wrote 6 files" in err]
    refused = [err for rc, err in results if rc == 2]
    assert len(wrote) == 1 and len(refused) == 1, results
    assert refused[0].count("\n") == 1 and ("being written by another tablegen run" in refused[0]
                                            or "holds an earlier issue" in refused[0])
    one_issue(dest)
    assert leftovers(dest) == []


# ---------------------------------------------------------------- what may be replaced
def test_a_folder_with_files_tablegen_did_not_publish_is_never_replaced(tmp_path, issues, capsys):
    dest = tmp_path / "mine"
    dest.mkdir()
    (dest / "notes.txt").write_text("the user's own notes")
    for force in ([], ["--force"]):
        rc = cli.main(["build", str(_spec_file(tmp_path, "A")), "--out", str(dest), *force])
        err = capsys.readouterr().err
        assert rc == 2 and err.count("\n") == 1 and "holds 1 file that tablegen did not publish there " \
            "(first: notes.txt)" in err, err
    assert os.listdir(dest) == ["notes.txt"] and leftovers(dest) == []
    # a file saved into an issued folder is kept too, even with --force
    book = tmp_path / "book"
    outfiles.publish_folder(book, issues["A"][0], force=True, about=issues["A"][1])
    (book / "signed-scan.pdf").write_bytes(b"%PDF signed")
    with pytest.raises(OutputExistsError, match=r"holds 1 file that tablegen did not publish there "
                                                r"\(first: signed-scan.pdf\)"):
        outfiles.publish_folder(book, issues["B"][0], force=True, about=issues["B"][1])
    assert (book / "signed-scan.pdf").read_bytes() == b"%PDF signed"


def test_a_file_saved_into_the_folder_during_staging_stays_there(tmp_path, issues, monkeypatch):
    dest = tmp_path / "book"
    outfiles.publish_folder(dest, issues["A"][0], force=True, about=issues["A"][1])
    hook = FaultyOs("fsync", 3, None, hook=lambda: (dest / "late.txt").write_text("saved meanwhile"))
    patch_os(monkeypatch, hook)
    with pytest.raises(OutputExistsError, match=r"\(first: late.txt\)"):
        outfiles.publish_folder(dest, issues["B"][0], force=True, about=issues["B"][1])
    monkeypatch.undo()
    assert hook.fired and (dest / "late.txt").read_text() == "saved meanwhile"
    (dest / "late.txt").unlink()
    assert one_issue(dest) == issues["A"][2] and leftovers(dest) == []


def test_files_of_an_older_unmanifested_build_need_force_with_a_plain_message(tmp_path, issues, capsys):
    dest = tmp_path / "book"
    dest.mkdir()
    for n in sorted(issues["A"][0]):
        (dest / n).write_bytes(issues["A"][0][n])
    (dest / ".DS_Store").write_bytes(b"finder")            # a file browser's litter goes with the old issue
    rc = cli.main(["build", str(_spec_file(tmp_path, "B")), "--out", str(dest)])
    err = capsys.readouterr().err
    assert rc == 2 and err == (f"tablegen: 6 files of the book already exist in {dest}/ (first: rig-co2.csv); "
                               f"pass --force to replace them, or choose another --out folder\n")
    assert cli.main(["build", str(_spec_file(tmp_path, "B")), "--out", str(dest), "--force", "--quiet"]) == 0
    assert one_issue(dest) == issues["B"][2]


def test_demo_refuses_a_folder_with_other_files_before_building(tmp_path, capsys):
    (tmp_path / "keep.txt").write_text("mine")
    assert cli.main(["demo", "--out", str(tmp_path)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "(first: keep.txt)" in err
    f = tmp_path / "afile"
    f.write_text("x")
    assert cli.main(["demo", "--out", str(f)]) == 2
    assert capsys.readouterr().err == (f"tablegen: {f} is a file, not a folder; a demo is written into a "
                                       f"folder: give --out the path of a folder\n")


# ---------------------------------------------------------------- OS faults: one line, exit 2
@pytest.mark.parametrize("code,text", [(errno.ENOSPC, "No space left on device"),
                                       (errno.EROFS, "Read-only file system"),
                                       (errno.EACCES, "Permission denied")])
@pytest.mark.parametrize("op,k", [("open", 1), ("mkdir", 1), ("write", 2)], ids=["lock", "staging", "file"])
def test_disk_full_read_only_and_no_permission_are_one_line(tmp_path, capsys, monkeypatch, code, text, op, k):
    dest = tmp_path / "book"
    patch_os(monkeypatch, FaultyOs(op, k, OSError(code, os.strerror(code))))
    rc = cli.main(["build", str(_spec_file(tmp_path, "A")), "--out", str(dest)])
    err = capsys.readouterr().err
    monkeypatch.undo()
    assert rc == 2 and err.count("\n") == 1 and err.startswith("tablegen: cannot write ") and text in err
    assert not dest.exists() and leftovers(dest) == []


def test_a_path_too_long_and_a_file_in_the_path_are_one_line(tmp_path, capsys):
    rc = cli.main(["build", str(_spec_file(tmp_path, "A")), "--out", str(tmp_path / ("x" * 250))])
    err = capsys.readouterr().err
    assert rc == 2 and err.count("\n") == 1 and "File name too long" in err
    (tmp_path / "plain").write_text("a file")
    rc = cli.main(["build", str(_spec_file(tmp_path, "A")), "--out", str(tmp_path / "plain" / "book")])
    err = capsys.readouterr().err
    assert rc == 2 and err == f"tablegen: {tmp_path / 'plain'} is a file; give --out a path inside a folder\n"


def test_the_folder_you_are_in_is_refused(tmp_path, capsys, monkeypatch):
    dest = tmp_path / "book"
    dest.mkdir()
    monkeypatch.chdir(dest)
    assert cli.main(["build", str(_spec_file(tmp_path, "A")), "--out", "."]) == 2
    assert "is the folder you are working in" in capsys.readouterr().err


# ---------------------------------------------------------------- single files
def test_single_file_writers_fail_in_one_line_and_leave_nothing(tmp_path, capsys, monkeypatch):
    out = tmp_path / "site.toml"
    patch_os(monkeypatch, FaultyOs("write", 1, OSError(errno.ENOSPC, "No space left on device")))
    rc = cli.main(["export", "CO2", "--format", "toml", "--out", str(out)])
    err = capsys.readouterr().err
    monkeypatch.undo()
    assert rc == 2 and err == (f"tablegen: cannot write {out}: No space left on device (no file was written); "
                               f"free space there or choose another --out\n")
    assert os.listdir(tmp_path) == []
    # a folder named as the output file: one line that says so (--force would not help)
    rc = cli.main(["export", "CO2", "--format", "toml", "--out", str(tmp_path)])
    err = capsys.readouterr().err
    assert rc == 2 and err == (f"tablegen: {tmp_path} is a folder; give the path of a file, "
                               f"e.g. {tmp_path / 'NAME'}\n")


def test_a_file_that_appears_meanwhile_is_never_replaced_without_force(tmp_path, monkeypatch):
    out = tmp_path / "site.toml"
    hook = FaultyOs("fsync", 1, None, hook=lambda: out.write_text("another run's file"))
    patch_os(monkeypatch, hook)
    with pytest.raises(OutputExistsError, match="already exists"):
        filewrite.write_files({out: "mine"}, force=False)
    monkeypatch.undo()
    assert out.read_text() == "another run's file" and sorted(os.listdir(tmp_path)) == ["site.toml"]
