"""The `graftwork` command: parse options, call one library function, print its result.

Exit codes: 0 ok, 1 failed, 2 bad input, 3 another job holds the store (DESIGN.md).
"""

from __future__ import annotations

import argparse
import json
import logging
import os
import signal
import sys
import threading
from pathlib import Path

from pipeline import __version__
from pipeline.errors import GraftworkError
from pipeline.store import DEFAULT_STORE, open_store

log = logging.getLogger("graftwork")

# Command groups that live beside their library code. Each module defines
# `register(sub, common) -> dict[str, handler]`, where handler(args, ctx) returns what to print;
# the dict key is the top-level command name it handles (e.g. "review").
EXTENSIONS = ("pipeline.review.commands", "pipeline.exchange.commands", "pipeline.query.commands",
              "pipeline.jobs.commands", "pipeline.match.commands")


class Context:
    """What a command handler gets besides its arguments: store opening and the run ledger."""

    def __init__(self, args):
        self.args = args

    def open(self, *, read_only: bool = False):
        return _open(self.args, read_only=read_only)

    def write_job(self, job: str, work):
        """Run work(store, run_id) on a writable store, recorded in the run ledger; returns its result."""
        from pipeline.jobs.ledger import ledger

        with self.open() as store:
            params = {k: v for k, v in vars(self.args).items() if k not in ("store", "neo4j", "json", "verbose")}
            with ledger(store, job, params) as run:
                run["counts"] = work(store, run["run_id"])
                return run["counts"]


def _load_extensions(sub, common) -> dict:
    import importlib

    handlers = {}
    for name in EXTENSIONS:
        try:
            module = importlib.import_module(name)
        except ModuleNotFoundError as exc:
            if exc.name == name:  # that group is not installed in this build; anything else is a real error
                continue
            raise
        handlers.update(module.register(sub, common))
    return handlers


def _global_options(parser: argparse.ArgumentParser, *, suppress: bool) -> None:
    d = argparse.SUPPRESS if suppress else None
    parser.add_argument("--store", default=d, metavar="PATH",
                        help=f"embedded store file (default ./{DEFAULT_STORE})")
    parser.add_argument("--neo4j", default=d, metavar="URI",
                        help="use a Neo4j database instead (user/password from GRAFTWORK_NEO4J_USER/_PASSWORD)")
    parser.add_argument("--config", default=d, metavar="FILE", help="graftwork.toml")
    parser.add_argument("--json", action="store_true", default=d, help="machine-readable output")
    parser.add_argument("-v", "--verbose", action="count", default=d, help="more log output")


def build_parser() -> argparse.ArgumentParser:
    return _build()[0]


