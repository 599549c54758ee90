"""`graftwork export ...` and `graftwork import mappings FILE`: thin CLI layer over the exporters and importer."""

from __future__ import annotations


def register(sub, common) -> dict:
    ex = sub.add_parser("export", help="write the crosswalk out", parents=[common])
    xsub = ex.add_subparsers(dest="what", required=True, metavar="WHAT")
    xm = xsub.add_parser("mappings", help="MAPS_TO edges as CSV, SSSOM TSV or SKOS Turtle", parents=[common])
    xm.add_argument("out")
    xm.add_argument("--format", default=None, dest="fmt",
                    help="csv, sssom (TSV) or turtle (default: from the file name, else csv)")
    xm.add_argument("--candidates", type=int, default=1, help="ranks per category (default 1)")
    xm.add_argument("--source", action="append", metavar="KEY")
    xm.add_argument("--status", action="append", choices=["accepted", "auto", "proposed", "rejected"],
                    help="only edges of this status (repeatable; default all)")
    xm.add_argument("--prefix", action="append", metavar="KEY=IRI",
                    help="IRI namespace for the ids of scheme KEY (default urn:graftwork:KEY:)")
    xm.add_argument("--license", metavar="IRI", help="SSSOM license of the mapping set")
    xm.add_argument("--set-id", metavar="IRI", help="SSSOM mapping_set_id")

    xi = xsub.add_parser("items", help="items with their reference path (CSV or Parquet)", parents=[common])
    xi.add_argument("out")
    xi.add_argument("--format", choices=["csv", "parquet"], dest="fmt", help="default: from the file name")
    xi.add_argument("--source", action="append", metavar="KEY")
    xi.add_argument("--status", action="append", choices=["accepted", "auto"],
                    help="placements through edges of this status (repeatable; default both)")
    xi.add_argument("--reference", metavar="KEY")

    xc = xsub.add_parser("coverage", help="picture of coverage by top-level concept (PNG or HTML)",
                         parents=[common])
    xc.add_argument("out")
    xc.add_argument("--format", choices=["png", "html"], dest="fmt", help="default: from the file name")
    xc.add_argument("--source", action="append", metavar="KEY")
    xc.add_argument("--depth", type=int, default=1, help="concept level to chart (default 1, the top)")
    xc.add_argument("--reference", metavar="KEY")

    im = sub.add_parser("import", help="read a crosswalk in", parents=[common])
    isub = im.add_subparsers(dest="what", required=True, metavar="WHAT")
    imm = isub.add_parser("mappings", help="an existing crosswalk (CSV or SSSOM TSV) as accepted decisions",
                          parents=[common])
    imm.add_argument("file")
    imm.add_argument("--format", choices=["csv", "sssom"], dest="fmt", help="default: .tsv is SSSOM, else CSV")
    imm.add_argument("--by", metavar="NAME", help="who decided (default: $GRAFTWORK_USER, $USER)")
    imm.add_argument("--note", help="note for rows that carry none")
    imm.add_argument("--source", metavar="KEY", help="source of every row (CSV without source_scheme)")
    imm.add_argument("--reference", metavar="KEY")
    imm.add_argument("--prefix", action="append", metavar="KEY=IRI", help="as given to the export")
    imm.add_argument("--dry-run", action="store_true", help="check every row, write nothing")
    return {"export": run_export, "import": run_import}


def run_export(args, ctx):
    from pipeline.exchange.iris import parse_prefix_overrides

    with ctx.open(read_only=True) as store:
        if args.what == "mappings":
            from pipeline.exchange.exporters import export_mappings

            return export_mappings(store, args.out, fmt=args.fmt or _mapping_format(args.out),
                                   candidates=args.candidates, sources=args.source, statuses=args.status,
                                   prefixes=parse_prefix_overrides(args.prefix), license=args.license,
                                   set_id=args.set_id)
        if args.what == "items":
            from pipeline.exchange.items_export import export_items

            return export_items(store, args.out, fmt=args.fmt, reference=args.reference, sources=args.source,
                                statuses=tuple(dict.fromkeys(args.status or ("accepted", "auto"))))
        if args.what == "coverage":
            from pipeline.exchange.coverage_view import export_coverage
            from pipeline.query.filters import Filters

            return export_coverage(store, args.out, fmt=args.fmt, reference=args.reference,
                                   filters=Filters(sources=list(args.source or [])), depth=args.depth)
    raise ValueError(f"unknown export {args.what}")


def run_import(args, ctx):
    from pipeline.exchange.importer import import_mappings
    from pipeline.exchange.iris import parse_prefix_overrides

    prefixes = parse_prefix_overrides(args.prefix)
    work = lambda store, run_id: import_mappings(
        store, args.file, fmt=args.fmt, by=args.by, note=args.note, source=args.source,
        reference=args.reference, prefixes=prefixes, run_id=run_id, dry_run=args.dry_run)
    if args.dry_run:
        with ctx.open(read_only=True) as store:
            return work(store, "")
    return ctx.write_job("import mappings", work)


def _mapping_format(out: str) -> str:
    name = str(out).lower()
    if name.endswith(".tsv"):
        return "sssom"
    if name.endswith((".ttl", ".turtle")):
        return "turtle"
    return "csv"
