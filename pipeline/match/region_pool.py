"""More candidates from the hierarchy: the concepts under where a category's parent landed.

Text search alone can miss the right concept when the category's own label is vague ("Other ...", "Agents
involved in ...") while its parent is clear. Once a first pass has chosen a concept for every category, each child
also gets the best few concepts (by the fused text score) at or under its parent's concept: the `parent` feature
can then pick them. A parent that landed on a reference leaf widens to that leaf's parent, so siblings count.
"""

from __future__ import annotations

import numpy as np

from pipeline.match.hierarchy_view import HierarchyView


def descendants(concepts: HierarchyView) -> list[list[int]]:
    """Each concept's strict descendants."""
    out: list[list[int]] = [[] for _ in concepts.uids]
    for d, ups in enumerate(concepts.ancestors()):
        for a in ups:
            out[a].append(d)
    return out


def extend_pools(pools: list[list[int]], cats: HierarchyView, concepts: HierarchyView, tops: dict[int, int],
                 q: np.ndarray, r: np.ndarray, todo: list[int], *, per_category: int = 10,
                 max_region: int = 2000, below: list[list[int]] | None = None) -> int:
    """Add to each pool in `todo` the `per_category` concepts at or under its parents' chosen concepts (`tops`:
    category -> concept) with the best fused text score; regions larger than `max_region` concepts are skipped
    (the text pool covers a region that wide). Returns how many candidates were added."""
    below = below if below is not None else descendants(concepts)
    added = 0
    for ci in todo:
        region: set[int] = set()
        for p in cats.parents[ci]:
            j = tops.get(p)
            if j is None:
                continue
            for a in concepts.region(j):
                region.add(a)
                region.update(below[a])
        if not region or len(region) > max_region:
            continue
        have = set(pools[ci])
        fresh = np.array(sorted(region - have), dtype=np.int64)
        if not len(fresh):
            continue
        scores = r[fresh] @ q[ci]
        best = fresh[np.lexsort((fresh, -scores))[:per_category]]
        pools[ci].extend(int(j) for j in best)
        added += len(best)
    return added
