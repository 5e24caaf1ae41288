"""Command line: parse arguments, call the library, print or write results.

Each command lives in its own module under ``tablegen/commands`` with two
functions, ``add_arguments(parser)`` and ``run(args) -> int``. Only the module
of the command being run is imported, so ``tablegen --help`` stays instant and
commands never pay for each other's imports.
"""

from __future__ import annotations

import argparse
import importlib
import importlib.util
import sys

from . import __version__
from .core.errors import DataRangeError, TablegenError, Terminated, UsageError

#: (command, module, one-line summary) in the order --help lists them.
COMMANDS = [
    ("demo", "demo", "build the demo book of the invented plant, in its four editions, into output/demo/"),
    ("build", "build", "build a table book (PDF, CSV, JSON) from a TOML spec"),
    ("state", "state", "properties of a substance at temperatures you list"),
    ("species", "species", "list the coefficient library, check it, or show a species' sources"),
    ("process", "process", "state change of a gas or incompressible substance, with method errors"),
    ("combust", "combust", "combustion products, air ratios, heating values and dew point of a fuel"),
    ("compare", "compare", "QA comparison of generated values against a reference table"),
    ("chart", "chart", "T-s and h-s charts of a substance, with process overlays"),
    ("fit", "fit", "fit NASA polynomial coefficients to a tabulated cp(T)"),
    ("export", "export", "write a species or mixture as one coefficient record"),
]


class Parser(argparse.ArgumentParser):
    """argparse with one-line errors in tablegen's form and exit status 2."""

    def error(self, message):
        raise UsageError(f"{message}; see '{self.prog} --help'")


GLOBAL = ("data", "source", "quiet")


def common_options(prefix: str = "") -> argparse.ArgumentParser:
    """--data, --source, --quiet: accepted before or after the command name."""
    p = argparse.ArgumentParser(add_help=False)
    g = p.add_argument_group("data and output")
    g.add_argument("--data", action="append", default=None, metavar="PATH", dest=prefix + "data",
                   help="extra coefficient file or folder (repeatable); its records take precedence")
    g.add_argument("--source", default=None, metavar="SET", dest=prefix + "source",
                   help="take every species from this data set (e.g. nasa1993); default: each species' default")
    g.add_argument("--quiet", action="store_true", default=None, dest=prefix + "quiet",
                   help="no progress or notices on stderr")
    return p


def available() -> list[tuple[str, str, str]]:
    """Commands whose module exists in this build."""
    out = []
    for name, mod, summary in COMMANDS:
        if importlib.util.find_spec(f"tablegen.commands.{mod}") is not None:
            out.append((name, mod, summary))
    return out


def make_parser(selected: str | None) -> Parser:
    cmds = available()
    epilog = "example:\n  tablegen state air --T 25C,500C,1000K\n  tablegen demo\n\n" \
             "Run 'tablegen COMMAND --help' for the options of one command."
    parser = Parser(prog="tablegen", formatter_class=argparse.RawDescriptionHelpFormatter,
                    description="Ideal-gas property tables, charts and checks from open NASA polynomial data.",
                    epilog=epilog, parents=[common_options("top_")])
    parser.add_argument("--version", action="version", version=f"tablegen {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=Parser,
                                title="commands")
    for name, mod, summary in cmds:
        sp = sub.add_parser(name, help=summary, description=summary[0].upper() + summary[1:] + ".",
                            parents=[common_options()],
                            formatter_class=argparse.RawDescriptionHelpFormatter)
        if name == selected:
            module = importlib.import_module(f"tablegen.commands.{mod}")
            module.add_arguments(sp)
            sp.epilog = example_last(sp.epilog or "")
            sp.set_defaults(_run=module.run)
    return parser


def example_last(epilog: str) -> str:
    """Move the 'example:' block of a command's help to the end, where users look."""
    blocks = epilog.strip("\n").split("\n\n")
    ex = [b for b in blocks if b.lstrip().lower().startswith("example")]
    rest = [b for b in blocks if b not in ex]
    return "\n\n".join(rest + ex)


def _selected(argv) -> str | None:
    names = {c[0] for c in COMMANDS}
    skip = False
    for a in argv:
        if skip:
            skip = False
            continue
        if a in ("--data", "--source"):
            skip = True
            continue
        if a.startswith("-"):
            continue
        return a if a in names else None
    return None


def _join_negative_values(argv: list[str]) -> list[str]:
    """'--T -40C' -> '--T=-40C': argparse would take '-40C' for an option."""
    out, i = [], 0
    while i < len(argv):
        a = argv[i]
        if a.startswith("--") and "=" not in a and i + 1 < len(argv) and \
                len(argv[i + 1]) > 1 and argv[i + 1][0] == "-" and (argv[i + 1][1].isdigit() or argv[i + 1][1] == "."):
            out.append(f"{a}={argv[i + 1]}")
            i += 2
            continue
        out.append(a)
        i += 1
    return out


def _on_signal(signum, frame):
    raise Terminated(signum)


def _catch_termination() -> dict:
    """SIGTERM and SIGHUP raise Terminated, so a run cleans up as after Ctrl-C (main thread only)."""
    import signal
    import threading
    saved = {}
    if threading.current_thread() is not threading.main_thread():
        return saved
    for name in ("SIGTERM", "SIGHUP"):
        sig = getattr(signal, name, None)
        if sig is not None:
            saved[sig] = signal.signal(sig, _on_signal)
    return saved


def _restore(saved: dict) -> None:
    import signal
    for sig, handler in saved.items():
        signal.signal(sig, handler)


def main(argv=None) -> int:
    from .core import oswrite
    from .commands import common
    argv = _join_negative_values(list(sys.argv[1:] if argv is None else argv))
    saved = _catch_termination()
    common.hold_notices()
    oswrite.WRITTEN.clear()
    ok = False
    args = None
    try:
        parser = make_parser(_selected(argv))
        args = parser.parse_args(argv)
        if args.command is None:
            parser.print_help()
            return 0
        for key in GLOBAL:
            if getattr(args, key, None) is None:
                setattr(args, key, getattr(args, "top_" + key))
        args.data = tuple(args.data or ())
        args.quiet = bool(args.quiet)
        from .data.library import take_fallbacks
        take_fallbacks()
        status = int(args._run(args) or 0)
        ok = True
        if not args.quiet:
            for note in take_fallbacks():
                print(f"note: {note}", file=sys.stderr)
        return status
    except TablegenError as e:
        if isinstance(e, DataRangeError):
            # name the command's own way to extrapolate, or none where it has none
            e = e.offering(getattr(args, "extrapolate_option", None))
        print(f"tablegen: {e}", file=sys.stderr)
        return e.exit_status
    except (KeyboardInterrupt, Terminated) as e:
        word = "terminated" if isinstance(e, Terminated) else "interrupted"
        done = oswrite.WRITTEN
        left = (f"{len(done)} file{'s' if len(done) > 1 else ''} had been written (first: {done[0]})"
                if done else "no file was written")
        print(f"tablegen: {word}; {left}", file=sys.stderr)
        return e.exit_status if isinstance(e, Terminated) else 130
    except BrokenPipeError:
        return 0
    finally:
        common.release_notices(ok)
        _restore(saved)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
