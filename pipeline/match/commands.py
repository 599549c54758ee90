"""`graftwork evaluate`: thin CLI layer over `pipeline.match.report.run_evaluation`."""

from __future__ import annotations


def register(sub, common) -> dict:
    ev = sub.add_parser("evaluate", help="score a source's MAPS_TO edges against an answer key",
                        parents=[common])
    ev.add_argument("--answer-key", required=True, metavar="FILE",
                    help="CSV with source_code,reference_code (several rows per source code allowed)")
    ev.add_argument("--source", required=True, metavar="KEY", help="the source taxonomy to score")
    ev.add_argument("--reference", metavar="KEY", help="reference scheme (needed when there are several)")
    ev.add_argument("--k", type=int, default=5, help="depth of hit@k and MRR (default 5)")
    ev.add_argument("--out", metavar="DIR", help="write report.json and curves.png into this folder")
    ev.add_argument("--ablation", action="store_true",
                    help="also re-map once per feature switched off (replaces the source's machine edges, "
                         "then restores them with the last map run's settings)")
    return {"evaluate": run}


def run(args, ctx):
    from pipeline.match.evaluate import read_answer_key
    from pipeline.match.report import run_evaluation

    key = read_answer_key(args.answer_key)  # a bad file stops here, before the store is opened

    def work(store, run_id=""):
        return run_evaluation(store, args.source, key, reference=args.reference, k=args.k, out=args.out,
                              ablation=args.ablation, run_id=run_id)

    if args.ablation:
        return ctx.write_job("evaluate", work)
    with ctx.open(read_only=True) as store:
        return work(store)
