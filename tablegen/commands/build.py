"""tablegen build: a table book (PDF, CSV per table, JSON sidecar) from a TOML spec, in each
of its editions."""

from __future__ import annotations

from pathlib import Path

from ..core.errors import InputError, NameLookupError
from .common import data_notices, published

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
                "A spec with [editions.NAME] tables gives one folder holding every edition of one issue:\n"
                "<spec name>-<edition>.pdf and .json per edition, <table name>.csv shared by the editions\n"
                "that print a table alike, <table name>-<edition>.csv where an edition's rows or columns\n"
                "differ (docs/spec.md, \"Editions\").\n"
                "The folder is published as one set: an interrupted or failed run leaves its earlier\n"
                "issue complete, and a folder holding files tablegen did not publish there is refused.\n"
                "plant-tables.toml (the annotated spec of docs/spec.md) and site-editions.toml (a desk and\n"
                "a pocket edition) are in the project's docs/examples/ folder.\n\n"
                "example:\n"
                "  tablegen build plant-tables.toml\n"
                "  tablegen build plant-tables.toml --out issued/rev-C --force\n"
                "  tablegen build site-editions.toml --out issued/site\n"
                "  tablegen build site-editions.toml --edition pocket --impose booklet --out issued/pocket\n"
                "  tablegen build plant-tables.toml --paper Letter --out one-off\n"
                "  tablegen build plant-tables.toml --out issued/extrapolated --extrapolate")


def _booklet(spec) -> bool:
    return spec.document.paper == "A5" and spec.document.orientation == "portrait"


def run(args) -> int:
    from types import SimpleNamespace

    from ..core import outfiles
    from ..spec import book as specmod
    from ..book.build import all_names, file_names, issue_text, merge, pdf_pages, progress_for, render_files
    if args.impose is not None and args.impose not in IMPOSITIONS:
        raise NameLookupError(f"--impose {args.impose!r}: not a layout; allowed: {', '.join(IMPOSITIONS)}")
    editions = specmod.load_editions(args.spec, source=args.source, data=args.data, editions=args.edition,
                                     paper=args.paper, extrapolate=args.extrapolate)
    first = editions[0]
    impose = args.impose == "booklet"
    if impose and not any(_booklet(e) for e in editions):
        what = ", ".join(f"{e.edition.name or first.name} is {e.document.paper} {e.document.orientation}"
                         for e in editions)
        raise InputError(f"--impose booklet: {what}; a booklet is made of A5 portrait pages, 2 up on "
                         f"A4 (choose an A5 edition with --edition, or --paper A5)")
    data_notices(SimpleNamespace(data=first.data_paths, quiet=args.quiet))
    out = Path(args.out) if args.out else Path("output") / first.name
    outfiles.check_folder(out, [n for e in editions for n in all_names(e, impose and _booklet(e))],
                          force=args.force)
    files, made = {}, []
    for spec in editions:
        label = f"building {spec.name}" + (f" ({spec.edition.name})" if spec.edition.name else "")
        one, book = render_files(spec, progress_for(args, len(spec.tables), label))
        names = file_names(spec)
        if impose and _booklet(spec):
            from ..book.impose import render_booklet
            one[names["booklet"]] = render_booklet(book)
        merge(files, one)
        made.append((spec, book, names))
    about = [f"issue: {issue_text(made[0][1])}"]
    about += [f"edition {s.edition.name}: {n['pdf']} ({s.edition.label}, {s.document.paper})"
              for s, _, n in made if s.edition.name]
    dropped = _editions_left_out(out, first, [s.edition.name for s, _, _ in made])
    notes = outfiles.publish_folder(out, files, force=args.force, about=about)
    for spec, book, names in made:
        if not spec.edition.name and names["booklet"] not in files:
            continue                       # one book: its pages are in the 'wrote' line
        what = f"edition {spec.edition.name}: " if spec.edition.name else ""
        extra = ""
        if names["booklet"] in files:
            sheets = pdf_pages(files[names["booklet"]]) // 2
            extra = (f"; {names['booklet']}: {sheets} A4 sheet{'s' if sheets != 1 else ''} to print on both "
                     f"sides (flip on the short edge, actual size), fold and staple at the fold")
        notes.append(f"{what}{names['pdf']}, {pdf_pages(files[names['pdf']])} pages{extra}")
    if dropped:
        notes.append(f"note: {out}/ held the {' and '.join(dropped)} edition{'s' if len(dropped) > 1 else ''} "
                     f"too; this issue holds {', '.join(s.edition.name for s, _, _ in made)} only (build "
                     f"without --edition to keep every edition in one folder)")
    said = any(n.endswith("pages") or " pages;" in n for n in notes)
    pages = f"{pdf_pages(files[made[0][2]['pdf']])} PDF pages, " if len(made) == 1 and not said else ""
    published(args, out, files, notes, "files", f" ({pages}fingerprint {made[0][1].fingerprint[:16]}…)")
    return 0


def _editions_left_out(out: Path, spec, built: list) -> list:
    """Editions of the spec whose PDF the folder's earlier issue held and this build does not."""
    from ..core import outfiles
    if not spec.editions or not out.is_dir():
        return []
    found = outfiles.read_manifest(out)
    if not found:
        return []
    return [e for e in spec.editions if e not in built and f"{spec.name}-{e}.pdf" in found[0]]
