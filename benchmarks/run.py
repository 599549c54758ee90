"""Scale benchmark: build the whole layer from the synthetic workload, then a nightly delta, and measure each
stage against a raw baseline measured in the same run.

    python benchmarks/run.py --scale small --json bench-small.json [--work DIR] [--profile]

Steps (each on the embedded engine unless `--neo4j` is given):
1. generate the workload (benchmarks/workload.py) into a fresh work folder;
2. engine bulk baseline: the same item rows and FILED_UNDER links, already parsed into Arrow tables, bulk-copied
   by the engine itself (`items_insert`, `items_file_under_new`) into a store holding only the taxonomies;
3. full build: `run_pipeline` (ingest -> embed -> map -> place) on a fresh store;
4. raw embedder baseline: `encode` alone on the same texts the embed stage embedded;
5. top-k baseline: plain numpy (one matrix product per block + argpartition) over the same fused vectors;
6. nightly delta: 1% new items, 0.5% of categories relabelled, `run_pipeline` again;
7. rollups: median of repeated `rollup` calls (top level, two levels, one concept's subtree).
Peak RSS is the whole process's (ru_maxrss), generator included.
"""

from __future__ import annotations

import argparse
import json
import platform
import resource
import shutil
import statistics
import sys
import time
from pathlib import Path

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc
import pyarrow.csv as pacsv

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
sys.path.insert(0, str(Path(__file__).resolve().parent))

import workload  # noqa: E402

from pipeline.jobs.config import load_config  # noqa: E402
from pipeline.jobs.nightly import run_pipeline  # noqa: E402
from pipeline.match.candidates import TOPK_BLOCK  # noqa: E402
from pipeline.store import open_store  # noqa: E402

TOP_K = 25
FUSION = {"path": 0.5, "label": 0.3}  # category signal -> weight; label~gloss (0.2) added below


def main(argv: list[str] | None = None) -> int:
    p = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    p.add_argument("--scale", choices=sorted(workload.SCALES), default="small")
    p.add_argument("--json", metavar="OUT", help="write the figures here")
    p.add_argument("--work", metavar="DIR", help="work folder (default /tmp/graftwork-bench-SCALE; wiped first)")
    p.add_argument("--seed", type=int, default=11)
    p.add_argument("--profile", action="store_true", help="profile the full build and the delta with pyinstrument")
    args = p.parse_args(argv)
    work = Path(args.work or f"/tmp/graftwork-bench-{args.scale}")
    result = run(args.scale, work, seed=args.seed, profile=args.profile)
    print_table(result)
    if args.json:
        Path(args.json).write_text(json.dumps(result, indent=2) + "\n", encoding="utf-8")
    return 0


def run(scale: str, work: Path, *, seed: int = 11, profile: bool = False) -> dict:
    if work.exists():
        shutil.rmtree(work)
    data = work / "data"
    t0 = time.perf_counter()
    cfg_path = workload.generate(data, scale, seed=seed)
    out: dict = {"scale": scale, **workload.SCALES[scale], "seed": seed, "machine": machine(),
                 "generate_s": round(time.perf_counter() - t0, 1)}
    cfg = load_config(cfg_path)
    out["engine"] = "neo4j" if cfg.neo4j else "ladybug"
    log(f"generated {scale} workload in {out['generate_s']} s")

    out.update(engine_bulk(cfg, work / "bulk.lbug"))
    log(f"engine bulk: {out['engine_bulk_items_per_s']:,.0f} items/s")

    item_seconds: list[float] = []
    item_rows: list[int] = []
    summary = timed_build(cfg, item_seconds, item_rows, profile, work / "profile-full.html")
    out["full_build_wall_s"] = round(summary["wall"], 2)
    out["stage_s"] = summary["seconds"]
    out["items_ingested"] = sum(item_rows)
    out["ingest_items_s"] = round(sum(item_seconds), 2)
    out["ingest_items_per_s"] = round(sum(item_rows) / sum(item_seconds))
    emb = summary["stages"]["embed"]
    out["embed_texts"] = emb["embedded"] + emb.get("member_texts", 0)
    out["embed_wall_s"] = summary["seconds"]["embed"]
    out["embed_texts_per_s"] = round(out["embed_texts"] / out["embed_wall_s"])
    out["map_wall_s"] = summary["seconds"]["map"]
    out["place_wall_s"] = summary["seconds"]["place"]
    log(f"full build {out['full_build_wall_s']} s: {summary['seconds']}")

    with open_store(cfg.store, neo4j=cfg.neo4j, read_only=True) as store:
        out.update(raw_embedder(store, cfg.embedder))
        out.update(topk_baseline(store, cfg))
        out.update(counts(store))
    log(f"raw embedder {out['embedder_raw_texts_per_s']:,} texts/s; numpy top-k {out['topk_matmul_wall_s']} s")

    out["delta"] = workload.write_delta(data, scale, seed=seed)
    delta_seconds: list[float] = []
    delta_rows: list[int] = []
    delta = timed_build(cfg, delta_seconds, delta_rows, profile, work / "profile-delta.html")
    out["nightly_delta_wall_s"] = round(delta["wall"], 2)
    out["delta_stage_s"] = delta["seconds"]
    out["delta_mapped_categories"] = sum(c["categories"] for c in delta["stages"]["map"].get("sources", {}).values())
    out["delta_placed_categories"] = delta["stages"]["place"]["categories"]
    log(f"nightly delta {out['nightly_delta_wall_s']} s: {delta['seconds']}")

    out.update(rollups(cfg))
    out["peak_rss_mb"] = round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024)
    out["store_mb"] = round(sum(f.stat().st_size for f in Path(cfg.store).parent.glob(Path(cfg.store).name + "*"))
                            / 2**20) if not cfg.neo4j else None
    out["ratios"] = ratios(out)
    return out


