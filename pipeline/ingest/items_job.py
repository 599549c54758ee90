"""Job: stream a source's item file into the graph, batch by batch, each batch committed whole."""

from __future__ import annotations

import json
import logging
from datetime import datetime, timezone
from pathlib import Path

import numpy as np
import pandas as pd

from pipeline.errors import NotFound
from pipeline.hashing import file_hash
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
    force: bool = False,
    run_id: str = "",
    precheck: bool = True,
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
    digest = file_hash(path)
    seen_key = f"{key}\x1f{digest}"
    if not force:
        seen = store.rows("ingested_file_get", key=seen_key)
        if seen:
            return {"source": key, "file": str(path), "skipped": True, "reason": "same content already ingested",
                    "rows_items": 0, "links": 0, "rejected": 0, "batches": 0, "reject_file": None}
    known = set(store.frame("category_codes", scheme=key)["code"])
    source_options = json.loads(scheme[0].get("reader_options") or "{}")
    if source_options.get("format") == "paths" and "category_normaliser" not in options:
        # Items name path categories by their path; spacing around separators must not matter.
        from pipeline.ingest.source_taxonomy import path_code

        sep = source_options.get("separator", " > ")
        options["category_normaliser"] = lambda text: _safe_path_code(path_code, text, sep)
    # A problem of the whole file (bad encoding, binary data, a broken Parquet page) found deep in it would stop
    # the job after earlier batches were committed: read it once without writing first, so it is refused whole.
    # (`precheck=False`: the caller has read the file through already, as the nightly job does.)
    if precheck:
        for _ in read_items(path, known_categories=known.__contains__, batch_size=batch_size, **options):
            pass
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
    store.run("ingested_file_record", key=seen_key, source=key, file=str(path), content_hash=digest,
              rows=counts["rows_items"], rejected=counts["rejected"], run_id=run_id, ingested_at=now)
    return {"source": key, "file": str(path), "skipped": False, **counts,
            "reject_file": str(reject_path) if reject_path else None}


def _safe_path_code(path_code, text: str, sep: str) -> str:
    try:
        return path_code(text, sep)
    except ValueError:
        return text  # an unusable path stays as written, so the row is rejected as an unknown category


def _write_batch(store: Store, key: str, items, now: str) -> None:
    uids = [node_uid(key, i.key) for i in items]
    with store.transaction():
        # Items not in the store yet are appended with the engine's bulk copy (profiled: MERGE ran at about a
        # fifth of COPY's rate); known items and continuations of keys from earlier batches go through MERGE.
        known = set(store.frame("items_existing", uids=uids)["uid"]) if uids else set()
        new = np.array([u not in known for u in uids], dtype=bool)
        item_rows = pd.DataFrame(
            {
                "uid": uids,
                "source": key,
                "item_key": [i.key for i in items],
                "title": [i.title for i in items],
                "attributes": [json.dumps(i.attributes, ensure_ascii=False, sort_keys=True) for i in items],
                "first_seen": now,
                "last_seen": now,
            }
        )
        link_rows = [(u, node_uid(key, c), fresh) for u, i, fresh in zip(uids, items, new) for c in i.category_codes]
        links = pd.DataFrame([r[:2] for r in link_rows], columns=["item", "category"])
        link_new = np.array([r[2] for r in link_rows], dtype=bool)
        if new.any():
            store.bulk("items_insert", item_rows[new])
            store.bulk("items_file_under_new", links[link_new])
        if not new.all():
            store.bulk("items_upsert", item_rows[~new].drop(columns=["first_seen", "last_seen"]), now=now)
            store.bulk("items_file_under", links[~link_new])
        # Durable "to place" marks, committed with the items, so a run killed before placing still places them.
        store.run("categories_mark_dirty", uids=sorted(set(links["category"])))


def _default_reject_path(store: Store, key: str, path: Path) -> Path:
    base = Path(store.location).parent if store.engine == "ladybug" else Path.cwd()
    stamp = datetime.now(timezone.utc).strftime("%Y%m%dT%H%M%S")
    return base / "graftwork-rejects" / f"{key}-{path.stem}-{stamp}.csv"
