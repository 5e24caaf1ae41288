"""tablegen demo: the demo book of an invented plant in its four editions, built from the shipped spec."""

from __future__ import annotations

from importlib import resources
from pathlib import Path

from .common import notice, published

OUT = Path("output") / "demo"


def spec_paths() -> list[Path]:
    """The shipped demo spec (tablegen/demo/*.toml: one spec with its editions)."""
    d = resources.files("tablegen") / "demo"
    return sorted(Path(str(p)) for p in d.iterdir() if p.name.endswith(".toml"))


def add_arguments(p):
    p.add_argument("--out", metavar="DIR", default=None,
                   help=f"folder for the files (default: {OUT}/)")
    p.epilog = ("The demo is set at the Kestrel Fen district-heating plant, an invented plant that\n"
                "burns an invented blend of upgraded biogas and natural gas. One spec gives its book in\n"
                "four editions: the A4 desk copy, the A5 pocket copy for the shift engineers (two-sided,\n"
                "also imposed as an A4 booklet to print), a US Letter copy in US customary units and an\n"
                "A3 wall chart. They hold dry air, the fuel blend, its flue gas and pure CO2, H2O and N2.\n"
                "The demo replaces its own earlier issue in its output folder (no --force needed),\n"
                "publishing every edition as one set; a folder that holds other files is refused, so they\n"
                "are never touched. The spec it builds from is named on stderr: copy it to start a book\n"
                "of your own.\n\n"
                "example:\n"
                "  tablegen demo\n"
                "  tablegen demo --out issued/demo")


def run(args) -> int:
    from ..core import outfiles
    from ..spec import book as specmod
    from ..book.build import all_names, file_names, issue_text, merge, progress_for, render_files
    from ..book.impose import render_booklet
    out = Path(args.out) if args.out else OUT
    specs = [(path, e) for path in spec_paths()
             for e in specmod.load_editions(path, source=args.source, data=args.data)]
    outfiles.check_folder(out, [n for _, s in specs for n in all_names(s, s.document.paper == "A5")],
                          force=True, what="demo")
    all_files, about, seen = {}, [], set()
    for path, spec in specs:
        if path not in seen:
            notice(args, f"demo spec {path}")
            seen.add(path)
        bar = progress_for(args, len(spec.tables), f"building {spec.name} ({spec.edition.name})")
        files, book = render_files(spec, bar)
        if spec.document.paper == "A5":
            files[file_names(spec)["booklet"]] = render_booklet(book)
        merge(all_files, files)
        if not about:
            about.append(f"issue: {issue_text(book)}")
        about.append(f"edition {spec.edition.name}: {file_names(spec)['pdf']} ({spec.edition.label})")
    notes = outfiles.publish_folder(out, all_files, force=True, about=about, what="demo")
    published(args, out, all_files, notes, "demo files", " (the demo replaces its own earlier issue)")
    return 0
