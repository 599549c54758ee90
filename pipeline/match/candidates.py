"""Top-k candidate retrieval by blocked matrix products on L2-normalised vectors.

>>> import numpy as np
>>> q = np.eye(2, dtype=np.float32); r = np.array([[0, 1], [1, 0], [.6, .8]], dtype=np.float32)
>>> idx, sc = top_k(q, r, k=2)
>>> idx.tolist()
[[1, 2], [0, 2]]
"""

from __future__ import annotations

import numpy as np

# Query rows per matrix product. Small blocks keep the similarity block in cache for the selection that follows:
# 20,000 x 10,000 at width 1,152 took 2.7 s in blocks of 512 against 4.0 s in blocks of 4,096 (median of 3).
TOPK_BLOCK = 512


def top_k(queries: np.ndarray, refs: np.ndarray, k: int, *, block: int = TOPK_BLOCK) -> tuple[np.ndarray, np.ndarray]:
    """Indices and scores of the k best refs per query row, best first. Memory stays at block x len(refs)."""
    k = min(k, refs.shape[0])
    n = queries.shape[0]
    idx = np.empty((n, k), dtype=np.int64)
    scores = np.empty((n, k), dtype=np.float32)
    refs_t = np.ascontiguousarray(refs.T, dtype=np.float32)
    for start in range(0, n, block):
        sims = queries[start:start + block].astype(np.float32, copy=False) @ refs_t
        part = np.argpartition(-sims, k - 1, axis=1)[:, :k] if k < sims.shape[1] else np.tile(
            np.arange(sims.shape[1]), (sims.shape[0], 1))
        part_scores = np.take_along_axis(sims, part, axis=1)
        # Stable order: score descending, then reference index ascending, so ties never flip between runs.
        order = np.lexsort((part, -part_scores), axis=1)
        idx[start:start + block] = np.take_along_axis(part, order, axis=1)
        scores[start:start + block] = np.take_along_axis(part_scores, order, axis=1)
    return idx, scores


def stack_signals(pairs: list[tuple[np.ndarray, np.ndarray, float]]) -> tuple[np.ndarray, np.ndarray]:
    """Fuse several (query matrix, reference matrix, weight) similarity signals into one matrix pair whose
    product equals sum(weight * q @ r.T): each side is scaled by sqrt(weight) and concatenated."""
    return stack_side([(q, w) for q, _, w in pairs]), stack_side([(r, w) for _, r, w in pairs])


def stack_side(parts: list[tuple[np.ndarray, float]]) -> np.ndarray:
    """One side of `stack_signals`: each matrix scaled by sqrt(weight), side by side (weights <= 0 left out)."""
    kept = [m * np.float32(np.sqrt(w)) for m, w in parts if w > 0]
    return np.hstack(kept).astype(np.float32)
