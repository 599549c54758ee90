"""`graftwork export ...`: thin CLI layer over the exporters."""

from __future__ import annotations


def register(sub, common) -> dict:
    ex = sub.add_parser("export", help="write the crosswalk out", parents=[common])
    xsub = ex.add_subparsers(dest="what", required=True, metavar="WHAT")
    xm = xsub.add_parser("mappings", help="MAPS_TO edges", parents=[common])
    xm.add_argument("out")
    xm.add_argument("--format", default="csv", dest="fmt")
    xm.add_argument("--candidates", type=int, default=1, help="ranks per category (default 1)")
    xm.add_argument("--source", action="append", metavar="KEY")
    return {"export": run}


def run(args, ctx):
    from pipeline.exchange.exporters import export_mappings

    if args.what == "mappings":
        with ctx.open(read_only=True) as store:
            return export_mappings(store, args.out, fmt=args.fmt, candidates=args.candidates, sources=args.source)
    raise ValueError(f"unknown export {args.what}")
