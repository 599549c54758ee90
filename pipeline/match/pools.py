"""The text candidate pool of each category: the `pool` concepts with the best fused cosine.

Exact by default (blocked matrix products, `candidates.top_k`). On a store with a vector index (Neo4j 5.23+) and a
reference larger than `index_above` concepts, the server's index supplies neighbours per signal instead; their
union is re-ranked by the same fused cosine, so the index only decides which concepts get looked at.
"""

from __future__ import annotations

import logging

import numpy as np

from pipeline.match.candidates import top_k

log = logging.getLogger(__name__)
SIGNAL_FETCH = 2   # neighbours asked per signal, as a multiple of the pool
INDEX_BATCH = 256  # query vectors per round trip


def text_pools(store, q: np.ndarray, r: np.ndarray, todo: list[int], pool: int, *, concept_uids: list[str],
               signal_queries: dict[str, np.ndarray], index_above: int | None) -> tuple[list[list[int]], str]:
    """Pools (concept positions, best first) for the category rows `todo` of `q`, and how they were found
    ("exact" or "vector index"). `signal_queries`: concept-side signal -> query matrix (rows as in `q`)."""
    pools: list[list[int]] = [[] for _ in range(q.shape[0])]
    if not todo:
        return pools, "exact"
    if _use_index(store, len(concept_uids), index_above):
        return _index_pools(store, q, r, todo, pool, concept_uids, signal_queries), "vector index"
    idx, _ = top_k(q[todo], r, pool)
    for row, ci in enumerate(todo):
        pools[ci] = [int(j) for j in idx[row]]
    return pools, "exact"


def _use_index(store, n_concepts: int, index_above: int | None) -> bool:
    if index_above is None or n_concepts <= index_above:
        return False
    if not getattr(store, "vector_index", False):
        log.info("reference has %s concepts but the store has no vector index; exact candidate search",
                 n_concepts)
        return False
    return True


def _index_pools(store, q, r, todo, pool, concept_uids, signal_queries) -> list[list[int]]:
    pos = {u: j for j, u in enumerate(concept_uids)}
    pools: list[list[int]] = [[] for _ in range(q.shape[0])]
    fetch = pool * SIGNAL_FETCH
    for start in range(0, len(todo), INDEX_BATCH):
        rows = todo[start:start + INDEX_BATCH]
        found: list[set[int]] = [set() for _ in rows]
        for signal, matrix in signal_queries.items():
            # the index holds every reference's concepts: ask for more, keep this reference's
            live = [k for k, ci in enumerate(rows) if np.any(matrix[ci])]  # a zero vector has no cosine
            if not live:
                continue
            hits = store.nearest_concepts(signal, matrix[[rows[k] for k in live]], k=fetch, overfetch=8)
            for k, row_hits in zip(live, hits):
                found[k].update(pos[o] for o, _ in row_hits if o in pos)
        for k, ci in enumerate(rows):
            cand = np.fromiter(sorted(found[k]), dtype=np.int64)
            if not len(cand):
                continue
            fused = r[cand] @ q[ci]
            order = np.lexsort((cand, -fused))[:pool]  # same tie rule as top_k: score, then position
            pools[ci] = [int(cand[j]) for j in order]
    return pools
