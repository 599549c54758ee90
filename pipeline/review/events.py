"""The audit trail: an append-only history of every MAPS_TO edge, kept as `EdgeEvent` nodes.

An edge is named by its two ends (category uid, concept uid). Every change leaves one event: a run proposed it
(with score and rank), a run withdrew it, a person accepted, rejected or reopened it, or a decision superseded it.
Events are never updated or deleted, so `edge_history` can always say who did what, when and why.

>>> row = event_row("accepted", category="shop:7", concept="ref:P1", status="accepted", actor="ana")
>>> row["action"], row["source"], row["status_before"]
('accepted', 'shop', '')
"""

from __future__ import annotations

import uuid
from collections.abc import Iterable
from datetime import datetime, timezone

import pandas as pd
import pyarrow as pa

from pipeline.store import Store

MACHINE_ACTIONS = ("proposed", "withdrawn")
PERSON_ACTIONS = ("accepted", "rejected", "reopened", "superseded")
SCORE_TOLERANCE = 5e-4  # a re-proposal whose score moved less than this (and kept rank and status) is not news
_BULK_FROM = 20  # more events than this go through the engine's bulk path

_SCHEMA = pa.schema([
    ("id", pa.string()), ("seq", pa.int64()), ("at", pa.string()), ("action", pa.string()),
    ("source", pa.string()), ("category", pa.string()), ("concept", pa.string()), ("status", pa.string()),
    ("status_before", pa.string()), ("score", pa.float64()), ("rank", pa.int64()), ("run_id", pa.string()),
    ("actor", pa.string()), ("note", pa.string()), ("concept_hash", pa.string()), ("ref", pa.string()),
])


def now_iso() -> str:
    """UTC time with microseconds, so events of one second still sort in the order they happened."""
    return datetime.now(timezone.utc).isoformat(timespec="microseconds")


def event_row(action: str, *, category: str, concept: str, status: str = "", status_before: str = "",
              score: float | None = None, rank: int | None = None, run_id: str = "", actor: str = "",
              note: str = "", concept_hash: str = "", ref: str = "", at: str | None = None, seq: int = 0) -> dict:
    """One event as a plain dict (the columns of `EdgeEvent`). The source key is the category uid's prefix."""
    return {
        "id": uuid.uuid4().hex, "seq": int(seq), "at": at or now_iso(), "action": action,
        "source": category.split(":", 1)[0], "category": category, "concept": concept, "status": status,
        "status_before": status_before or "", "score": None if _missing(score) else float(score),
        "rank": None if _missing(rank) else int(rank), "run_id": run_id or "", "actor": actor or "",
        "note": note or "", "concept_hash": concept_hash or "", "ref": ref or "",
    }


def write_events(store: Store, rows: list[dict]) -> int:
    """Append events (inside the caller's transaction when there is one). Returns how many were written."""
    if not rows:
        return 0
    if len(rows) > _BULK_FROM:
        store.bulk("review_events_bulk", pa.Table.from_pylist(rows, schema=_SCHEMA))
    else:
        for r in rows:
            store.run("review_event_create", **r)
    return len(rows)


def record_machine_edges(store: Store, rows: Iterable[dict], run_id: str, *,
                         categories: Iterable[str] | None = None) -> dict:
    """Record what a map run proposed: call it with the rows the run wrote (dicts with category, concept, score,
    rank, status), in the same transaction. Only news is recorded: a new edge, or a changed score, rank or status.
    `categories`: the uids the run re-mapped; an edge of theirs the run proposed before and not now is recorded as
    `withdrawn`. Returns counts.

    The map job calls it right after `machine_edges_create`:
    `record_machine_edges(store, rows, run_id, categories=cats.uids)`.
    """
    rows = [dict(r) for r in rows]
    remapped = set(categories or ()) | {r["category"] for r in rows}
    counts = {"proposed": 0, "withdrawn": 0, "unchanged": 0}
    if not remapped:
        return counts
    latest = latest_events(store, sorted(remapped))
    hashes = _concept_hashes(store, {r["concept"] for r in rows})
    at = now_iso()
    out: list[dict] = []
    seen: set[tuple[str, str]] = set()
    for r in rows:
        key = (r["category"], r["concept"])
        seen.add(key)
        prev = latest.get(key)
        if prev is not None and prev["action"] == "proposed" and prev["status"] == r["status"] \
                and _same(prev["rank"], r.get("rank")) and _close(prev["score"], r.get("score")):
            counts["unchanged"] += 1
            continue
        out.append(event_row("proposed", category=r["category"], concept=r["concept"], status=r["status"],
                             status_before=prev["status"] if prev is not None else "", score=r.get("score"),
                             rank=r.get("rank"), run_id=run_id, concept_hash=hashes.get(r["concept"], ""),
                             at=at, seq=len(out)))
        counts["proposed"] += 1
    for key, prev in latest.items():
        if key[0] in remapped and key not in seen and prev["action"] == "proposed":
            out.append(event_row("withdrawn", category=key[0], concept=key[1], status="",
                                 status_before=prev["status"], run_id=run_id, at=at, seq=len(out)))
            counts["withdrawn"] += 1
    write_events(store, out)
    return counts


def latest_events(store: Store, categories: list[str]) -> dict[tuple[str, str], dict]:
    """The newest event of every edge of these categories, keyed by (category uid, concept uid)."""
    df = store.frame("review_events_machine", uids=list(categories))
    if df.empty:
        return {}
    df = df.sort_values(["at", "seq"]).drop_duplicates(["category", "concept"], keep="last")
    return {(r["category"], r["concept"]): r for r in df.to_dict("records")}


def edge_history(store: Store, category_uid: str) -> pd.DataFrame:
    """Every event of one category's edges, oldest first: when, what, which concept, who or which run, why."""
    return store.frame("review_events_category", category=category_uid)


def _concept_hashes(store: Store, concepts: set[str]) -> dict[str, str]:
    out: dict[str, str] = {}
    for scheme in sorted({c.split(":", 1)[0] for c in concepts}):
        df = store.frame("concept_hashes", scheme=scheme)
        out.update(zip(df["uid"], df["content_hash"], strict=True))
    return out


def _missing(x) -> bool:
    return x is None or (isinstance(x, float) and x != x)


def _same(a, b) -> bool:
    if _missing(a) or _missing(b):
        return _missing(a) and _missing(b)
    return int(a) == int(b)


def _close(a, b) -> bool:
    if _missing(a) or _missing(b):
        return _missing(a) and _missing(b)
    return abs(float(a) - float(b)) < SCORE_TOLERANCE
