"""Job: ingest one source taxonomy (tree, paths or tags) as Categories with BROADER links."""

from __future__ import annotations

import json
from datetime import datetime, timezone
from pathlib import Path

from pipeline.errors import BadInput, Problem
from pipeline.hashing import file_hash
from pipeline.ingest.graph_writer import write_hierarchy
from pipeline.ingest.hierarchy import check_hierarchy
from pipeline.ingest.scheme_keys import check_scheme_key
from pipeline.store import Store

FORMATS = ("tree", "paths", "tags")


def ingest_source(store: Store, key: str, path: str | Path, *, fmt: str = "tree", **options) -> dict:
    """Read and validate the whole file, then write it in one transaction. `options` go to the reader
    (column names, path separator). Returns a summary with counts."""
    from pipeline.ingest.source_taxonomy import read_source_taxonomy

    path = Path(path)
    check_scheme_key(key, option="source key")
    if fmt not in FORMATS:
        raise BadInput(Problem(f"unknown source format {fmt!r}; use one of: {', '.join(FORMATS)}", field="--format"))
    existing = store.rows("scheme_get", key=key)
    if existing and existing[0]["role"] != "source":
        raise BadInput(Problem(f"{key!r} is already the key of a {existing[0]['role']} scheme", field="source key"))
    taxonomy = read_source_taxonomy(path, fmt=fmt, **options)
    cats = taxonomy.categories
    lines = {c.code: c.line for c in cats if c.line is not None}
    h = check_hierarchy(
        [(c.code, c.label, [c.parent_code] if c.parent_code else []) for c in cats], file=str(path), lines=lines
    )
    has_children = {p for ps in h.parents.values() for p in ps}
    rows = [
        {
            "code": c.code,
            "label": c.label,
            "path": " > ".join(h.path_labels[c.code]),
            "depth": h.depth[c.code],
            "is_leaf": c.code not in has_children,
        }
        for c in cats
    ]
    with store.transaction():
        store.run(
            "scheme_upsert", key=key, role="source", title=key, iri="", version="", source_file=str(path),
            content_hash=file_hash(path), ingested_at=datetime.now(timezone.utc).isoformat(timespec="seconds"),
            reader_options=json.dumps({"format": fmt, **{k: v for k, v in options.items() if isinstance(v, str)}}),
        )
        diff = write_hierarchy(store, "Category", key, rows, h.parents)
    return {"source": key, "file": str(path), "format": fmt, "categories": len(rows), **diff.counts()}
