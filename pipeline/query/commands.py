"""`graftwork query ...`: thin CLI layer over the query functions (each prints a table; `--csv FILE` saves it)."""

from __future__ import annotations


def _filters(p) -> None:
    p.add_argument("--reference", metavar="KEY")
    p.add_argument("--source", action="append", metavar="KEY", help="only this source (repeatable)")
    p.add_argument("--status", action="append", choices=["accepted", "auto"],
                   help="count items placed through edges of this status (repeatable; default accepted and auto)")
    p.add_argument("--accepted-only", action="store_true", help="same as --status accepted")
    p.add_argument("--where", action="append", metavar="KEY=VALUE", help="item attribute equals value (repeatable)")
    p.add_argument("--csv", metavar="FILE", help="also write the table as CSV")


def register(sub, common) -> dict:
    q = sub.add_parser("query", help="ask the combined data by reference concept", parents=[common])
    qsub = q.add_subparsers(dest="query", required=True, metavar="QUERY")
    ru = qsub.add_parser("rollup", help="items per reference concept (with descendants), by source",
                         parents=[common])
    ru.add_argument("--concept", metavar="CODE", help="start at this concept (default: the top level)")
    ru.add_argument("--depth", type=int, default=1, help="levels to show (below --concept, if given)")
    _filters(ru)
    dd = qsub.add_parser("drilldown", help="the items on a concept, with their source category and edge",
                         parents=[common])
    dd.add_argument("concept", metavar="CODE")
    dd.add_argument("--direct", action="store_true", help="only items placed on the concept itself")
    dd.add_argument("--attributes", action="store_true", help="add one column per item attribute")
    dd.add_argument("--limit", type=int, default=100_000)
    _filters(dd)
    ov = qsub.add_parser("overlap", help="item keys found in several sources, and whether they agree",
                         parents=[common])
    ov.add_argument("--detail", action="store_true", help="one row per item copy and placement")
    ov.add_argument("--disagree", action="store_true", help="only keys whose copies are not on the same concept")
    _filters(ov)
    co = qsub.add_parser("coverage", help="share of each source's items placed, by edge status", parents=[common])
    _filters(co)
    st = qsub.add_parser("subtree", help="the reference around a concept, with item counts", parents=[common])
    st.add_argument("concept", metavar="CODE")
    st.add_argument("--depth", type=int, default=1, help="levels below the concept (default 1)")
    _filters(st)
    return {"query": run}


def filters_from(args):
    from pipeline.query.filters import LIVE, Filters, parse_attribute_filters

    statuses = ("accepted",) if args.accepted_only else tuple(dict.fromkeys(args.status or LIVE))
    return Filters(sources=list(args.source or []), statuses=statuses,
                   attributes=parse_attribute_filters(args.where))


def run(args, ctx):
    filters = filters_from(args)
    with ctx.open(read_only=True) as store:
        if args.query == "rollup":
            from pipeline.query.rollup import rollup

            df = rollup(store, concept=args.concept, depth=args.depth, reference=args.reference, filters=filters)
        elif args.query == "drilldown":
            from pipeline.query.drilldown import drilldown

            df = drilldown(store, args.concept, reference=args.reference, descendants=not args.direct,
                           filters=filters, limit=args.limit, attributes=args.attributes)
        elif args.query == "overlap":
            from pipeline.query.overlap import overlap

            df = overlap(store, reference=args.reference, filters=filters, detail=args.detail)
            if args.disagree and not args.detail:
                df = df[~df["same_concept"].astype(bool)].reset_index(drop=True)
        elif args.query == "coverage":
            from pipeline.query.coverage import coverage

            df = coverage(store, reference=args.reference, filters=filters)
        elif args.query == "subtree":
            from pipeline.query.subtree import subtree

            df = subtree(store, args.concept, depth=args.depth, reference=args.reference, filters=filters)
        else:
            raise ValueError(f"unknown query {args.query}")
    if args.csv:
        df.to_csv(args.csv, index=False)
    return df
