"""Export MAPS_TO edges as CSV, one row per (source category, candidate)."""

from __future__ import annotations

from pathlib import Path

import pandas as pd

from pipeline.store import Store

COLUMNS = ["source_scheme", "source_code", "source_label", "rank", "concept_code", "concept_label", "score",
           "match_type", "status"]


def mappings_frame(store: Store, *, candidates: int = 1, sources: list[str] | None = None) -> pd.DataFrame:
    """Edges up to rank `candidates`, plus every decided edge whatever its rank."""
    df = store.frame("mappings_export", max_rank=candidates, sources=list(sources or []))
    return df.reindex(columns=COLUMNS)


def write_mappings_csv(frame: pd.DataFrame, out: str | Path) -> int:
    frame.to_csv(out, index=False, float_format="%.4f")
    return len(frame)
