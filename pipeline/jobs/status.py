"""What is in a store: schemes, node and edge counts, the last runs."""

from __future__ import annotations

import json

from pipeline.store import Store


def store_status(store: Store, *, runs: int = 10) -> dict:
    # UNION ALL gives no order; sort so the same store always reports the same way.
    nodes = store.frame("count_nodes").sort_values(["kind", "scheme"], kind="stable")
    edges = store.frame("count_edges").sort_values(["kind", "scheme", "status"], kind="stable")
    recent = store.rows("runs_recent", limit=runs)
    for r in recent:
        r["counts"] = json.loads(r["counts"] or "{}")
    return {
        "store": store.location,
        "engine": store.engine,
        "embedder": store.scalar("meta_get", key="embedder_id"),
        "schemes": store.rows("schemes_list"),
        "nodes": [{k: (int(v) if k == "n" else v) for k, v in r.items()} for r in nodes.to_dict("records")],
        "edges": [{k: (int(v) if k == "n" else v) for k, v in r.items()} for r in edges.to_dict("records")],
        "runs": recent,
    }