def timed_build(cfg, item_seconds: list[float], item_rows: list[int], profile: bool, profile_out: Path | None):
    """run_pipeline with the item-ingest calls timed alone (the ingest stage also reads the taxonomies)."""
    import pipeline.ingest.items_job as items_job

    original = items_job.ingest_items

    def timed_ingest(*a, **kw):
        t = time.perf_counter()
        r = original(*a, **kw)
        item_seconds.append(time.perf_counter() - t)
        item_rows.append(r["rows_items"])
        return r

    items_job.ingest_items = timed_ingest
    profiler = None
    if profile:
        from pyinstrument import Profiler

        profiler = Profiler(interval=0.01)
        profiler.start()
    try:
        t = time.perf_counter()
        summary = run_pipeline(cfg)
        summary["wall"] = time.perf_counter() - t
    finally:
        items_job.ingest_items = original
        if profiler:
            profiler.stop()
            profile_out.write_text(profiler.output_html(), encoding="utf-8")
            profile_out.with_suffix(".txt").write_text(profiler.output_text(unicode=False, show_all=False),
                                                       encoding="utf-8")
    return summary


def _item_tables(src, path: Path) -> tuple[pa.Table, pa.Table]:
    """The item and link rows of one file as the engine's bulk path takes them (uid-keyed), built with Arrow."""
    t = pacsv.read_csv(path, convert_options=pacsv.ConvertOptions(column_types={
        "item_key": pa.string(), "title": pa.string(), "category": pa.string(), "price": pa.string()}))
    n = t.num_rows
    uid = pc.binary_join_element_wise(pa.array([src.key] * n), t["item_key"], ":")
    attrs = pc.binary_join_element_wise(pa.array(['{"price": "'] * n), t["price"], pa.array(['"}'] * n), "")
    now = pa.array(["2024-01-01T00:00:00+00:00"] * n)
    items = pa.table({"uid": uid, "source": pa.array([src.key] * n), "item_key": t["item_key"],
                      "title": t["title"], "attributes": attrs, "first_seen": now, "last_seen": now})
    cats = pc.split_pattern(t["category"], "|")
    flat = pc.list_flatten(cats)
    item_of = pc.take(uid, pc.list_parent_indices(cats))
    cat_uid = pc.binary_join_element_wise(pa.array([src.key] * len(flat)), flat, ":")
    return items, pa.table({"item": item_of, "category": cat_uid})


