"""Job: stream a source's item file into the graph, batch by batch, each batch committed whole."""

from __future__ import annotations

import json
import logging
from datetime import datetime, timezone
from pathlib import Path

import pandas as pd

from pipeline.errors import NotFound
from pipeline.ingest.graph_writer import node_uid
from pipeline.progress import progress
from pipeline.store import Store

log = logging.getLogger(__name__)


def ingest_items(
    store: Store,
    key: str,
    path: str | Path,
    *,
    reject_file: str | Path | None = None,
    batch_size: int = 50_000,
    **options,
) -> dict:
    """Upsert items and their FILED_UNDER links. Malformed rows go to `reject_file` (default: beside the store,
    `<store>.rejects/<source>-<file>.csv`) with line numbers and reasons; good rows are all kept."""
    from pipeline.ingest.items_reader import read_items
    from pipeline.ingest.rejects import write_rejects

    path = Path(path)
    scheme = store.rows("scheme_get", key=key)
    if not scheme or scheme[0]["role"] != "source":
        raise NotFound(f"no source taxonomy {key!r} in the store; ingest it first with `graftwork ingest source`")
    known = set(store.frame("category_codes", scheme=key)["code"])
    now = datetime.now(timezone.utc).isoformat(timespec="seconds")
    counts = {"rows_items": 0, "links": 0, "rejected": 0, "batches": 0}
    rejects = []
    with progress(desc=f"items {key}", unit="items") as bar:
        for batch in read_items(path, known_categories=known.__contains__, batch_size=batch_size, **options):
            rejects.extend(batch.rejects)
            counts["rejected"] += len(batch.rejects)
            if batch.items:
                _write_batch(store, key, batch.items, now)
                counts["rows_items"] += len(batch.items)
                counts["links"] += sum(len(i.category_codes) for i in batch.items)
            counts["batches"] += 1
            bar.update(len(batch.items) + len(batch.rejects))
    reject_path = None
    if rejects:
        reject_path = Path(reject_file) if reject_file else _default_reject_path(store, key, path)
        reject_path.parent.mkdir(parents=True, exist_ok=True)
        write_rejects(reject_path, rejects)
        log.warning("%d rows of %s rejected; see %s", len(rejects), path, reject_path)
    return {"source": key, "file": str(path), **counts, "reject_file": str(reject_path) if reject_path else None}


def _write_batch(store: Store, key: str, items, now: str) -> None:
    item_rows = pd.DataFrame(
        {
            "uid": [node_uid(key, i.key) for i in items],
            "source": key,
            "item_key": [i.key for i in items],
            "title": [i.title for i in items],
            "attributes": [json.dumps(i.attributes, ensure_ascii=False, sort_keys=True) for i in items],
        }
    )
    links = pd.DataFrame(
        [(node_uid(key, i.key), node_uid(key, c)) for i in items for c in i.category_codes],
        columns=["item", "category"],
    )
    with store.transaction():
        store.bulk("items_upsert", item_rows, now=now)
        store.bulk("items_file_under", links)


def _default_reject_path(store: Store, key: str, path: Path) -> Path:
    base = Path(store.location).parent if store.engine == "ladybug" else Path.cwd()
    stamp = datetime.now(timezone.utc).strftime("%Y%m%dT%H%M%S")
    return base / "graftwork-rejects" / f"{key}-{path.stem}-{stamp}.csv"
