"""Job: ingest a reference hierarchy (RDF or a tree CSV) into the graph as Concepts with BROADER links."""

from __future__ import annotations

import json
from datetime import datetime, timezone
from pathlib import Path

from pipeline.errors import BadInput, Problem
from pipeline.hashing import file_hash
from pipeline.ingest.graph_writer import write_hierarchy
from pipeline.ingest.hierarchy import check_hierarchy
from pipeline.ingest.scheme_keys import check_scheme_key, key_from_filename
from pipeline.records import ConceptRecord
from pipeline.store import Store

FORMATS = ("rdf", "tree")


def ingest_reference(
    store: Store,
    path: str | Path,
    *,
    fmt: str = "rdf",
    scheme: str | None = None,
    lang: str = "en",
    root: str | None = None,
    rdf_format: str | None = None,
    columns: dict[str, str] | None = None,
) -> dict:
    """Read `path`, validate it whole, then write it in one transaction. Returns a summary with counts."""
    path = Path(path)
    key = check_scheme_key(scheme or key_from_filename(path), option="--scheme")
    title = version = iri = None
    if fmt == "rdf":
        from pipeline.ingest.rdf_reference import read_reference_rdf

        ref = read_reference_rdf(path, rdf_format=rdf_format, lang=lang, root=root)
        concepts, title, version, iri = ref.concepts, ref.title, ref.version, ref.scheme_iri
    elif fmt == "tree":
        from pipeline.ingest.reference_tree import read_reference_tree

        if root:
            raise BadInput(Problem("--root applies to RDF input only", file=str(path), field="--root"))
        concepts = read_reference_tree(path, **(columns or {}))
    else:
        raise BadInput(Problem(f"unknown reference format {fmt!r}; use one of: {', '.join(FORMATS)}",
                               field="--format"))
    existing = store.rows("scheme_get", key=key)
    if existing and existing[0]["role"] != "reference":
        raise BadInput(Problem(f"scheme {key!r} already exists as a {existing[0]['role']}; choose another --scheme",
                               field="--scheme"))

    rows, parents = _concept_rows(concepts, file=str(path))
    before = _snapshot(store, key)
    with store.transaction():
        store.run(
            "scheme_upsert", key=key, role="reference", title=title or key, iri=iri or "", version=version or "",
            source_file=str(path), content_hash=file_hash(path),
            ingested_at=datetime.now(timezone.utc).isoformat(timespec="seconds"),
            reader_options=json.dumps({"format": fmt, "lang": lang, "root": root or ""}),
        )
        diff = write_hierarchy(store, "Concept", key, rows, parents)
        upgrade = _classify(before, rows, parents, key, diff)
        # Decisions on concepts that vanished or moved go back to review (status stale), in the same transaction.
        stale_targets = sorted(set(diff.retired) | set(upgrade["moved"]))
        if stale_targets and before:
            store.run("edges_mark_stale", uids=stale_targets)
    summary = {"scheme": key, "file": str(path), "concepts": len(rows), **diff.counts()}
    if before:
        summary["upgrade"] = {k: len(v) for k, v in upgrade.items()} | {"removed": len(diff.retired)}
        summary["upgrade_detail"] = {k: v[:50] for k, v in upgrade.items()} | {"removed": diff.retired[:50]}
    return summary


def _snapshot(store: Store, key: str) -> dict[str, tuple[str, frozenset]]:
    """Label and parents of every live concept before a re-ingest, to describe an upgrade."""
    df = store.frame("concept_structure", scheme=key)
    out: dict[str, tuple[str, set]] = {}
    for uid, label, parent in zip(df.get("uid", []), df.get("label", []), df.get("parent", [])):
        entry = out.setdefault(uid, (label, set()))
        if isinstance(parent, str):
            entry[1].add(parent)
    return {u: (lab, frozenset(ps)) for u, (lab, ps) in out.items()}


def _classify(before, rows, parents, key, diff) -> dict[str, list[str]]:
    from pipeline.ingest.graph_writer import node_uid

    relabelled, moved = [], []
    for row in rows:
        uid = node_uid(key, row["code"])
        if uid not in before:
            continue
        old_label, old_parents = before[uid]
        new_parents = frozenset(node_uid(key, p) for p in parents.get(row["code"], []))
        if old_label != row["pref_label"]:
            relabelled.append(uid)
        if old_parents != new_parents:
            moved.append(uid)
    return {"added": list(diff.added), "relabelled": relabelled, "moved": moved}


def _concept_rows(concepts: list[ConceptRecord], *, file: str) -> tuple[list[dict], dict[str, list[str]]]:
    lines = {c.code: c.line for c in concepts if c.line is not None}
    h = check_hierarchy([(c.code, c.pref_label, c.parent_codes) for c in concepts], file=file, lines=lines)
    has_children = {p for ps in h.parents.values() for p in ps}
    rows = [
        {
            "code": c.code,
            "iri": c.iri or "",
            "pref_label": c.pref_label,
            "alt_labels": list(c.alt_labels),
            "definition": c.definition or "",
            "path": " > ".join(h.path_labels[c.code]),
            "depth": h.depth[c.code],
            "is_leaf": c.code not in has_children,
            "deprecated": bool(c.deprecated),
        }
        for c in concepts
    ]
    return rows, h.parents
