"""`graftwork demo`: generate the invented scenario if absent, build the whole layer, print a rollup."""

from __future__ import annotations

import time
from pathlib import Path
from typing import TextIO

from pipeline.jobs.ledger import ledger
from pipeline.store import open_store


def run_demo(store_path: str | Path, *, data_dir: str | Path = "demo_data", n_items: int = 30_000, seed: int = 7,
             embedder: str = "static", out: TextIO | None = None, neo4j: str | None = None) -> dict:
    """Every step the nightly job does, on the demo data; safe to re-run (unchanged inputs are skipped).
    `neo4j`: a Neo4j URI to build the layer there instead of the embedded file `store_path`."""
    from pipeline.demo.scenario import generate_scenario, load_scenario, scenario_present
    from pipeline.embed.embed_job import embed
    from pipeline.ingest.items_job import ingest_items
    from pipeline.ingest.reference_job import ingest_reference
    from pipeline.ingest.source_job import ingest_source
    from pipeline.match.map_job import map_sources
    from pipeline.place.place_job import place
    from pipeline.query.rollup import rollup

    say = (lambda msg: print(msg, file=out, flush=True)) if out else (lambda msg: None)
    data_dir = Path(data_dir)
    if scenario_present(data_dir):
        say(f"Using the demo scenario in {data_dir}/")
        files = load_scenario(data_dir)
    else:
        say(f"Generating the invented demo scenario into {data_dir}/ ...")
        files = generate_scenario(data_dir, seed=seed, n_items=n_items)
    summary: dict = {"store": str(store_path), "data": str(data_dir), "steps": {}}
    with open_store(store_path, neo4j=neo4j) as store:
        summary["store"] = store.location
        where = f"--neo4j {store.location}" if neo4j else f"--store {store_path}"
        with ledger(store, "demo", {"data": str(data_dir), "seed": seed, "items": n_items}) as run:
            t0 = time.perf_counter()
            steps = summary["steps"]
            steps["reference"] = ingest_reference(store, files.reference, scheme="market")
            say(f"  reference: {steps['reference']['concepts']} concepts")
            for src in files.sources:
                cols = src.get("columns", {})
                steps[f"source {src['key']}"] = ingest_source(store, src["key"], src["taxonomy"], fmt=src["format"],
                                                             separator=src.get("separator") or " > ",
                                                             **_taxonomy_columns(cols))
                steps[f"items {src['key']}"] = ingest_items(
                    store, src["key"], src["items"], category_separator=src.get("category_separator") or "|",
                    **_item_columns(cols))
                key = src["key"]
                say(f"  source {key} ({src['format']}): {steps['source ' + key]['categories']} categories, "
                    f"{steps['items ' + key]['rows_items']} item rows, {steps['items ' + key]['rejected']} rejected")
            steps["embed"] = embed(store, embedder=embedder)
            say(f"  embedded {steps['embed']['embedded']} texts ({steps['embed']['skipped']} unchanged)")
            steps["map"] = map_sources(store, run_id=run["run_id"])
            for key, c in steps["map"]["sources"].items():
                say(f"  mapped {key}: {c['auto']} auto, {c['proposed']} proposed, {c['unmapped']} unmapped")
            steps["place"] = place(store)
            say(f"  placed {steps['place']['items_placed']} items")
            run["counts"] = {k: v for k, v in steps.items()}
            summary["seconds"] = round(time.perf_counter() - t0, 1)
        table = rollup(store, depth=1)
    summary["rollup"] = table.to_dict("records")
    if out:
        say("\nItems per top-level reference concept (including descendants), by supplier:\n")
        say(table.to_string(index=False))
        say(f"\nBuilt in {summary['seconds']} s. Store: {summary['store']}. Try next:")
        say(f"  graftwork {where} query rollup --concept {table['concept_code'].iloc[0]} --depth 1"
            if len(table) else f"  graftwork {where} status")
        say(f"  graftwork {where} export mappings --candidates 3 mappings.csv")
        say(f"  graftwork {where} status")
    return summary


def _taxonomy_columns(cols: dict) -> dict:
    names = {"code": "code_col", "label": "label_col", "parent": "parent_col", "path": "path_col", "tag": "tag_col"}
    return {names[k]: v for k, v in cols.items() if k in names}


def _item_columns(cols: dict) -> dict:
    names = {"key": "key_col", "title": "title_col", "category": "category_col"}
    return {names[k]: v for k, v in cols.items() if k in names}