def _build():
    common = argparse.ArgumentParser(add_help=False)
    _global_options(common, suppress=True)
    p = argparse.ArgumentParser(prog="graftwork", description="Keep a scored crosswalk from source taxonomies "
                                "onto one reference hierarchy, in a graph.")
    p.add_argument("--version", action="version", version=f"graftwork {__version__}")
    _global_options(p, suppress=False)
    sub = p.add_subparsers(dest="command", required=True, metavar="COMMAND")

    ingest = sub.add_parser("ingest", help="load a reference, a source taxonomy or items", parents=[common])
    isub = ingest.add_subparsers(dest="what", required=True, metavar="WHAT")
    ref = isub.add_parser("reference", help="reference hierarchy (RDF: SKOS or RDFS/OWL; or a tree CSV)",
                          parents=[common])
    ref.add_argument("file")
    ref.add_argument("--format", default="rdf", choices=["rdf", "tree"], dest="fmt")
    ref.add_argument("--rdf-format", help="turtle, xml, nt, json-ld (default: from the file extension)")
    ref.add_argument("--lang", default="en", help="label language, with fallback (default en)")
    ref.add_argument("--root", metavar="IRI", help="ingest only this concept and its descendants")
    ref.add_argument("--scheme", metavar="KEY", help="key for this reference (default: from the file name)")
    ref.add_argument("--code-column", default="code")
    ref.add_argument("--label-column", default="label")
    ref.add_argument("--parent-column", default="parent_code")

    src = isub.add_parser("source", help="a source taxonomy: tree, paths or tags CSV", parents=[common])
    src.add_argument("key")
    src.add_argument("file")
    src.add_argument("--format", default="tree", choices=["tree", "paths", "tags"], dest="fmt")
    src.add_argument("--separator", default=" > ", help="path separator for --format paths (default ' > ')")
    src.add_argument("--code-column", default="code")
    src.add_argument("--label-column", default="label")
    src.add_argument("--parent-column", default="parent_code")
    src.add_argument("--path-column", default="path")
    src.add_argument("--tag-column", default="tag")

    items = isub.add_parser("items", help="member items of a source (CSV or Parquet)", parents=[common])
    items.add_argument("key")
    items.add_argument("file")
    items.add_argument("--key-column", default="item_key")
    items.add_argument("--title-column", default="title")
    items.add_argument("--category-column", default="category")
    items.add_argument("--category-separator", default="|",
                       help="separator inside the category column (default '|'; '' = one category per row)")
    items.add_argument("--attributes", help="comma-separated columns kept as attributes (default: all others)")
    items.add_argument("--rejects", metavar="FILE", help="where malformed rows go (default: beside the store)")
    items.add_argument("--batch-size", type=int, default=50_000)

    emb = sub.add_parser("embed", help="write category and concept vectors", parents=[common])
    emb.add_argument("--embedder", default="static", choices=["static", "lexical", "transformer"])

    mp = sub.add_parser("map", help="score MAPS_TO edges from source categories to reference concepts",
                        parents=[common])
    mp.add_argument("--source", action="append", metavar="KEY", help="only this source (repeatable)")
    mp.add_argument("--reference", metavar="KEY")
    mp.add_argument("--candidates", type=int, default=5, help="edges kept per category (default 5)")
    mp.add_argument("--auto-threshold", type=float, default=None,
                    help="rank-1 probability that makes an edge auto (default: learned or 0.80)")
    mp.add_argument("--without", action="append", default=[], metavar="FEATURE",
                    help="switch a feature off (text, lexical, members, parent, depth, instance)")
    mp.add_argument("--floor", type=float, default=None, help="no edge below this score")
    mp.add_argument("--learn", metavar="ANSWER_KEY",
                    help="fit the scoring model on an answer key CSV (or 'decisions': the stewards' decisions) first")
    mp.add_argument("--target-precision", type=float, metavar="P",
                    help="with --learn: pick the auto threshold that reaches this precision on the labels")
    mp.add_argument("--forget-model", action="store_true", help="go back to the default weights and threshold")
    mp.add_argument("--index-above", type=int, default=20000, metavar="N",
                    help="on Neo4j 5.23+, find candidates through the vector index when the reference has more "
                         "than N concepts (default 20000)")
    mp.add_argument("--multi-margin", type=float, default=0.0,
                    help="allow several auto edges per category (1:n) when within this probability of the best")

    pl = sub.add_parser("place", help="place items on concepts through the live edges", parents=[common])
    pl.add_argument("--source", action="append", metavar="KEY")
    pl.add_argument("--reference", metavar="KEY")

    run = sub.add_parser("run", help="the nightly job from the config: ingest, embed, map, place what changed",
                         parents=[common])
    run.add_argument("--full", action="store_true", help="redo everything, not only what changed")
    sub.add_parser("status", help="what is in the store, and the last runs", parents=[common])

    demo = sub.add_parser("demo", help="build the invented demo scenario end to end", parents=[common])
    demo.add_argument("--data", default="demo_data", help="scenario folder (generated if absent)")
    demo.add_argument("--items", type=int, default=30_000, help="items to generate (default 30000)")
    demo.add_argument("--seed", type=int, default=7)
    demo.add_argument("--embedder", default="static", choices=["static", "lexical", "transformer"])
    handlers = _load_extensions(sub, common)
    return p, handlers


class Terminated(KeyboardInterrupt):
    """SIGTERM (a scheduler or `kill` stopping the job), raised like Ctrl-C so the transaction in flight rolls
    back and the job stops at the last committed batch."""


def _terminate(signum, frame):
    raise Terminated()


def main(argv: list[str] | None = None) -> int:
    parser, handlers = _build()
    args = parser.parse_args(argv)
    logging.basicConfig(level=logging.WARNING - 10 * min(2, args.verbose or 0),
                        format="%(levelname)s %(name)s: %(message)s")
    # Only the main thread may set handlers; the previous one comes back after (tests call main in-process).
    previous = signal.signal(signal.SIGTERM, _terminate) if threading.current_thread() is threading.main_thread() \
        else None
    try:
        return _main(args, handlers)
    finally:
        if previous is not None:
            signal.signal(signal.SIGTERM, previous)


def _main(args, handlers) -> int:
    try:
        handler = handlers.get(args.command)
        result = handler(args, Context(args)) if handler else _dispatch(args)
    except GraftworkError as exc:
        print(f"graftwork: {exc}", file=sys.stderr)
        return exc.exit_code
    except (FileNotFoundError, IsADirectoryError, PermissionError) as exc:
        print(f"graftwork: {exc.filename}: {exc.strerror}", file=sys.stderr)
        return 2
    except KeyboardInterrupt as exc:
        why = "stopped by SIGTERM" if isinstance(exc, Terminated) else "interrupted"
        print(f"graftwork: {why}; the batch in flight was rolled back, committed batches are kept; "
              "re-run to continue", file=sys.stderr)
        return 1
    if result is not None:
        _print(result, as_json=bool(args.json))
    return 0


def _open(args, *, read_only: bool = False):
    return open_store(args.store or os.environ.get("GRAFTWORK_STORE") or DEFAULT_STORE, neo4j=args.neo4j,
                      read_only=read_only)


