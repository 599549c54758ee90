"""`graftwork review ...` and `graftwork serve`: thin CLI layer over the review library."""

from __future__ import annotations

import os
import sys

from pipeline.store import DEFAULT_STORE


def register(sub, common) -> dict:
    from pipeline.review.decisions import ACTIONS
    from pipeline.review.queues import QUEUES

    rv = sub.add_parser("review", help="steward queues, decisions, sheets and history", parents=[common])
    rsub = rv.add_subparsers(dest="review", required=True, metavar="ACTION")

    ls = rsub.add_parser("list", help="categories that need a person, most items first", parents=[common])
    ls.add_argument("queue", choices=QUEUES)
    ls.add_argument("--source", action="append", metavar="KEY", help="only this source (repeatable)")
    ls.add_argument("--reference", metavar="KEY")
    ls.add_argument("--limit", type=int, default=50, help="categories shown (default 50; 0 = all)")
    ls.add_argument("--csv", metavar="FILE", help="write the queue as a decision sheet ('-' = standard output)")
    ls.add_argument("--margin", type=float, default=None, help="uncertain when the first two are closer than this")

    for action in ACTIONS:
        helps = {"accept": "accept an edge (a decision no run changes)", "reject": "reject an edge (never proposed "
                 "again)", "remap": "map the category to this concept instead (code or label)",
                 "reopen": "withdraw a decision (all of the category's, without CONCEPT)"}
        d = rsub.add_parser(action, help=helps[action], parents=[common])
        d.add_argument("source_key")
        d.add_argument("category_code")
        d.add_argument("concept", nargs="?" if action == "reopen" else None, default="",
                       metavar="CONCEPT" if action != "remap" else "CONCEPT_OR_LABEL")
        _decision_options(d)

    im = rsub.add_parser("import", help="apply the filled `decision` column of an exported sheet", parents=[common])
    im.add_argument("file")
    _decision_options(im, note=False)

    hi = rsub.add_parser("history", help="every event of a category's edges", parents=[common])
    hi.add_argument("source_key")
    hi.add_argument("category_code")

    se = rsub.add_parser("search", help="find reference concepts by code or label", parents=[common])
    se.add_argument("text")
    se.add_argument("--reference", metavar="KEY")
    se.add_argument("--limit", type=int, default=20)

    pe = rsub.add_parser("pending", help="decisions queued while the store was busy", parents=[common])
    pe.add_argument("--apply", action="store_true", help="apply them now")

    sv = sub.add_parser("serve", help="the review page in a browser (localhost by default)", parents=[common])
    sv.add_argument("--host", default="127.0.0.1", help="bind address (default 127.0.0.1; any other needs the "
                    "printed token)")
    sv.add_argument("--port", type=int, default=8765)
    sv.add_argument("--token", help="access token for a non-local bind (default: a new random one)")
    sv.add_argument("--by", help="who decides through this page (default $GRAFTWORK_USER or the login name)")
    sv.add_argument("--reference", metavar="KEY")
    return {"review": run, "serve": serve}


def _decision_options(p, *, note: bool = True) -> None:
    if note:
        p.add_argument("--note", default="", help="why (kept with the decision)")
    p.add_argument("--by", help="who decides (default $GRAFTWORK_USER or the login name)")
    p.add_argument("--reference", metavar="KEY")
    p.add_argument("--wait", type=float, default=30.0,
                   help="seconds to wait for a busy store before queueing the decision (default 30)")


def store_path(args) -> str:
    return args.store or os.environ.get("GRAFTWORK_STORE") or DEFAULT_STORE


def run(args, ctx):
    what = args.review
    if what == "list":
        return _list(args, ctx)
    if what in ("accept", "reject", "remap", "reopen"):
        from pipeline.review.decisions import Decision

        d = Decision(action=what, source=args.source_key, category=args.category_code, concept=args.concept or "",
                     note=args.note, by=args.by or "")
        return _submit(args, ctx, [d])
    if what == "import":
        from pipeline.review.bulk import merge_problems, read_sheet

        decisions, problems = read_sheet(args.file, by=args.by or "")
        summary = merge_problems(_submit(args, ctx, decisions, strict=False), problems)
        for line in summary["invalid"]:
            print(f"graftwork: {line}", file=sys.stderr)
        summary.pop("invalid_rows", None)
        return summary
    if what == "history":
        from pipeline.ingest.graph_writer import node_uid
        from pipeline.review.events import edge_history

        with ctx.open(read_only=True) as store:
            return edge_history(store, node_uid(args.source_key, args.category_code))
    if what == "search":
        import pandas as pd

        from pipeline.review.decisions import pick_reference
        from pipeline.review.search import search_concepts
        from pipeline.review.tree import ConceptTree

        with ctx.open(read_only=True) as store:
            tree = ConceptTree.load(store, pick_reference(store, args.reference))
        hits = search_concepts(tree, args.text, limit=args.limit)
        return pd.DataFrame([{"code": n.code, "label": n.label, "path": n.path} for n in hits],
                            columns=["code", "label", "path"])
    if what == "pending":
        from pipeline.review.gate import DecisionGate

        gate = DecisionGate(store_path(args))
        out = gate.flush() if args.apply else {"pending": gate.pending()}
        out["refused_at_replay"] = gate.failed()
        return out
    raise ValueError(f"unknown review action {what}")


def _list(args, ctx):
    from pipeline.review.bulk import write_sheet
    from pipeline.review.queues import QueueSettings, queue_frame, review_queue

    settings = QueueSettings()
    if args.margin is not None:
        settings.margin = args.margin
    with ctx.open(read_only=True) as store:
        entries = review_queue(store, args.queue, sources=args.source, reference=args.reference,
                               limit=args.limit or None, settings=settings)
    if args.csv == "-":
        write_sheet(entries, sys.stdout)
        return None
    if args.csv:
        info = write_sheet(entries, args.csv)
        print(f"wrote {info['rows']} rows ({info['categories']} categories) to {info['file']}", file=sys.stderr)
    if args.json:
        return [e.to_dict() for e in entries]
    return queue_frame(entries)


def _submit(args, ctx, decisions, *, strict: bool = True):
    if args.neo4j:  # a server engine has no single-writer file lock to wait for
        from pipeline.review.decisions import apply_decisions

        with ctx.open() as store:
            return apply_decisions(store, decisions, reference=args.reference, strict=strict)
    from pipeline.review.gate import DecisionGate

    gate = DecisionGate(store_path(args), reference=args.reference)
    summary = gate.submit(decisions, wait=args.wait, strict=strict)
    if summary["status"] == "queued":
        print(f"graftwork: {summary['message']} ({summary['pending_file']})", file=sys.stderr)
    return summary


def serve(args, ctx):
    from pipeline.review.web.server import serve_forever

    serve_forever(store_path(args), host=args.host, port=args.port, token=args.token, by=args.by,
                  reference=args.reference)
