"""A canonical export of a store, for comparing two graphs: every node and edge with its content fields, the
durable job marks, vectors (by hash of their bytes) and the review history, without run ids and times.

`snapshot(store)` returns {table: sorted list of row tuples}; two stores hold the same layer when their snapshots
are equal. The run ledger (`Run` nodes) is left out: a killed or refused job adds a failed run by design.
"""

from __future__ import annotations

import hashlib
import math
from collections import Counter

from pipeline.embed.signals import CATEGORY_SIGNALS, CONCEPT_SIGNALS
from pipeline.store import open_store

TABLES = ("schemes", "concepts", "categories", "items", "broader", "filed_under", "maps_to", "placed_in",
          "ingested_files", "meta", "edge_events")
# edge tables and the columns that name one edge (an edge named twice is a duplicate)
EDGE_KEYS = {"broader": 2, "filed_under": 2, "maps_to": 2, "placed_in": 3}
NODE_TABLES = ("schemes", "concepts", "categories", "items", "ingested_files", "meta")


def _plain(value):
    if value is None:
        return None
    if isinstance(value, float):
        return None if math.isnan(value) else round(value, 6)
    if hasattr(value, "tolist") and not isinstance(value, (str, bytes)):
        value = value.tolist()
    if isinstance(value, (list, tuple)):
        return tuple(_plain(v) for v in value)
    if hasattr(value, "item"):  # numpy scalar
        return _plain(value.item())
    return value


def snapshot(store, *, vectors: bool = True) -> dict[str, list[tuple]]:
    out: dict[str, list[tuple]] = {}
    for table in TABLES:
        df = store.frame(f"audit_{table}")
        rows = [tuple(_plain(v) for v in row) for row in df.itertuples(index=False, name=None)]
        out[table] = sorted(rows, key=repr)
    if vectors:
        rows = []
        for kind, signals in (("Concept", CONCEPT_SIGNALS), ("Category", (*CATEGORY_SIGNALS, "members"))):
            for signal in signals:
                vs = store.get_vectors(kind, signal)
                for i, (owner, h, emb) in enumerate(vs.iter_rows()):
                    digest = hashlib.sha1(vs.matrix[i].tobytes()).hexdigest()[:16]
                    rows.append((kind, signal, owner, h, emb, digest))
        out["vectors"] = sorted(rows)
    return out


def snapshot_of(path, *, vectors: bool = True) -> dict[str, list[tuple]]:
    with open_store(path, read_only=True) as store:
        return snapshot(store, vectors=vectors)


def duplicates(snap: dict[str, list[tuple]]) -> dict[str, list]:
    """Nodes whose key appears twice, and edges named twice (same ends; for PLACED_IN same ends and `via`)."""
    found: dict[str, list] = {}
    for table in NODE_TABLES:
        counts = Counter(row[0] for row in snap.get(table, []))
        found.update({table: [k for k, n in counts.items() if n > 1]} if any(n > 1 for n in counts.values()) else {})
    for table, width in EDGE_KEYS.items():
        counts = Counter(row[:width] for row in snap.get(table, []))
        dup = [k for k, n in counts.items() if n > 1]
        if dup:
            found[table] = dup
    return found


def counts(snap: dict[str, list[tuple]]) -> dict[str, int]:
    return {table: len(rows) for table, rows in snap.items()}


def decisions(snap: dict[str, list[tuple]]) -> list[tuple]:
    """The people's decisions among the MAPS_TO edges: (category, concept, status, decided_by, note)."""
    return sorted((r[0], r[1], r[5], r[8], r[10]) for r in snap["maps_to"] if r[5] in ("accepted", "rejected"))


def first_difference(a: dict, b: dict) -> str:
    """A short description of where two snapshots differ (for assertion messages)."""
    for table in sorted(set(a) | set(b)):
        ra, rb = a.get(table, []), b.get(table, [])
        if ra != rb:
            sa, sb = set(ra), set(rb)
            only_a = [r for r in ra if r not in sb][:3]
            only_b = [r for r in rb if r not in sa][:3]
            return f"{table}: {len(ra)} vs {len(rb)} rows; only in first {only_a}; only in second {only_b}"
    return "no difference"
