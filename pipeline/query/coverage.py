"""Coverage: the share of each source's items placed on the reference, by the status of the edge that placed them."""

from __future__ import annotations

import pandas as pd

from pipeline.query.ancestry import rollup_status_long
from pipeline.query.filters import Filters, check_filters, pick_reference
from pipeline.query.rollup import natural_key
from pipeline.store import Store

KINDS = ("accepted", "auto", "proposed", "unmapped")
COLUMNS = ["source", "items", *KINDS, "placed", "placed_share", "accepted_share"]


def coverage(store: Store, *, reference: str | None = None, filters: Filters | None = None) -> pd.DataFrame:
    """One row per source (and a `(total)` row): items, how many are placed through an accepted edge, through
    auto edges only, wait on a proposed edge, or have nothing; `placed` counts the kinds in `filters.statuses`.

    >>> coverage(store)                                                                   # doctest: +SKIP
       source  items  accepted  auto  proposed  unmapped  placed  placed_share  accepted_share
    """
    filters = check_filters(store, filters)
    reference = pick_reference(store, reference)
    long = store.frame("query_coverage", reference=reference, **filters.params())
    if long.empty:
        return pd.DataFrame(columns=COLUMNS)
    long["items"] = long["items"].astype(int)
    wide = long.pivot_table(index="source", columns="placed_by", values="items", aggfunc="sum", fill_value=0)
    wide = wide.reindex(columns=list(KINDS), fill_value=0)
    wide.loc["(total)"] = wide.sum()
    wide["items"] = wide[list(KINDS)].sum(axis=1)
    wide["placed"] = wide[list(filters.statuses)].sum(axis=1)
    wide["placed_share"] = (wide["placed"] / wide["items"]).round(4)
    wide["accepted_share"] = (wide["accepted"] / wide["items"]).round(4)
    out = wide.reset_index().rename(columns={"index": "source"})
    out.columns.name = None
    return out[COLUMNS]


def coverage_by_top(store: Store, *, reference: str | None = None, filters: Filters | None = None,
                    depth: int = 1) -> pd.DataFrame:
    """Items per concept at `depth` (default: the top level), per source and the status that placed them
    (`accepted` when any placement under the concept is accepted, else `auto`): long form for charts."""
    filters = check_filters(store, filters)
    reference = pick_reference(store, reference)
    long = rollup_status_long(store, reference=reference, min_depth=depth, max_depth=depth, params=filters.params())
    if long.empty:
        return pd.DataFrame(columns=["concept_code", "concept_label", "source", "placed_by", "items"])
    long["items"] = long["items"].astype(int)
    order = sorted(range(len(long)), key=lambda i: (natural_key(long.at[i, "concept_code"]), long.at[i, "source"]))
    return long.iloc[order][["concept_code", "concept_label", "source", "placed_by", "items"]].reset_index(drop=True)