def _dispatch(args):
    from pipeline.jobs.ledger import ledger

    cmd = args.command
    if cmd == "demo":
        from pipeline.jobs.demo import run_demo

        summary = run_demo(args.store or DEFAULT_STORE, data_dir=args.data, n_items=args.items, seed=args.seed,
                           embedder=args.embedder, out=None if args.json else sys.stdout, neo4j=args.neo4j)
        return summary if args.json else None  # the human report was printed as the demo went
    if cmd == "run":
        from pipeline.jobs.config import load_config
        from pipeline.jobs.nightly import run_pipeline

        cfg = load_config(args.config or "graftwork.toml")
        if args.store:
            cfg.store = args.store
        if args.neo4j:
            cfg.neo4j = args.neo4j
        summary = run_pipeline(cfg, full=args.full, out=None if args.json else sys.stdout)
        return summary if args.json else None
    if cmd == "status":
        from pipeline.jobs.status import store_status

        with _open(args, read_only=True) as store:
            return store_status(store)
    with _open(args) as store:
        params = {k: v for k, v in vars(args).items() if k not in ("store", "neo4j", "json", "verbose")}
        with ledger(store, f"{cmd} {getattr(args, 'what', '')}".strip(), params) as run:
            run["counts"] = _write_command(store, args, run["run_id"])
            return run["counts"]


def _write_command(store, args, run_id: str):
    cmd = args.command
    if cmd == "ingest" and args.what == "reference":
        from pipeline.ingest.reference_job import ingest_reference

        cols = {"code_col": args.code_column, "label_col": args.label_column, "parent_col": args.parent_column}
        return ingest_reference(store, args.file, fmt=args.fmt, scheme=args.scheme, lang=args.lang,
                                root=args.root, rdf_format=args.rdf_format,
                                columns=cols if args.fmt == "tree" else None)
    if cmd == "ingest" and args.what == "source":
        from pipeline.ingest.source_job import ingest_source

        return ingest_source(store, args.key, args.file, fmt=args.fmt, code_col=args.code_column,
                             label_col=args.label_column, parent_col=args.parent_column,
                             path_col=args.path_column, separator=args.separator, tag_col=args.tag_column)
    if cmd == "ingest" and args.what == "items":
        from pipeline.ingest.items_job import ingest_items

        attrs = [a.strip() for a in args.attributes.split(",")] if args.attributes else None
        return ingest_items(store, args.key, args.file, reject_file=args.rejects, batch_size=args.batch_size,
                            key_col=args.key_column, title_col=args.title_column,
                            category_col=args.category_column, category_separator=args.category_separator or None,
                            attribute_cols=attrs)
    if cmd == "embed":
        from pipeline.embed.embed_job import embed

        return embed(store, embedder=args.embedder)
    if cmd == "map":
        from pipeline.match.map_job import MapSettings, map_sources

        settings = MapSettings(candidates=args.candidates, disabled=frozenset(args.without),
                               multi_margin=args.multi_margin, index_above=args.index_above)
        if args.auto_threshold is not None:
            settings.auto_threshold = args.auto_threshold
        if args.floor is not None:
            settings.floor = args.floor
        from pipeline.match import learn

        report = {}
        if args.forget_model:
            learn.forget_model(store)
        if args.learn:
            labels = (learn.labels_from_decisions(store, args.source or [s["key"] for s in store.rows("schemes_list")
                                                                          if s["role"] == "source"], args.reference)
                      if args.learn == "decisions" else
                      learn.labels_from_answer_key(args.learn, source=(args.source or [None])[0]))
            report["learned"] = learn.learn_model(store, labels, reference=args.reference,
                                                  target_precision=args.target_precision,
                                                  origin="decisions" if args.learn == "decisions" else Path(args.learn).name)
        report.update(map_sources(store, sources=args.source, reference=args.reference, settings=settings,
                                  run_id=run_id))
        return report
    if cmd == "place":
        from pipeline.place.place_job import place

        return place(store, sources=args.source, reference=args.reference)
    raise GraftworkError(f"unknown command {cmd}")


def _print(result, *, as_json: bool) -> None:
    import pandas as pd

    if isinstance(result, pd.DataFrame):
        if as_json:
            print(result.to_json(orient="records"))
        else:
            print(result.to_string(index=False) if len(result) else "(no rows)")
        return
    if as_json:
        print(json.dumps(result, default=str, indent=None))
        return
    print(_human(result))


def _human(obj, indent: int = 0) -> str:
    pad = "  " * indent
    if isinstance(obj, dict):
        lines = []
        for k, v in obj.items():
            if isinstance(v, (dict, list)) and v:
                lines.append(f"{pad}{k}:")
                lines.append(_human(v, indent + 1))
            else:
                lines.append(f"{pad}{k}: {v}")
        return "\n".join(lines)
    if isinstance(obj, list):
        return "\n".join(
            f"{pad}- " + ", ".join(f"{k}={v}" for k, v in x.items()) if isinstance(x, dict) else f"{pad}- {x}"
            for x in obj
        )
    return f"{pad}{obj}"


if __name__ == "__main__":
    sys.exit(main())
