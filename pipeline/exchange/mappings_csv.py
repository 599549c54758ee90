"""Export MAPS_TO edges as CSV, one row per (source category, candidate)."""

from __future__ import annotations

from pathlib import Path

import pandas as pd

from pipeline.store import Store

COLUMNS = ["source_scheme", "source_code", "source_label", "rank", "concept_code", "concept_label", "score",
           "match_type", "status", "method", "decided_by", "decided_at", "note"]


def mappings_frame(store: Store, *, candidates: int = 1, sources: list[str] | None = None,
                   statuses: list[str] | None = None) -> pd.DataFrame:
    """Edges up to rank `candidates`, plus every live (accepted, auto) and rejected edge whatever its rank; only
    `statuses` if given.
    Every column of the `mappings_export` query (ids, IRIs and provenance too), in its order."""
    df = store.frame("mappings_export", max_rank=candidates, sources=list(sources or []))
    if statuses:
        df = df[df["status"].isin(statuses)].reset_index(drop=True)
    for col in ("method", "decided_by", "decided_at", "note", "concept_iri"):
        if col in df:
            df[col] = df[col].fillna("")
    return df


def write_mappings_csv(frame: pd.DataFrame, out: str | Path, info=None) -> int:
    frame.reindex(columns=COLUMNS).to_csv(out, index=False, float_format="%.4f")
    return len(frame)
