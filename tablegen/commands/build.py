"""tablegen build: a table book (PDF, CSV per table, JSON sidecar) from a TOML spec, in each
of its editions."""

from __future__ import annotations

from pathlib import Path

from ..errors import TablegenError
from .common import data_notices, notice

IMPOSITIONS = ("booklet",)


def add_arguments(p):
    p.add_argument("spec", metavar="SPEC.toml", help="the book spec (format: docs/spec.md)")
    p.add_argument("--edition", metavar="NAME", default=None,
                   help="build only this edition of the spec (or several, comma-separated); "
                        "default: every edition the spec declares")
    p.add_argument("--paper", metavar="PAPER", default=None,
                   help="print on this paper for once: A4, Letter, A3 or A5 (the spec and the "
                        "fingerprint are unchanged; the document control says so)")
    p.add_argument("--impose", metavar="LAYOUT", default=None,
                   help="also write the A5 editions imposed for printing: 'booklet' writes <stem>-booklet.pdf, "
                        "A4 sheets with two pages a side in saddle-stitch order (print on both sides, "
                        "flip on the short edge, fold and staple)")
    p.add_argument("--out", metavar="DIR", default=None,
                   help="folder for the files (default: output/<spec name>/)")
    p.add_argument("--force", action="store_true",
                   help="overwrite files that already exist in the output folder")
    p.epilog = ("The spec is checked in full before anything is computed; a broken rule is named by its\n"
                "key path (e.g. tables[2].grid.segments[0].step) and nothing is written.\n"
                "Files: <spec name>.pdf, <spec name>.json and <table name>.csv per table. A spec with\n"
                "[editions.NAME] tables gives one folder holding every edition of one issue:\n"
                "<spec name>-<edition>.pdf and .json per edition, <table name>.csv shared by the editions\n"
                "that print a table alike, <table name>-<edition>.csv where an edition's rows or columns\n"
                "differ (docs/spec.md, \"Editions\").\n"
                "plant-tables.toml (the annotated spec of docs/spec.md) and site-editions.toml (a desk and\n"
                "a pocket edition) are in the project's docs/examples/ folder.\n\n"
                "example:\n"
                "  tablegen build plant-tables.toml\n"
                "  tablegen build plant-tables.toml --out issued/rev-C --force\n"
                "  tablegen build site-editions.toml --out issued/site\n"
                "  tablegen build site-editions.toml --edition pocket --impose booklet --out issued/pocket\n"
                "  tablegen build plant-tables.toml --paper Letter --out one-off")


def run(args) -> int:
    from .. import spec as specmod
    from ..book.build import file_names, merge, progress_for, render_files, write
    if args.impose is not None and args.impose not in IMPOSITIONS:
        raise TablegenError(f"--impose {args.impose!r}: not a layout; allowed: {', '.join(IMPOSITIONS)}")
    editions = specmod.load_editions(args.spec, source=args.source, data=args.data, editions=args.edition,
                                     paper=args.paper)
    first = editions[0]
    if args.impose == "booklet":
        small = [e for e in editions if e.document.paper == "A5" and e.document.orientation == "portrait"]
        if not small:
            what = ", ".join(f"{e.edition.name or first.name} is {e.document.paper} {e.document.orientation}"
                             for e in editions)
            raise TablegenError(f"--impose booklet: {what}; a booklet is made of A5 portrait pages, 2 up on "
                                f"A4 (choose an A5 edition with --edition, or --paper A5)")
    from types import SimpleNamespace
    data_notices(SimpleNamespace(data=first.data_paths, quiet=args.quiet))
    out = Path(args.out) if args.out else Path("output") / first.name
    files, made = {}, []
    for spec in editions:
        label = f"building {spec.name}" + (f" ({spec.edition.name})" if spec.edition.name else "")
        bar = progress_for(args, len(spec.tables), label)
        one, book = render_files(spec, out, bar)
        names = file_names(spec)
        if args.impose == "booklet" and spec.document.paper == "A5" and spec.document.orientation == "portrait":
            from ..book.pdf import render_booklet
            one[out / names["booklet"]] = render_booklet(book)
        merge(files, one)
        made.append((spec, book, names))
    paths = write(files, args.force)
    for spec, book, names in made:
        what = f"edition {spec.edition.name}: " if spec.edition.name else ""
        pages = _pages(files[out / names["pdf"]])
        booklet = out / names["booklet"]
        extra = ""
        if booklet in files:
            sheets = _pages(files[booklet]) // 2
            extra = (f"; {names['booklet']}: {sheets} A4 sheet{'s' if sheets != 1 else ''} to print on both "
                     f"sides (flip on the short edge, actual size), fold and staple at the fold")
        notice(args, f"{what}{names['pdf']}, {pages} pages{extra}")
    notice(args, f"wrote {len(paths)} files to {out}/ (fingerprint {made[0][1].fingerprint[:16]}…)")
    for p in paths:
        print(p)
    return 0


def _pages(pdf: bytes) -> int:
    import re
    m = re.search(rb"/Type /Pages /Count (\d+)", pdf) or re.search(rb"/Count (\d+)", pdf)
    return int(m.group(1)) if m else 0
