"""From a concept to its items: each item with the source category it came through and the edge that placed it."""

from __future__ import annotations

import json

import pandas as pd

from pipeline.query.filters import Filters, check_filters, pick_reference
from pipeline.query.rollup import concept_row
from pipeline.store import Store

COLUMNS = ["source", "item_key", "title", "category_code", "category_label", "category_path", "concept_code",
           "concept_label", "concept_depth", "status", "score", "rank", "match_type", "method", "decided_by",
           "decided_at"]
ALL_BELOW = 30  # the hop cap of every variable-length path in cypher/ (ENGINES.md)


def drilldown(store: Store, concept: str, *, reference: str | None = None, descendants: bool = True,
              filters: Filters | None = None, limit: int = 100_000, attributes: bool = False) -> pd.DataFrame:
    """One row per (item, placement) on `concept` or, with `descendants`, anywhere below it.

    With `attributes=True` every item attribute becomes a column `attr_<name>`.
    """
    filters = check_filters(store, filters)
    reference = pick_reference(store, reference)
    root = concept_row(store, reference, concept)
    df = store.frame("query_drilldown", root=root["uid"], max_hops=ALL_BELOW if descendants else 0,
                     limit=int(limit), **filters.params())
    if df.empty:
        return pd.DataFrame(columns=COLUMNS)
    df["concept_depth"] = df["concept_depth"].astype(int)
    df["rank"] = df["rank"].astype(int)
    out = df[COLUMNS].copy()
    if attributes:
        out = pd.concat([out, attribute_columns(df["attributes"])], axis=1)
    return out.reset_index(drop=True)


def attribute_columns(texts: pd.Series) -> pd.DataFrame:
    """The JSON attribute texts of items as `attr_<name>` columns (missing values empty)."""
    parsed = [json.loads(t) if isinstance(t, str) and t else {} for t in texts]
    frame = pd.DataFrame(parsed, index=texts.index).fillna("")
    frame.columns = [f"attr_{c}" for c in frame.columns]
    return frame[sorted(frame.columns)]
