"""tablegen build: a table book (PDF, CSV per table, JSON sidecar) from a TOML spec."""

from __future__ import annotations

from pathlib import Path

from .common import data_notices, published


def add_arguments(p):
    p.add_argument("spec", metavar="SPEC.toml", help="the book spec (format: docs/spec.md)")
    p.add_argument("--out", metavar="DIR", default=None,
                   help="folder for the files (default: output/<spec name>/); it must be new, empty, "
                        "or hold an earlier issue tablegen published there")
    p.add_argument("--force", action="store_true",
                   help="replace the earlier issue in the output folder with this one")
    p.add_argument("--extrapolate", action="store_true",
                   help="allow temperatures outside the data range in every table (as extrapolate = true "
                        "in each), from half the data's lowest to twice its highest temperature; such rows "
                        "are marked x, and the document control block says extrapolation was allowed")
    p.set_defaults(extrapolate_option="--extrapolate")
    p.epilog = ("The spec is checked in full before anything is computed; a broken rule is named by its\n"
                "key path (e.g. tables[2].grid.segments[0].step) and nothing is written.\n"
                "Files: <spec name>.pdf, <spec name>.json, <table name>.csv and its\n"
                "<table name>.csv-metadata.json per table, and tablegen-issue.sha256 (the manifest:\n"
                "SHA-256 of every file; check a copy with 'sha256sum -c tablegen-issue.sha256').\n"
                "The folder is published as one set: an interrupted or failed run leaves its earlier\n"
                "issue complete, and a folder holding files tablegen did not publish there is refused.\n\n"
                "example:\n"
                "  tablegen build plant-tables.toml\n"
                "  tablegen build plant-tables.toml --out issued/rev-C --force\n"
                "  tablegen build plant-tables.toml --out issued/extrapolated --extrapolate")


def run(args) -> int:
    from types import SimpleNamespace

    from .. import outfiles
    from .. import spec as specmod
    from ..book.build import all_names, issue_text, pdf_pages, progress_for, render_files
    spec = specmod.load(args.spec, source=args.source, data=args.data, extrapolate=args.extrapolate)
    data_notices(SimpleNamespace(data=spec.data_paths, quiet=args.quiet))
    out = Path(args.out) if args.out else Path("output") / spec.name
    outfiles.check_folder(out, all_names(spec), force=args.force)
    bar = progress_for(args, len(spec.tables), f"building {spec.name}")
    files, book = render_files(spec, bar)
    notes = outfiles.publish_folder(out, files, force=args.force, about=[f"issue: {issue_text(book)}"])
    published(args, out, files, notes, "files", f" ({pdf_pages(files[spec.name + '.pdf'])} PDF pages, "
                                                f"fingerprint {book.fingerprint[:16]}…)")
    return 0
