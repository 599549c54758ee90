"""Write a validated hierarchy (reference concepts or source categories) into the graph, idempotently.

Rows are diffed against the stored content hashes: only new or changed nodes are written, vanished nodes are marked
retired (never deleted, so items and steward decisions stay attached), and parent links are rewritten only for
nodes that changed. Everything happens in the caller's transaction.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import pandas as pd

from pipeline.hashing import content_hash
from pipeline.store import Store

_QUERIES = {
    "Concept": ("concept_hashes", "concepts_upsert", "concepts_broader_clear", "concepts_broader_link",
                "concepts_retire"),
    "Category": ("category_hashes", "categories_upsert", "categories_broader_clear", "categories_broader_link",
                 "categories_retire"),
}


@dataclass
class HierarchyDiff:
    added: list[str] = field(default_factory=list)
    changed: list[str] = field(default_factory=list)
    unchanged: int = 0
    retired: list[str] = field(default_factory=list)
    revived: list[str] = field(default_factory=list)

    def counts(self) -> dict[str, int]:
        return {"added": len(self.added), "changed": len(self.changed), "unchanged": self.unchanged,
                "retired": len(self.retired), "revived": len(self.revived)}


def node_uid(scheme: str, code: str) -> str:
    """uid = scheme key + code (DESIGN.md); scheme keys never contain ':' so the split is unambiguous."""
    return f"{scheme}:{code}"


def write_hierarchy(store: Store, kind: str, scheme: str, rows: list[dict], parents: dict[str, list[str]]) -> HierarchyDiff:
    """`rows`: one dict per node with `code` and the kind's properties (without uid/scheme/content_hash)."""
    hashes_q, upsert_q, clear_q, link_q, retire_q = _QUERIES[kind]
    stored = store.frame(hashes_q, scheme=scheme)
    old = dict(zip(stored["uid"], stored["content_hash"])) if len(stored) else {}
    was_retired = set(stored.loc[stored["retired"].fillna(False).astype(bool), "uid"]) if len(stored) else set()

    diff = HierarchyDiff()
    write: list[dict] = []
    seen: set[str] = set()
    for row in rows:
        uid = node_uid(scheme, row["code"])
        seen.add(uid)
        h = content_hash(kind, sorted(parents.get(row["code"], [])), {k: row[k] for k in sorted(row)})
        if uid not in old:
            diff.added.append(uid)
        elif old[uid] != h:
            diff.changed.append(uid)
        elif uid in was_retired:
            diff.revived.append(uid)
        else:
            diff.unchanged += 1
            continue
        write.append({"uid": uid, "scheme": scheme, **row, "content_hash": h})
    diff.retired = sorted(u for u in old if u not in seen and u not in was_retired)

    with store.transaction():
        if write:
            store.bulk(upsert_q, pd.DataFrame(write))
            rewired = [r["uid"] for r in write]
            store.run(clear_q, uids=rewired)
            links = [
                {"child": r["uid"], "parent": node_uid(scheme, p)}
                for r in write
                for p in parents.get(r["code"], [])
            ]
            if links:
                store.bulk(link_q, pd.DataFrame(links))
        if diff.retired:
            store.run(retire_q, uids=diff.retired)
    return diff
