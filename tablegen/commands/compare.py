"""tablegen compare: QA comparison of generated values against a reference table or book.

Exit status, one meaning each: 0 every compared cell is within tolerance, 1 some
cell is not, 2 bad input (the reference or the options; nothing written), 3 an
output problem (files exist without --force, or cannot be written).

The three modules import one way: compare.py (arguments, dispatch) -> compare_book.py
(a book against a folder) -> compare_table.py (one table, and what a book shares with it).
"""

from __future__ import annotations

from pathlib import Path

from .common import add_datum_options

EXAMPLE = """REFERENCE: CSV or whitespace-separated text; header cells 'key [unit]' (keys of the
state JSON: cp, cv, k, h, u, s0, g0, Pr, vr, a, cp_molar, h_molar, s0_molar,
dh298_molar, ...; temperature column T), '#' starts a comment line. With a book spec,
REFERENCE may be a folder: each table is matched to the CSV of the same name (a
tablegen book folder, through its JSON sidecar), or to the file a --map file names.

Tolerances carry their unit or %: cp=0.5%, h=0.5kJ/kg, h=0.1%+0.2kJ/kg; a bare
number is refused. Hints (on stderr, in summary.json and on page 1) name a constant
offset, a 1 atm reference pressure or another Pr/vr anchor; they never change the verdict.

Exit status: 0 all cells within tolerance, 1 some cell out of tolerance, 2 bad input
(the reference or the options; nothing written), 3 an output problem (files exist
without --force, or cannot be written).

example:
  tablegen compare N2 janaf-n2.csv --tolerance cp_molar=0.5% --tolerance dh298_molar=0.5%+0.001kJ/mol
  tablegen compare air air-rev-b.txt --h-datum sensible:0C --align Pr=scale --align vr=scale
  tablegen compare CO2 earlier-issue.csv --columns cp,h --tolerance h=0.2kJ/kg --out qa/co2 --json
  tablegen build plant-tables.toml
  tablegen compare plant-tables.toml output/plant-tables/flue-nm3.csv --table flue-nm3
  tablegen compare plant-tables.toml output/plant-tables --tolerance cp=0.2%

The files named here are in the project's docs/examples/ folder."""

#: --listing values (tablegen.book.qa_report.LISTING_MODES; written out here so that parsing
#: the arguments imports no drawing library)
LISTING_MODES = ("auto", "full", "failing")


def add_arguments(p):
    p.epilog = EXAMPLE
    p.add_argument("substance", metavar="SUBSTANCE-OR-SPEC",
                   help="species id or alias, shipped mixture, composition (NAME=x,NAME=y), or a table-book spec (*.toml)")
    p.add_argument("reference", metavar="REFERENCE",
                   help="reference table (CSV or whitespace-separated text), or with a spec a folder of them")
    p.add_argument("--columns", default=None, metavar="KEYS",
                   help="comma-separated keys to compare (default: every property column of REFERENCE)")
    p.add_argument("--tolerance", action="append", default=[], metavar="[TABLE/]COL=VALUE",
                   help="tolerance of a column, repeatable; with a unit or %%: relative (cp=0.1%%), "
                        "absolute (h=0.5kJ/kg), or both (h=0.1%%+0.2kJ/kg); with a folder it applies to "
                        "every table with that column, TABLE/COL=... to one; defaults: cp and mean cp "
                        "0.5%%; h, u, s0 0.5%% of the change since 298.15 K plus a small floor; k, a 0.25%%; "
                        "Pr, vr 2%% (docs/compare.md)")
    p.add_argument("--allow-wide", action="store_true",
                   help="accept a tolerance over 20%% relative or wider than the column's range "
                        "(stated on page 1 of the report)")
    p.add_argument("--align", action="append", default=[], metavar="[TABLE/]COL=offset|scale",
                   help="fit and report a constant before judging, repeatable: offset for h, u, s0, "
                        "h_molar, u_molar, s0_molar, dh298_molar; scale for Pr, vr")
    p.add_argument("--mean-from", default=None, metavar="T",
                   help="Tm of mean-cp columns (cp_mean_h, cp_mean_s): default the sensible-datum "
                        "temperature, else 298.15 K; a spec table uses its own")
    p.add_argument("--vol-ref", default=None, metavar="REF",
                   help="reference conditions of per-m³ columns (cp_vol, h_vol, ...): normal (default, "
                        "0 °C and 101.325 kPa), standard-15C, standard-60F, or T,P (e.g. 20C,1atm); "
                        "a spec uses its own")
    p.add_argument("--table", default=None, metavar="NAME[,NAME...]",
                   help="with a spec file: the table to compare (needed for one reference file when the "
                        "spec has several); with a folder, the tables to compare (default: all)")
    p.add_argument("--edition", default=None, metavar="NAME",
                   help="with a spec that declares editions and a folder: the edition whose files to "
                        "compare (default: the spec's first edition)")
    p.add_argument("--map", default=None, metavar="MAP.toml",
                   help="with a folder: reference file of each table whose file has another name "
                        "([tables] name = \"file.csv\")")
    p.add_argument("--out", default=None, metavar="DIR",
                   help="folder for report.pdf, deviations.csv, summary.json (default "
                        "output/compare-NAME-vs-REFERENCE/)")
    p.add_argument("--listing", default="auto", choices=LISTING_MODES,
                   help="rows of report.pdf's side-by-side listing: every row (full), the rows out of "
                        "tolerance with two rows either side (failing), or full up to 500 rows of a "
                        "table and failing above (auto, the default); deviations.csv always has every row")
    p.add_argument("--force", action="store_true", help="overwrite existing output files")
    p.add_argument("--json", action="store_true", help="print the JSON summary on stdout")
    add_datum_options(p)
    # None marks "not given", so a spec table's own datum can be kept.
    p.set_defaults(h_datum=None, p_ref=None, anchor=None)


def run(args) -> int:
    from .common import data_notices
    data_notices(args)
    if Path(args.reference).is_dir():
        from .compare_book import run_book
        return run_book(args)
    from .compare_table import run_table
    return run_table(args)
