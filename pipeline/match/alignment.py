"""A linear map from category vectors to concept vectors, fitted on labelled pairs (ridge regression).

The two taxonomies word the same things differently; labelled pairs show how. Ridge regression towards the identity,
W = I + (QᵀQ + λI)⁻¹ Qᵀ(R − Q), moves each category vector towards where its labelled look-alikes' concepts lie, and
leaves directions the labels do not cover as they were. λ is chosen by cross-validation on the labelled pairs
themselves (which λ retrieves the held-out pair's concept best; when none beats the unmoved vectors, no map is
used). A labelled category's own aligned vector comes
from a map fitted without its fold, so the model learned on labelled rows sees the feature as unlabelled rows do.

>>> import numpy as np
>>> rng = np.random.default_rng(0)
>>> r = np.eye(4); q = r[[1, 2, 3, 0]]   # the category side is the concept side, rotated
>>> aligned = aligned_vectors(q, r, {0: [1], 1: [2], 2: [3], 3: [0]}, [0, 1, 2, 3], lambdas=(0.01,), folds=0)
>>> (aligned @ r.T).argmax(axis=1)[:4].tolist()
[1, 2, 3, 0]
"""

from __future__ import annotations

import numpy as np

LAMBDAS = (0.3, 1.0, 3.0, 10.0)
FOLDS = 5
MIN_PAIRS = 20  # fewer labelled pairs than this teach no map worth trusting


def fit_map(q: np.ndarray, r: np.ndarray, lam: float) -> np.ndarray:
    """Ridge towards the identity: rows of `q` (categories) onto rows of `r` (their concepts)."""
    d = q.shape[1]
    return np.eye(d) + np.linalg.solve(q.T @ q + lam * np.eye(d), q.T @ (r - q))


def _normalise(m: np.ndarray) -> np.ndarray:
    return m / np.maximum(np.linalg.norm(m, axis=1, keepdims=True), 1e-12)


def _folds(n: int, folds: int, seed: int) -> np.ndarray:
    return np.random.default_rng(seed).permutation(n) % max(folds, 1)


def choose_lambda(q: np.ndarray, r_all: np.ndarray, owners: np.ndarray, targets: list[list[int]],
                  lambdas=LAMBDAS, folds: int = FOLDS, seed: int = 0) -> float | None:
    """The λ whose held-out folds most often put a labelled concept first among all concepts; None when the unmoved
    vectors do at least as well."""
    fold = _folds(len(owners), folds, seed)
    top = (q[owners] @ r_all.T).argmax(axis=1)
    best, best_hits = None, sum(int(top[i] in targets[i]) for i in range(len(owners)))
    for lam in lambdas:
        hits = 0
        for f in range(folds):
            train, test = fold != f, np.nonzero(fold == f)[0]
            w = _pair_map(q, r_all, owners[train], [targets[i] for i in np.nonzero(train)[0]], lam)
            top = (_normalise(q[owners[test]] @ w) @ r_all.T).argmax(axis=1)
            hits += sum(int(top[k] in targets[i]) for k, i in enumerate(test))
        if hits > best_hits:
            best, best_hits = lam, hits
    return best


def _pair_map(q, r_all, owners, targets, lam):
    rows = [(ci, j) for ci, js in zip(owners.tolist(), targets) for j in js]
    return fit_map(q[[a for a, _ in rows]], r_all[[b for _, b in rows]], lam)


def aligned_vectors(q: np.ndarray, r: np.ndarray, labelled: dict[int, list[int]], todo: list[int], *,
                    lambdas=LAMBDAS, folds: int = FOLDS, seed: int = 0) -> np.ndarray | None:
    """Unit category vectors moved by the fitted map (rows as in `q`; rows outside `todo` and not labelled are
    left as they were), or None with fewer than MIN_PAIRS labelled categories or when cross-validation finds no
    map better than none (`folds=0`: no cross-fitting, the first λ)."""
    owners = np.array(sorted(labelled), dtype=np.int64)
    if len(owners) < (MIN_PAIRS if folds else 1):
        return None
    q64, r64 = q.astype(np.float64), r.astype(np.float64)
    targets = [labelled[int(ci)] for ci in owners]
    lam = choose_lambda(q64, r64, owners, targets, lambdas, folds, seed) if folds else lambdas[0]
    if lam is None:
        return None
    out = q64.copy()
    rows = np.array(sorted(set(todo) - set(owners.tolist())), dtype=np.int64)
    if len(rows):
        out[rows] = q64[rows] @ _pair_map(q64, r64, owners, targets, lam)
    if folds:
        fold = _folds(len(owners), folds, seed)
        for f in range(folds):
            train, test = fold != f, fold == f
            w = _pair_map(q64, r64, owners[train], [targets[i] for i in np.nonzero(train)[0]], lam)
            out[owners[test]] = q64[owners[test]] @ w
    else:
        out[owners] = q64[owners] @ _pair_map(q64, r64, owners, targets, lam)
    return _normalise(out).astype(np.float32)


def aligned_pools(aligned: np.ndarray, r: np.ndarray, todo: list[int], k: int = 5) -> dict[int, dict[int, float]]:
    """The `k` concepts nearest each aligned category vector, as {category: {concept: cosine}} (pool widening)."""
    from pipeline.match.candidates import top_k

    if not todo:
        return {}
    idx, sc = top_k(aligned[todo], r, k)
    return {ci: dict(zip(idx[n].tolist(), sc[n].tolist())) for n, ci in enumerate(todo)}
