"""tablegen demo: the demo books of an invented plant, built from the shipped specs."""

from __future__ import annotations

from importlib import resources
from pathlib import Path

from .common import notice

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
                "and N2 in SI and US customary units. The demo always overwrites the files it\n"
                "writes into its output folder (no --force needed); other files there are left alone.\n"
                "The specs it builds from are named on stderr: copy one to start a book of your own.\n\n"
                "example:\n"
                "  tablegen demo\n"
                "  tablegen demo --out issued/demo")


def run(args) -> int:
    from .. import spec as specmod
    from ..book.build import progress_for, render_files, write
    out = Path(args.out) if args.out else OUT
    all_files = {}
    for path in spec_paths():
        notice(args, f"demo spec {path}")
        spec = specmod.load(path, source=args.source, data=args.data)
        bar = progress_for(args, len(spec.tables), f"building {spec.name}")
        files, _ = render_files(spec, out, bar)
        all_files.update(files)
    paths = write(all_files, force=True)
    notice(args, f"wrote {len(paths)} demo files to {out}/ (the demo overwrites its own files)")
    for p in paths:
        print(p)
    return 0
