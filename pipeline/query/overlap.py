"""Cross-source overlap: item keys found in several sources, and whether their copies landed in the same concept."""

from __future__ import annotations

import pandas as pd

from pipeline.query.filters import Filters, check_filters, pick_reference
from pipeline.query.reference_tree import ReferenceTree
from pipeline.store import Store

COLUMNS = ["item_key", "n_sources", "sources", "concepts", "all_placed", "same_concept", "same_top"]


def overlap(store: Store, *, reference: str | None = None, filters: Filters | None = None,
            detail: bool = False) -> pd.DataFrame:
    """One row per item key present in two or more sources (of `filters.sources`, if given).

    `concepts`: per source, the concept codes its copy is placed on (`source=code;code | source=...`).
    `same_concept`: every copy is placed, on exactly the same set of concepts. `same_top`: every copy is placed,
    and all placements share one top-level concept. With `detail=True`, the long form instead: one row per
    (key, source, placement) with title, concept and status.
    """
    filters = check_filters(store, filters)
    reference = pick_reference(store, reference)
    long = store.frame("query_overlap", reference=reference, **filters.params())
    if detail:
        return long.reset_index(drop=True)
    if long.empty:
        return pd.DataFrame(columns=COLUMNS)
    tree = ReferenceTree.load(store, reference)
    rows = []
    for key, part in long.groupby("item_key", sort=True):
        per_source: dict[str, set[str]] = {}
        for src, code in zip(part["source"], part["concept_code"]):
            per_source.setdefault(src, set())
            if isinstance(code, str) and code:
                per_source[src].add(code)
        sets = list(per_source.values())
        all_placed = all(sets)
        tops = {tree.top(c) for s in sets for c in s if c in tree}
        rows.append({
            "item_key": key,
            "n_sources": len(per_source),
            "sources": "|".join(sorted(per_source)),
            "concepts": " | ".join(f"{s}={';'.join(sorted(per_source[s]))}" for s in sorted(per_source)),
            "all_placed": all_placed,
            "same_concept": all_placed and all(s == sets[0] for s in sets),
            "same_top": all_placed and len(tops) == 1,
        })
    return pd.DataFrame(rows, columns=COLUMNS)


def overlap_summary(table: pd.DataFrame) -> dict:
    """Counts over an `overlap` table: shared keys, how many are placed everywhere, agree on concept and top."""
    return {"shared_keys": len(table), "all_placed": int(table["all_placed"].sum()),
            "same_concept": int(table["same_concept"].sum()), "same_top": int(table["same_top"].sum())}
