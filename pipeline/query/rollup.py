"""Item counts per reference concept, including everything placed on its descendants, split by source."""

from __future__ import annotations

import re

import pandas as pd

from pipeline.errors import NotFound
from pipeline.ingest.graph_writer import node_uid
from pipeline.query.ancestry import rollup_long
from pipeline.query.filters import LIVE, Filters, check_filters, pick_reference
from pipeline.store import Store

__all__ = ["LIVE", "concept_row", "natural_key", "rollup", "wide_counts"]


def rollup(store: Store, *, concept: str | None = None, depth: int = 1, reference: str | None = None,
           statuses: tuple[str, ...] | None = None, filters: Filters | None = None) -> pd.DataFrame:
    """One row per concept: code, label, depth, one column per source, and `total`.

    Without `concept`: the top `depth` levels of the reference. With `concept`: that concept and `depth` levels
    below it. Concepts with no items are left out. Counted by `pipeline.query.ancestry.rollup_long` (one pass over
    the placements); `cypher/common/query_rollup.cypher` is the engine-only form the tests compare it with. `filters` narrows sources, edge statuses and item attributes;
    `statuses` (older form) overrides the filters' statuses. Statuses outside accepted/auto place nothing and
    are ignored.
    """
    filters = filters or Filters()
    if statuses is not None:
        filters = Filters(filters.sources, tuple(s for s in statuses if s in LIVE) or LIVE, filters.attributes)
    filters = check_filters(store, filters)
    reference = pick_reference(store, reference)
    root, lo, hi = "", 1, depth
    if concept:
        found = concept_row(store, reference, concept)
        root, lo, hi = found["uid"], found["depth"], found["depth"] + depth
    long = rollup_long(store, reference=reference, min_depth=lo, max_depth=hi, root=root, params=filters.params())
    return wide_counts(long, filters.sources)


def concept_row(store: Store, reference: str, code: str) -> dict:
    found = store.rows("concept_by_code", uid=node_uid(reference, code))
    if not found:
        raise NotFound(f"no concept {code!r} in reference {reference!r}")
    return found[0]


def wide_counts(long: pd.DataFrame, sources: list[str] | None = None) -> pd.DataFrame:
    """Long (concept_code, concept_label, depth, source, items) rows -> one row per concept, a column per source,
    and `total`, sorted by depth then code as people read them."""
    if long.empty:
        return pd.DataFrame(columns=["concept_code", "concept_label", "depth", *(sources or []), "total"])
    long = long.copy()
    long["items"] = long["items"].astype(int)
    wide = long.pivot_table(index=["concept_code", "concept_label", "depth"], columns="source", values="items",
                            aggfunc="sum", fill_value=0)
    wide.columns = [str(c) for c in wide.columns]
    for s in sources or []:
        if s not in wide.columns:
            wide[s] = 0
    wide["total"] = wide.sum(axis=1)  # items belong to exactly one source, so per-source counts add up
    wide = wide.reset_index()
    wide["depth"] = wide["depth"].astype(int)
    order = sorted(range(len(wide)), key=lambda i: (wide.at[i, "depth"], natural_key(wide.at[i, "concept_code"])))
    return wide.iloc[order].reset_index(drop=True)


def natural_key(code: str) -> list:
    """Sort codes as people read them: HG.2 before HG.10.

    >>> sorted(["HG.10", "HG.2", "HG.1"], key=natural_key)
    ['HG.1', 'HG.2', 'HG.10']
    """
    return [(0, int(t), "") if t.isdigit() else (1, 0, t) for t in re.split(r"(\d+)", str(code)) if t]
