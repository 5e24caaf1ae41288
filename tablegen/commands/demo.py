"""tablegen demo: the demo books of an invented plant, built from the shipped specs."""

from __future__ import annotations

from importlib import resources
from pathlib import Path

from .common import notice, published

OUT = Path("output") / "demo"


def spec_paths() -> list[Path]:
    """The shipped demo specs (tablegen/demo/*.toml), in name order."""
    d = resources.files("tablegen") / "demo"
    return sorted(Path(str(p)) for p in d.iterdir() if p.name.endswith(".toml"))


def add_arguments(p):
    p.add_argument("--out", metavar="DIR", default=None,
                   help=f"folder for the files (default: {OUT}/)")
    p.epilog = ("The demo is set at the Kestrel Fen district-heating plant, an invented plant that\n"
                "burns an invented blend of upgraded biogas and natural gas. Its two books (A4 desk\n"
                "copy, A5 pocket copy) hold dry air, the fuel blend, its flue gas and pure CO2, H2O\n"
                "and N2 in SI and US customary units. The demo replaces its own earlier issue in its\n"
                "output folder (no --force needed), publishing both books as one set; a folder that\n"
                "holds other files is refused, so they are never touched.\n"
                "The specs it builds from are named on stderr: copy one to start a book of your own.\n\n"
                "example:\n"
                "  tablegen demo\n"
                "  tablegen demo --out issued/demo")


def run(args) -> int:
    from .. import outfiles
    from .. import spec as specmod
    from ..book.build import all_names, issue_text, progress_for, render_files
    out = Path(args.out) if args.out else OUT
    specs = [(path, specmod.load(path, source=args.source, data=args.data)) for path in spec_paths()]
    outfiles.check_folder(out, [n for _, s in specs for n in all_names(s)], force=True, what="demo")
    all_files, about = {}, []
    for path, spec in specs:
        notice(args, f"demo spec {path}")
        bar = progress_for(args, len(spec.tables), f"building {spec.name}")
        files, book = render_files(spec, bar)
        all_files.update(files)
        about.append(f"issue: {issue_text(book)}")
    notes = outfiles.publish_folder(out, all_files, force=True, about=about, what="demo")
    published(args, out, all_files, notes, "demo files", " (the demo replaces its own earlier issue)")
    return 0
