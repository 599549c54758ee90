"""A tiny hand-made crosswalk for the review tests: known edges with chosen scores, so every queue is literal.

Reference (tree CSV):  G Garden > GT Garden tools > PR Pruners;  G > LM Lawn mowers;
                       K Kitchen > KC Cookware > PA Pans;  K > KN Knives.
Source `shop`: 1 Garden (2 Pruning shears, 3 Mowers, 7 Knife sets), 4 Kitchen (5 Frying pans), 6 Oddments.
Source `mart`: 1 Outdoor (2 Cutters), whose items share four keys with shop:2.
"""

from __future__ import annotations

import json

import pandas as pd

from pipeline.ingest.items_job import ingest_items
from pipeline.ingest.reference_job import ingest_reference
from pipeline.ingest.source_job import ingest_source
from pipeline.place.place_job import place
from pipeline.review.events import record_machine_edges
from pipeline.store import open_store

REFERENCE = """code,label,parent_code
G,Garden,
GT,Garden tools,G
PR,Pruners,GT
LM,Lawn mowers,G
K,Kitchen,
KC,Cookware,K
PA,Pans,KC
KN,Knives,K
"""
SHOP = ("code,label,parent_code\n1,Garden,\n2,Pruning shears,1\n3,Mowers,1\n4,Kitchen,\n5,Frying pans,4\n"
        "6,Oddments,\n7,Knife sets,1\n")
MART = "code,label,parent_code\n1,Outdoor,\n2,Cutters,1\n"
SHOP_ITEMS = [("p1", "Bypass pruner 20 cm", "2"), ("p2", "Anvil pruner", "2"), ("p3", "Ratchet pruner", "2"),
              ("p4", "Pruner holster", "2"), ("m1", "Push mower", "3"), ("m2", "Reel mower", "3"),
              ("m3", "Mower blade", "3"), ("f1", "Iron skillet 28 cm", "5"), ("f2", "Crepe pan", "5"),
              ("o1", "Gift card", "6"), ("o2", "Mystery box", "6"), ("k1", "Chef knife set", "7")]
MART_ITEMS = [("p1", "Bypass pruner", "2"), ("p2", "Anvil pruner", "2"), ("p3", "Ratchet pruner", "2"),
              ("p4", "Holster", "2"), ("x1", "Garden hose", "1")]
# (category, concept, score, rank, status)
EDGES = [("shop:1", "ref:G", 0.92, 1, "auto"), ("shop:2", "ref:PR", 0.91, 1, "auto"),
         ("shop:2", "ref:GT", 0.70, 2, "proposed"), ("shop:3", "ref:LM", 0.62, 1, "proposed"),
         ("shop:3", "ref:GT", 0.40, 2, "proposed"), ("shop:4", "ref:K", 0.88, 1, "auto"),
         ("shop:5", "ref:PA", 0.85, 1, "auto"), ("shop:5", "ref:KC", 0.84, 2, "proposed"),
         ("shop:7", "ref:KN", 0.90, 1, "auto"), ("mart:1", "ref:G", 0.85, 1, "auto"),
         ("mart:2", "ref:LM", 0.86, 1, "auto")]


def _items_csv(rows) -> str:
    return "item_key,title,category\n" + "".join(f"{k},{t},{c}\n" for k, t, c in rows)


def build(tmp_path, *, edges=EDGES, run_id="map-test-1") -> str:
    """Write the files, ingest them, write the machine edges (as a map run would) and place; returns the store."""
    (tmp_path / "ref.csv").write_text(REFERENCE)
    (tmp_path / "shop.csv").write_text(SHOP)
    (tmp_path / "mart.csv").write_text(MART)
    (tmp_path / "shop_items.csv").write_text(_items_csv(SHOP_ITEMS))
    (tmp_path / "mart_items.csv").write_text(_items_csv(MART_ITEMS))
    path = str(tmp_path / "review.lbug")
    with open_store(path) as store:
        ingest_reference(store, tmp_path / "ref.csv", fmt="tree", scheme="ref")
        for key in ("shop", "mart"):
            ingest_source(store, key, tmp_path / f"{key}.csv", fmt="tree")
            ingest_items(store, key, tmp_path / f"{key}_items.csv", reject_file=tmp_path / f"{key}_rejects.csv")
        write_machine_edges(store, edges, run_id)
        place(store)
    return path


def write_machine_edges(store, edges, run_id: str) -> None:
    rows = [{"category": c, "concept": k, "score": s, "rank": r, "match_type": "closeMatch", "status": st,
             "method": "text+structure", "evidence": json.dumps({"path~path": s, "label~label": round(s - 0.1, 2)}),
             "run_id": run_id} for c, k, s, r, st in edges]
    cats = sorted({c for c, *_ in edges})
    with store.transaction():
        store.run("machine_edges_clear", uids=cats, reference="ref")
        store.bulk("machine_edges_create", pd.DataFrame(rows))
        record_machine_edges(store, rows, run_id, categories=cats)


def edges_of(store, category: str) -> dict[str, str]:
    """concept code -> status of one category's edges."""
    df = store.frame("review_category_edges", category=category, reference="ref")
    return dict(zip(df["concept_code"], df["status"], strict=True))
