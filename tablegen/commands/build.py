"""tablegen build: a table book (PDF, CSV per table, JSON sidecar) from a TOML spec."""

from __future__ import annotations

from pathlib import Path

from .common import notice, data_notices


def add_arguments(p):
    p.add_argument("spec", metavar="SPEC.toml", help="the book spec (format: docs/spec.md)")
    p.add_argument("--out", metavar="DIR", default=None,
                   help="folder for the files (default: output/<spec name>/)")
    p.add_argument("--force", action="store_true",
                   help="overwrite files that already exist in the output folder")
    p.epilog = ("The spec is checked in full before anything is computed; a broken rule is named by its\n"
                "key path (e.g. tables[2].grid.segments[0].step) and nothing is written.\n"
                "Files: <spec name>.pdf, <spec name>.json and <table name>.csv per table.\n"
                "plant-tables.toml (the annotated spec of docs/spec.md) is in the project's docs/examples/ folder.\n\n"
                "example:\n"
                "  tablegen build plant-tables.toml\n"
                "  tablegen build plant-tables.toml --out issued/rev-C --force")


def run(args) -> int:
    from .. import spec as specmod
    from ..book.build import progress_for, render_files, write
    spec = specmod.load(args.spec, source=args.source, data=args.data)
    from types import SimpleNamespace
    data_notices(SimpleNamespace(data=spec.data_paths, quiet=args.quiet))
    out = Path(args.out) if args.out else Path("output") / spec.name
    bar = progress_for(args, len(spec.tables), f"building {spec.name}")
    files, book = render_files(spec, out, bar)
    paths = write(files, args.force)
    pages = _pages(files[out / f"{spec.name}.pdf"])
    notice(args, f"wrote {len(paths)} files to {out}/ ({pages} PDF pages, fingerprint {book.fingerprint[:16]}…)")
    for p in paths:
        print(p)
    return 0


def _pages(pdf: bytes) -> int:
    import re
    m = re.search(rb"/Type /Pages /Count (\d+)", pdf) or re.search(rb"/Count (\d+)", pdf)
    return int(m.group(1)) if m else 0
