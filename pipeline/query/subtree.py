"""The reference around a concept: its ancestors, itself and its descendants to some depth, with item counts."""

from __future__ import annotations

import pandas as pd

from pipeline.errors import NotFound
from pipeline.query.ancestry import rollup_long
from pipeline.query.filters import Filters, check_filters, pick_reference
from pipeline.query.reference_tree import ReferenceTree
from pipeline.query.rollup import wide_counts
from pipeline.store import Store


def subtree(store: Store, concept: str, *, depth: int = 1, reference: str | None = None,
            filters: Filters | None = None) -> pd.DataFrame:
    """One row per concept on the path from the top to `concept` and `depth` levels below it, in tree order.

    Columns: relation (`ancestor`, `self`, `descendant`), level (hops from `concept`, negative above), code,
    label, depth, parent_code, one item column per source (items on the concept or below it), `total`, and
    `categories` (source categories pointing at this very concept through an edge of `filters.statuses`).
    Concepts without items are kept, so the shape of the hierarchy shows.
    """
    filters = check_filters(store, filters)
    reference = pick_reference(store, reference)
    tree = ReferenceTree.load(store, reference)
    if concept not in tree:
        raise NotFound(f"no concept {concept!r} in reference {reference!r}")
    chain = tree.ancestors(concept)
    rows = [("ancestor", i - len(chain), c) for i, c in enumerate(chain)] + [("self", 0, concept)]
    below = tree.descendants(concept, depth)
    rows += [("descendant", hop, c) for c, hop in _tree_order(tree, concept, {c for c, _ in below})]
    codes = [c for _, _, c in rows]
    uids = [tree.uid(c) for c in codes]
    counts = wide_counts(rollup_long(store, reference=reference, min_depth=0, max_depth=10_000, uids=uids,
                                     params=filters.params()), filters.sources)
    mapped = store.frame("query_concept_mappings", uids=uids, statuses=list(filters.statuses))
    n_cats = mapped.groupby("concept_code")["categories"].sum().astype(int) if len(mapped) else pd.Series(dtype=int)
    by_code = counts.set_index("concept_code") if len(counts) else None
    sources = [c for c in counts.columns if c not in ("concept_code", "concept_label", "depth", "total")]
    out = []
    for relation, level, code in rows:
        rec = {"relation": relation, "level": level, "code": code, "label": tree.label(code),
               "depth": int(tree.frame.loc[tree.frame["code"] == code, "depth"].iloc[0]),
               "parent_code": tree.parents[code][0] if tree.parents.get(code) else ""}
        for s in sources:
            rec[s] = int(by_code.at[code, s]) if by_code is not None and code in by_code.index else 0
        rec["total"] = int(by_code.at[code, "total"]) if by_code is not None and code in by_code.index else 0
        rec["categories"] = int(n_cats.get(code, 0))
        out.append(rec)
    return pd.DataFrame(out)


def _tree_order(tree: ReferenceTree, root: str, keep: set[str]) -> list[tuple[str, int]]:
    """Depth-first (pre-order) listing of the kept descendants, so children follow their parent."""
    out, seen = [], set()

    def walk(code: str, hop: int) -> None:
        for child in tree.children(code):
            if child in keep and child not in seen:
                seen.add(child)
                out.append((child, hop))
                walk(child, hop + 1)

    walk(root, 1)
    return out
