"""Job: stream a source's item file into the graph, batch by batch, each batch committed whole.

Batches arrive as Arrow columns (`item_columns`) and go to the engine's bulk paths as Arrow tables, with no
Python object per row. Items not in the store yet are appended with the bulk copy (profiled: MERGE ran at about a
fifth of COPY's rate); items already stored and continuations of keys from earlier batches go through MERGE. A
source with no items at the start of the file needs no existence check per batch: only the file's own
continuations can be there already, and the reader marks them.
"""

from __future__ import annotations

import json
import logging
import queue
import threading
from collections.abc import Iterator
from datetime import UTC, datetime
from pathlib import Path

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

from pipeline.errors import NotFound
from pipeline.hashing import file_hash
from pipeline.ingest.graph_writer import node_uid
from pipeline.progress import progress
from pipeline.store import Store

log = logging.getLogger(__name__)
_END = object()


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
    `graftwork-rejects/<source>-<file>-<UTC time>.csv`) with line numbers and reasons; good rows are all kept.
    A file whose content this source took in already is skipped unless `force`."""
    from pipeline.ingest.item_columns import read_item_columns
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
        for _ in read_item_columns(path, known_categories=known.__contains__, batch_size=batch_size, **options):
            pass
    now = datetime.now(UTC).isoformat(timespec="seconds")
    counts = {"rows_items": 0, "links": 0, "rejected": 0, "batches": 0}
    rejects = []
    fresh = store.frame("items_any_of_source", source=key).empty  # one writer at a time: stays true for the file
    with progress(desc=f"items {key}", unit="items") as bar:
        batches = read_item_columns(path, known_categories=known.__contains__, batch_size=batch_size, **options)
        for batch in read_ahead(batches):
            rejects.extend(batch.rejects)
            counts["rejected"] += len(batch.rejects)
            if len(batch):
                _write_batch(store, key, batch, now, fresh_source=fresh)
                counts["rows_items"] += len(batch)
                counts["links"] += len(batch.link_item)
            counts["batches"] += 1
            bar.update(len(batch) + len(batch.rejects))
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


def _write_batch(store: Store, key: str, batch, now: str, *, fresh_source: bool) -> None:
    """Write one ItemColumns batch in one transaction: new items and their links by bulk copy, stored ones by
    MERGE, and the place_new marks of every category that received an item."""
    n = len(batch)
    uids = pc.binary_join_element_wise(node_uid(key, ""), batch.keys, "")
    items = pa.table({
        "uid": uids,
        "source": pa.array([key] * n, type=pa.string()),
        "item_key": batch.keys,
        "title": batch.titles,
        "attributes": batch.attributes,
        "first_seen": pa.array([now] * n, type=pa.string()),
        "last_seen": pa.array([now] * n, type=pa.string()),
    })
    links = pa.table({"item": uids.take(pa.array(batch.link_item)),
                      "category": pc.binary_join_element_wise(node_uid(key, ""), batch.link_category, "")})
    with store.transaction():
        if fresh_source:
            known = batch.continued
        else:
            stored = store.frame("items_existing", uids=uids.to_pylist())["uid"]
            known = pc.is_in(uids, value_set=pa.array(list(stored), type=pa.string())).to_numpy(zero_copy_only=False)
        if not known.any():
            store.bulk("items_insert", items)
            store.bulk("items_file_under_new", links)
        else:
            link_known = known[batch.link_item]
            if not known.all():
                store.bulk("items_insert", items.filter(pa.array(~known)))
                store.bulk("items_file_under_new", links.filter(pa.array(~link_known)))
            upsert = items.filter(pa.array(known)).drop_columns(["first_seen", "last_seen"])
            continued = batch.continued[known]
            if continued.any():
                upsert = _merge_attributes(store, upsert, continued)
            store.bulk("items_upsert", upsert, now=now)
            store.bulk("items_file_under", links.filter(pa.array(link_known)))
        # Durable "to place" marks, committed with the items, so a run killed before placing still places them;
        # only the new members wait (the category's edges did not change), which keeps a nightly drop cheap.
        store.run("categories_mark_new", uids=sorted(pc.unique(links["category"]).to_pylist()))


def _merge_attributes(store: Store, rows: pa.Table, continued: np.ndarray) -> pa.Table:
    """Continuation rows carry only their batch's attributes; the stored value of an attribute came from an earlier
    row of the same file and wins (the first row's value wins, as within one batch); new attributes are added."""
    at = np.flatnonzero(continued)
    uids = rows["uid"].take(pa.array(at)).to_pylist()
    stored = dict(store.frame("items_attributes", uids=uids).itertuples(index=False, name=None))
    merged = rows["attributes"].to_pylist()
    for i, uid in zip(at.tolist(), uids):
        old = stored.get(uid)
        if old:
            combined = {**json.loads(merged[i]), **json.loads(old)}
            merged[i] = json.dumps(combined, ensure_ascii=False, sort_keys=True)
    return rows.set_column(rows.schema.get_field_index("attributes"), "attributes", pa.array(merged, pa.string()))


def read_ahead(batches: Iterator, *, depth: int = 1) -> Iterator:
    """Yield from `batches` while a thread reads up to `depth` batches ahead: the next batch is parsed while the
    engine writes this one (LadybugDB releases the GIL while it runs a statement; measured here, a COPY and
    commit ran alongside a busy Python thread). Order, items and errors are those of `batches`; an error of the
    reader is raised here when its turn comes, and stopping early stops and closes the reader.

    >>> list(read_ahead(iter(range(3))))
    [0, 1, 2]
    """
    slots: queue.Queue = queue.Queue(maxsize=depth)
    stop = threading.Event()

    def put(entry) -> bool:
        while not stop.is_set():
            try:
                slots.put(entry, timeout=0.05)
                return True
            except queue.Full:
                continue
        return False

    def work() -> None:
        try:
            for batch in batches:
                if not put((batch, None)):
                    break
            else:
                put((_END, None))
        except BaseException as exc:  # noqa: BLE001  (handed to the consumer and raised in its thread)
            put((None, exc))
        finally:
            close = getattr(batches, "close", None)
            if close is not None:
                close()

    worker = threading.Thread(target=work, name="items-read-ahead", daemon=True)
    worker.start()
    try:
        while True:
            batch, exc = slots.get()
            if exc is not None:
                raise exc
            if batch is _END:
                return
            yield batch
    finally:
        stop.set()
        worker.join()


def _default_reject_path(store: Store, key: str, path: Path) -> Path:
    base = Path(store.location).parent if store.engine == "ladybug" else Path.cwd()
    stamp = datetime.now(UTC).strftime("%Y%m%dT%H%M%S")
    return base / "graftwork-rejects" / f"{key}-{path.stem}-{stamp}.csv"
