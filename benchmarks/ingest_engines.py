"""Measure item ingest rates (items and FILED_UNDER links per second) on the embedded engine and on Neo4j.

    python benchmarks/ingest_engines.py --items 100000 [--neo4j bolt://127.0.0.1:7687]

Builds an invented flat source (200 categories, one or two per item) in a temporary folder and times
`ingest_items` alone (the graph write, including reading the CSV). Neo4j: GRAFTWORK_NEO4J_PASSWORD must be set,
and the database must be empty or a graftwork store you can wipe (it is wiped first).
"""

from __future__ import annotations

import argparse
import json
import tempfile
import time
from pathlib import Path

import numpy as np
import pandas as pd

from pipeline.ingest.items_job import ingest_items
from pipeline.ingest.source_job import ingest_source
from pipeline.store import open_store


def _inputs(folder: Path, n: int) -> tuple[Path, Path]:
    rng = np.random.default_rng(0)
    tax = folder / "tax.csv"
    pd.DataFrame({"code": [f"c{i}" for i in range(200)], "label": [f"Group {i}" for i in range(200)],
                  "parent_code": ""}).to_csv(tax, index=False)
    cats = [f"c{a}" if b < 0.7 else f"c{a}|c{(a + 1) % 200}"
            for a, b in zip(rng.integers(0, 200, n), rng.random(n))]
    items = folder / "items.csv"
    pd.DataFrame({"item_key": [f"k{i}" for i in range(n)], "title": [f"Item number {i}" for i in range(n)],
                  "category": cats}).to_csv(items, index=False)
    return tax, items


def measure(n: int, *, neo4j: str | None, folder: Path) -> dict:
    tax, items = _inputs(folder, n)
    if neo4j:
        from pipeline.store.neo4j_store import wipe_database

        wipe_database(neo4j)
    with open_store(folder / "bench.lbug", neo4j=neo4j) as store:
        ingest_source(store, "shop", tax)
        t0 = time.perf_counter()
        counts = ingest_items(store, "shop", items)
        first = time.perf_counter() - t0
        t0 = time.perf_counter()
        ingest_items(store, "shop", items)  # the same file again: every row an update (MERGE on existing nodes)
        again = time.perf_counter() - t0
    return {"engine": "neo4j" if neo4j else "ladybug", "items": counts["rows_items"], "links": counts["links"],
            "seconds": round(first, 1), "items_per_s": round(counts["rows_items"] / first),
            "links_per_s": round(counts["links"] / first), "rerun_seconds": round(again, 1)}


def main(argv: list[str] | None = None) -> int:
    p = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    p.add_argument("--items", type=int, default=100_000)
    p.add_argument("--neo4j", metavar="URI", help="also measure on this Neo4j server (it is wiped first)")
    p.add_argument("--neo4j-only", action="store_true", help="skip the embedded engine")
    args = p.parse_args(argv)
    if not args.neo4j_only:
        with tempfile.TemporaryDirectory() as tmp:
            print(json.dumps(measure(args.items, neo4j=None, folder=Path(tmp))))
    if args.neo4j:
        with tempfile.TemporaryDirectory() as tmp:
            print(json.dumps(measure(args.items, neo4j=args.neo4j, folder=Path(tmp))))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
