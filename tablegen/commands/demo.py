"""tablegen demo: the demo book of an invented plant in its four editions, built from the shipped spec."""

from __future__ import annotations

from importlib import resources
from pathlib import Path

from .common import notice

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
                "The demo always overwrites the files it writes into its output folder (no --force\n"
                "needed); other files there are left alone. The spec it builds from is named on stderr:\n"
                "copy it to start a book of your own.\n\n"
                "example:\n"
                "  tablegen demo\n"
                "  tablegen demo --out issued/demo")


def run(args) -> int:
    from .. import spec as specmod
    from ..book.build import file_names, merge, progress_for, render_files, write
    from ..book.pdf import render_booklet
    out = Path(args.out) if args.out else OUT
    all_files = {}
    for path in spec_paths():
        notice(args, f"demo spec {path}")
        for spec in specmod.load_editions(path, source=args.source, data=args.data):
            bar = progress_for(args, len(spec.tables), f"building {spec.name} ({spec.edition.name})")
            files, book = render_files(spec, out, bar)
            if spec.document.paper == "A5":
                files[out / file_names(spec)["booklet"]] = render_booklet(book)
            merge(all_files, files)
    paths = write(all_files, force=True)
    notice(args, f"wrote {len(paths)} demo files to {out}/ (the demo overwrites its own files)")
    for p in paths:
        print(p)
    return 0