def engine_bulk(cfg, store_path: Path) -> dict:
    """The engine's own bulk load of the same rows: Arrow tables prepared first (not timed), then copied."""
    from pipeline.ingest.source_job import ingest_source

    total_items = total_links = 0
    seconds = 0.0
    with open_store(store_path, neo4j=cfg.neo4j) as store:
        for src in cfg.sources:
            ingest_source(store, src.key, src.taxonomy, fmt=src.format)
        for src in cfg.sources:
            for f in src.item_files():
                items, links = _item_tables(src, f)
                for start in range(0, items.num_rows, 50_000):
                    part = items.slice(start, 50_000)
                    # links of this slice: the item uids of the slice
                    mask = pc.is_in(links["item"], value_set=part["uid"])
                    part_links = links.filter(mask)
                    t = time.perf_counter()
                    with store.transaction():
                        store.bulk("items_insert", part)
                        store.bulk("items_file_under_new", part_links)
                    seconds += time.perf_counter() - t
                    total_items += part.num_rows
                    total_links += part_links.num_rows
    return {"engine_bulk_items": total_items, "engine_bulk_links": total_links,
            "engine_bulk_s": round(seconds, 2), "engine_bulk_items_per_s": round(total_items / seconds)}


def embed_texts(store) -> list[str]:
    """The texts the embed stage encodes: every signal text of every live node, then the member titles."""
    from pipeline.embed.embed_job import MEMBER_SAMPLE
    from pipeline.embed.signals import CATEGORY_SIGNALS, CONCEPT_SIGNALS, category_text, concept_text

    texts: list[str] = []
    for s in store.rows("schemes_list"):
        if s["role"] == "reference":
            rows = store.rows("concept_texts", scheme=s["key"])
            texts += [concept_text(sig, r) for sig in CONCEPT_SIGNALS for r in rows]
        else:
            rows = store.rows("category_texts", scheme=s["key"])
            texts += [category_text(sig, r) for sig in CATEGORY_SIGNALS for r in rows]
    for s in store.rows("schemes_list"):
        if s["role"] == "source":
            members = store.frame("category_members", scheme=s["key"])
            sample = members.groupby("uid", sort=True)["title"].apply(lambda t: list(t[:MEMBER_SAMPLE]))
            for start in range(0, len(sample), 2_000):
                texts += sorted({t for titles in sample.iloc[start:start + 2_000] for t in titles})
    return texts


def raw_embedder(store, name: str) -> dict:
    from pipeline.embed.embed_job import BATCH
    from pipeline.embed.registry import get_embedder

    texts = embed_texts(store)
    model = get_embedder(name)
    if hasattr(model, "fit"):
        model.fit(sorted(set(texts)))
    t = time.perf_counter()
    for start in range(0, len(texts), BATCH):
        np.asarray(model.encode(texts[start:start + BATCH]), dtype=np.float32)
    seconds = time.perf_counter() - t
    return {"embedder_raw_texts": len(texts), "embedder_raw_s": round(seconds, 2),
            "embedder_raw_texts_per_s": round(len(texts) / seconds)}


def topk_baseline(store, cfg) -> dict:
    """Plain numpy top-k over the same vectors the map stage scores: fused path/label/gloss, k=25."""
    ref = cfg.reference_scheme
    cuids = list(store.frame("concept_structure", scheme=ref)["uid"])
    cvec = {sig: store.get_vectors("Concept", sig, owners=cuids) for sig in ("path", "label", "gloss")}
    cmat = {sig: _aligned(v, cuids) for sig, v in cvec.items()}
    seconds = 0.0
    n = 0
    for src in cfg.sources:
        uids = list(store.frame("category_structure", scheme=src.key)["uid"])
        qmat = {sig: _aligned(store.get_vectors("Category", sig, owners=uids), uids) for sig in ("path", "label")}
        q = np.hstack([qmat["path"] * np.sqrt(0.5), qmat["label"] * np.sqrt(0.3), qmat["label"] * np.sqrt(0.2)])
        r = np.hstack([cmat["path"] * np.sqrt(0.5), cmat["label"] * np.sqrt(0.3), cmat["gloss"] * np.sqrt(0.2)])
        q, r = q.astype(np.float32), np.ascontiguousarray(r.T, dtype=np.float32)
        t = time.perf_counter()
        for start in range(0, len(q), TOPK_BLOCK):  # the block size the map stage uses (faster than larger ones)
            sims = q[start:start + TOPK_BLOCK] @ r
            idx = np.argpartition(-sims, TOP_K - 1, axis=1)[:, :TOP_K]
            np.take_along_axis(sims, idx, axis=1)
        seconds += time.perf_counter() - t
        n += len(q)
    return {"topk_matmul_wall_s": round(seconds, 3), "topk_queries": n, "topk_refs": len(cuids)}


