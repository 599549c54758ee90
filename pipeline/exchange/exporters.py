"""Registry of mapping exporters by format name, so a new format is one function and one line here."""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pandas as pd

from pipeline.errors import BadInput, Problem
from pipeline.exchange.mappings_csv import mappings_frame, write_mappings_csv
from pipeline.store import Store

EXPORTERS: dict[str, Callable[[pd.DataFrame, Path], int]] = {"csv": write_mappings_csv}


def export_mappings(store: Store, out: str | Path, *, fmt: str = "csv", candidates: int = 1,
                    sources: list[str] | None = None) -> dict:
    if fmt not in EXPORTERS:
        raise BadInput(Problem(f"unknown export format {fmt!r}; use one of: {', '.join(EXPORTERS)}",
                               field="--format"))
    frame = mappings_frame(store, candidates=candidates, sources=sources)
    n = EXPORTERS[fmt](frame, Path(out))
    return {"file": str(out), "format": fmt, "rows": n}
