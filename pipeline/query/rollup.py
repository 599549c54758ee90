"""Item counts per reference concept, including everything placed on its descendants, split by source."""

from __future__ import annotations

import re

import pandas as pd

from pipeline.errors import NotFound
from pipeline.ingest.graph_writer import node_uid
from pipeline.match.map_job import _pick_reference
from pipeline.store import Store

LIVE = ("accepted", "auto")


def rollup(store: Store, *, concept: str | None = None, depth: int = 1, reference: str | None = None,
           statuses: tuple[str, ...] = LIVE) -> pd.DataFrame:
    """One row per concept: code, label, depth, one column per source, and `total`.

    Without `concept`: the top `depth` levels of the reference. With `concept`: that concept and `depth` levels
    below it. Concepts with no items are left out.
    """
    reference = _pick_reference(store.rows("schemes_list"), reference)
    root, lo, hi = "", 1, depth
    if concept:
        found = store.rows("concept_by_code", uid=node_uid(reference, concept))
        if not found:
            raise NotFound(f"no concept {concept!r} in reference {reference!r}")
        root, lo, hi = found[0]["uid"], found[0]["depth"], found[0]["depth"] + depth
    long = store.frame("rollup", reference=reference, min_depth=lo, max_depth=hi, root=root, statuses=list(statuses))
    if long.empty:
        return pd.DataFrame(columns=["concept_code", "concept_label", "depth", "total"])
    long["items"] = long["items"].astype(int)
    wide = long.pivot_table(index=["concept_code", "concept_label", "depth"], columns="source", values="items",
                            aggfunc="sum", fill_value=0)
    wide.columns = [str(c) for c in wide.columns]
    wide["total"] = wide.sum(axis=1)  # items belong to exactly one source, so per-source counts add up
    wide = wide.reset_index()
    order = sorted(range(len(wide)), key=lambda i: (wide.at[i, "depth"], natural_key(wide.at[i, "concept_code"])))
    return wide.iloc[order].reset_index(drop=True)


def natural_key(code: str) -> list:
    """Sort codes as people read them: HG.2 before HG.10.

    >>> sorted(["HG.10", "HG.2", "HG.1"], key=natural_key)
    ['HG.1', 'HG.2', 'HG.10']
    """
    return [(0, int(t), "") if t.isdigit() else (1, 0, t) for t in re.split(r"(\d+)", str(code)) if t]
