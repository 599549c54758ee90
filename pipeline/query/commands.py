"""`graftwork query ...`: thin CLI layer over the query functions."""

from __future__ import annotations


def register(sub, common) -> dict:
    q = sub.add_parser("query", help="ask the combined data by reference concept", parents=[common])
    qsub = q.add_subparsers(dest="query", required=True, metavar="QUERY")
    ru = qsub.add_parser("rollup", help="items per reference concept (with descendants), by source",
                         parents=[common])
    ru.add_argument("--concept", metavar="CODE", help="start at this concept (default: the top level)")
    ru.add_argument("--depth", type=int, default=1, help="levels to show (below --concept, if given)")
    ru.add_argument("--reference", metavar="KEY")
    ru.add_argument("--csv", metavar="FILE", help="also write the table as CSV")
    ru.add_argument("--include-proposed", action="store_true", help="count items placed through proposed edges")
    return {"query": run}


def run(args, ctx):
    from pipeline.query.rollup import LIVE, rollup

    if args.query == "rollup":
        with ctx.open(read_only=True) as store:
            statuses = LIVE + (("proposed",) if args.include_proposed else ())
            df = rollup(store, concept=args.concept, depth=args.depth, reference=args.reference, statuses=statuses)
        if args.csv:
            df.to_csv(args.csv, index=False)
        return df
    raise ValueError(f"unknown query {args.query}")
