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

import numpy as np
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
    new = pd.DataFrame(list(rows), columns=["category", "concept", "status", "score", "rank"])
    remapped = set(categories or ()) | set(new["category"])
    counts = {"proposed": 0, "withdrawn": 0, "unchanged": 0}
    if not remapped:
        return counts
    latest = latest_events(store, remapped)
    merged = new.merge(latest, on=["category", "concept"], how="left", suffixes=("", "_prev"))
    unchanged = ((merged["action"] == "proposed") & (merged["status_prev"] == merged["status"])
                 & _same_rank(merged["rank_prev"], merged["rank"]) & _close_scores(merged["score_prev"], merged["score"]))
    counts["unchanged"] = int(unchanged.sum())
    proposed = merged[~unchanged.to_numpy()]
    hashes = _concept_hashes(store, set(proposed["concept"]))
    gone = latest[latest["action"] == "proposed"].merge(new[["category", "concept"]], how="left", indicator=True)
    gone = gone[gone["_merge"] == "left_only"]
    at = now_iso()
    table = pd.concat([
        pd.DataFrame({"action": "proposed", "category": proposed["category"], "concept": proposed["concept"],
                      "status": proposed["status"], "status_before": proposed["status_prev"].fillna(""),
                      "score": proposed["score"].astype("float64"), "rank": proposed["rank"].astype("Int64"),
                      "concept_hash": proposed["concept"].map(hashes).fillna("")}),
        pd.DataFrame({"action": "withdrawn", "category": gone["category"], "concept": gone["concept"], "status": "",
                      "status_before": gone["status"].fillna(""), "score": np.nan,
                      "rank": pd.array([pd.NA] * len(gone), dtype="Int64"), "concept_hash": ""}),
    ], ignore_index=True)
    counts["proposed"], counts["withdrawn"] = len(proposed), len(gone)
    write_event_table(store, table, run_id=run_id, at=at)
    return counts


def write_event_table(store: Store, table: pd.DataFrame, *, run_id: str = "", actor: str = "", at: str) -> int:
    """Append the events in `table` (columns action, category, concept, status, status_before, score, rank,
    concept_hash, and optionally note), stamped with one time, run and actor, in row order (their `seq`)."""
    if table.empty:
        return 0
    n = len(table)
    cols = {
        "id": [uuid.uuid4().hex for _ in range(n)], "seq": np.arange(n, dtype=np.int64), "at": [at] * n,
        "action": table["action"].tolist(), "source": table["category"].str.split(":", n=1).str[0].tolist(),
        "category": table["category"].tolist(), "concept": table["concept"].tolist(),
        "status": table["status"].tolist(), "status_before": table["status_before"].tolist(),
        "score": pa.array(table["score"].to_numpy(dtype="float64"), mask=table["score"].isna().to_numpy()),
        "rank": pa.array(table["rank"].astype("float64").fillna(0).to_numpy(dtype="int64"),
                         mask=table["rank"].isna().to_numpy()),
        "run_id": [run_id or ""] * n, "actor": [actor or ""] * n,
        "note": table["note"].fillna("").tolist() if "note" in table else [""] * n,
        "concept_hash": table["concept_hash"].tolist(), "ref": [""] * n,
    }
    arrow = pa.table(cols, schema=_SCHEMA)
    if n > _BULK_FROM:
        store.bulk("review_events_bulk", arrow)
    else:
        for r in arrow.to_pylist():
            store.run("review_event_create", **r)
    return n


def latest_events(store: Store, categories: Iterable[str]) -> pd.DataFrame:
    """The newest event of every edge of these categories: one row per (category, concept), with the event's
    action, status, score and rank."""
    wanted = set(categories)
    cols = ["category", "concept", "action", "status", "score", "rank"]
    if not wanted:
        return pd.DataFrame(columns=cols)
    df = store.frame("review_events_of_sources", sources=sorted({c.split(":", 1)[0] for c in wanted}))
    if df.empty:
        return pd.DataFrame(columns=cols)
    df = df[df["category"].isin(wanted)]
    df = df.sort_values(["at", "seq"], kind="stable").drop_duplicates(["category", "concept"], keep="last")
    return df[cols].reset_index(drop=True)


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


def _same_rank(before: pd.Series, now: pd.Series) -> pd.Series:
    b, n = pd.to_numeric(before, errors="coerce"), pd.to_numeric(now, errors="coerce")
    return (b.isna() & n.isna()) | (b == n)


def _close_scores(before: pd.Series, now: pd.Series) -> pd.Series:
    b, n = pd.to_numeric(before, errors="coerce"), pd.to_numeric(now, errors="coerce")
    return (b.isna() & n.isna()) | ((b - n).abs() < SCORE_TOLERANCE)
