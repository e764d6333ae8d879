"""``latdyn report FILE... [--compare VARIANT]... [-o reports/NAME] [--criteria SET]... [--units SI|US]
[--document FILE.toml] [--title T] [--number N] [--revision R] [--date D] [--prepared NAME]
[--checked NAME] [--approved NAME] [--force]``: the document block from a small table file
(latdyn.report.document), its entries overridden by the options."""

from __future__ import annotations

import os
import sys

__all__ = ["add_arguments", "run"]


def add_arguments(parser):
    parser.add_argument("files", nargs="+", metavar="FILE", help="aircraft file(s) analysed in full")
    from latdyn.commands import add_criteria, add_units

    parser.add_argument("--compare", action="append", default=[], metavar="VARIANT",
                        help="a variant file compared with the first FILE; repeat the option "
                             "for several")
    parser.add_argument("-o", "--output", metavar="FOLDER",
                        help="report folder (default reports/<first file's name>)")
    add_criteria(parser)
    add_units(parser, "those of the first file")
    parser.add_argument("--document", metavar="FILE.toml",
                        help="the document block from a small TOML file (title, number, revision, "
                             "date, prepared, checked, approved, each one line of text); the options "
                             "below override its entries")
    for key, words in (("title", "document title (default: from the aircraft names)"),
                       ("number", "document number"), ("revision", "document revision"),
                       ("date", "document date"), ("prepared", "prepared by"),
                       ("checked", "checked by"), ("approved", "approved by")):
        parser.add_argument(f"--{key}", metavar="TEXT",
                            help=f"{words}, in the document block and the printed page headers")
    parser.add_argument("--force", action="store_true", help="replace an existing report folder")
    from latdyn.commands import file_unit_help

    parser.add_argument("--sigma-v", type=float, metavar="S",
                        help=f"RMS lateral gust velocity {file_unit_help('speed')}, in the first "
                             "file's units, for the turbulence tables of augmented conditions "
                             "(with --scale-length)")
    parser.add_argument("--scale-length", type=float, metavar="L",
                        help=f"lateral gust scale length L_v {file_unit_help('length')}, in the "
                             "first file's units (with --sigma-v)")
    parser.add_argument("--progress", action="store_true", default=None,
                        help="show the progress line even when stderr is not a terminal")


def run(args):
    from latdyn.commands import criteria_names
    from latdyn.display import SYSTEMS
    from latdyn.errors import InputError
    from latdyn.report import write_report
    from latdyn.report.content import DOCUMENT_FIELDS

    gust = None
    if (args.sigma_v is None) != (args.scale_length is None):
        raise InputError("command line", "--sigma-v", "--sigma-v and --scale-length together", "only one of them")
    if args.sigma_v is not None:
        from latdyn.turbulence import Gust

        from latdyn.aircraft_file import read_tree
        from latdyn.commands import option_to_si, positive_option

        positive_option(args.sigma_v, "--sigma-v", "speed")
        positive_option(args.scale_length, "--scale-length", "length")
        # typed in the first file's units (as sweep --vary is), computed in SI
        units = read_tree(args.files[0])["__units__"]
        gust = Gust(option_to_si(args.sigma_v, "speed", units),
                    option_to_si(args.scale_length, "length", units))
    from latdyn.report.document import merge_document, read_document

    document = merge_document(read_document(args.document) if args.document else None,
                              {key: getattr(args, key) for key, _ in DOCUMENT_FIELDS})
    output = args.output or os.path.join(
        "reports", os.path.splitext(os.path.basename(args.files[0]))[0])
    from latdyn.output_files import Output, check_output_plan

    names = criteria_names(args) or ()
    check_output_plan([Output(output, "-o", "report", args.force)],
                      [*args.files, *(args.compare or ()), *(name for name in names if os.path.isfile(name))])
    folder = write_report(args.files, output, args.compare, criteria_names(args), args.force,
                          units=SYSTEMS[args.units] if args.units else None,
                          document=document,
                          progress=args.progress, argv=["latdyn", "report", *sys.argv[2:]], gust=gust)
    print(f"wrote {os.path.join(folder, 'index.html')}")
    return 0