def _aligned(vs, uids: list[str]) -> np.ndarray:
    pos = {o: i for i, o in enumerate(vs.owners)}
    return vs.matrix[[pos[u] for u in uids]]


def counts(store) -> dict:
    nodes = store.frame("count_nodes").groupby("kind")["n"].sum()
    return {"graph_nodes": {str(k): int(v) for k, v in nodes.items()}}


def rollups(cfg, repeats: int = 5) -> dict:
    from pipeline.query.rollup import rollup

    times = []
    with open_store(cfg.store, neo4j=cfg.neo4j, read_only=True) as store:
        top = rollup(store, depth=1)
        code = str(top["concept_code"].iloc[0]) if len(top) else None
        for _ in range(repeats):
            for kw in ({"depth": 1}, {"depth": 2}, {"concept": code, "depth": 2} if code else {"depth": 1}):
                t = time.perf_counter()
                rollup(store, **kw)
                times.append(time.perf_counter() - t)
    return {"rollup_median_s": round(statistics.median(times), 3), "rollup_max_s": round(max(times), 3),
            "rollup_calls": len(times)}


def ratios(out: dict) -> dict:
    targets = {
        "ingest / engine bulk": (out["ingest_items_per_s"] / out["engine_bulk_items_per_s"], ">=", 0.7),
        "embed / raw embedder": (out["embed_texts_per_s"] / out["embedder_raw_texts_per_s"], ">=", 0.8),
        "map / numpy top-k": (out["map_wall_s"] / max(out["topk_matmul_wall_s"], 1e-9), "<=", 3.0),
        "delta / full build": (out["nightly_delta_wall_s"] / out["full_build_wall_s"], "<=", 0.05),
        "rollup median s": (out["rollup_median_s"], "<", 1.0),
        "peak RSS MB": (out["peak_rss_mb"], "<", 4096),
    }
    return {k: {"value": round(v, 3), "target": f"{op} {lim}",
                "met": bool(v >= lim if op == ">=" else v <= lim if op == "<=" else v < lim)}
            for k, (v, op, lim) in targets.items()}


def machine() -> dict:
    import os

    mem = 0
    try:
        mem = round(os.sysconf("SC_PAGE_SIZE") * os.sysconf("SC_PHYS_PAGES") / 2**30)
    except (ValueError, OSError):
        pass
    return {"cpus": os.cpu_count(), "memory_gb": mem, "python": platform.python_version(),
            "platform": platform.platform()}


def print_table(r: dict) -> None:
    rows = [
        ("scale", f"{r['scale']}: {r['concepts']:,} concepts, {r['categories']:,} categories, {r['items']:,} items"),
        ("engine", r["engine"]),
        ("ingest items/s", f"{r['ingest_items_per_s']:,} ({r['ingest_items_s']} s)"),
        ("engine bulk items/s", f"{r['engine_bulk_items_per_s']:,} ({r['engine_bulk_s']} s)"),
        ("embed texts/s", f"{r['embed_texts_per_s']:,} ({r['embed_texts']:,} texts, {r['embed_wall_s']} s)"),
        ("raw embedder texts/s", f"{r['embedder_raw_texts_per_s']:,} ({r['embedder_raw_s']} s)"),
        ("map wall s", r["map_wall_s"]),
        ("numpy top-k wall s", r["topk_matmul_wall_s"]),
        ("full build wall s", f"{r['full_build_wall_s']} {r['stage_s']}"),
        ("nightly delta wall s", f"{r['nightly_delta_wall_s']} {r['delta_stage_s']}"),
        ("rollup median s", r["rollup_median_s"]),
        ("peak RSS MB", r["peak_rss_mb"]),
    ]
    width = max(len(k) for k, _ in rows)
    for k, v in rows:
        print(f"{k:<{width}}  {v}")
    print()
    for k, v in r["ratios"].items():
        print(f"{k:<{width}}  {v['value']:<10} target {v['target']:<8} {'met' if v['met'] else 'NOT met'}")


def log(msg: str) -> None:
    print(f"[{time.strftime('%H:%M:%S')}] {msg}", file=sys.stderr, flush=True)


if __name__ == "__main__":
    raise SystemExit(main())
