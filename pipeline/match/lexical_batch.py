"""`lexical_similarity` for many (category, concept) pairs at once, as sparse products instead of Python sets.

Each distinct label becomes a padded row of word ids and one of character-trigram ids; a block of category labels
marks its ids in a boolean table, and each candidate label's ids are looked up there, so a pair costs a gather of a
few dozen entries. The
result equals `lexical_overlap.lexical_similarity` (best over a concept's labels) up to float rounding.

>>> lab = LabelTable(["Pots & Planters", "planter and pot", "Lawn mowers"], weights=None)
>>> [round(float(x), 2) for x in lab.similarity(np.array([0, 0]), np.array([1, 2]))]
[1.0, 0.05]
"""

from __future__ import annotations

import copy

import numpy as np

from pipeline.match.lexical_overlap import trigrams, word_set


class LabelTable:
    """Word and trigram ids of `labels` (one row per distinct string), padded with -1."""

    def __init__(self, labels: list[str], weights: dict[str, float] | None):
        self.row: dict[str, int] = {}
        self.vocabulary: dict[str, int] = {}
        self._grams: dict[str, int] = {}
        self._w_rows: list[list[int]] = []
        self._t_rows: list[list[int]] = []
        self._add(labels)
        self._weigh(weights)

    def _add(self, labels) -> None:
        words, grams = self.vocabulary, self._grams
        for label in labels:
            if label in self.row:
                continue
            self.row[label] = len(self.row)
            self._w_rows.append([words.setdefault(w, len(words)) for w in word_set(label)])
            self._t_rows.append([grams.setdefault(t, len(grams)) for t in trigrams(label)])
        self.n_words, self.n_grams = len(words), len(grams)
        self.words = _padded(self._w_rows)
        self.grams = _padded(self._t_rows)
        self.word_count = (self.words >= 0).sum(axis=1)
        self.gram_count = (self.grams >= 0).sum(axis=1)

    def extended(self, labels: list[str], weights: dict[str, float] | None) -> "LabelTable":
        """This table plus `labels` (only the new ones are tokenised), under `weights`; this one is unchanged."""
        other = copy.copy(self)
        other.row, other.vocabulary, other._grams = dict(self.row), dict(self.vocabulary), dict(self._grams)
        other._w_rows, other._t_rows = list(self._w_rows), list(self._t_rows)
        other._add(labels)
        other._weigh(weights)
        return other

    def _weigh(self, weights: dict[str, float] | None) -> None:
        weight = np.ones(self.n_words + 1)
        weight[-1] = 0.0  # the padding id (-1) weighs nothing
        if weights:  # words outside the weighting corpus count 1, as in lexical_similarity
            for w, k in self.vocabulary.items():
                weight[k] = weights.get(w, 1.0)
        self.word_weight = weight
        self.word_mass = weight[self.words].sum(axis=1)

    def similarity(self, a: np.ndarray, b: np.ndarray, *, block: int = 512) -> np.ndarray:
        """Lexical similarity of label rows a[i] and b[i] (row numbers of this table). Pairs sharing an `a` row
        are cheapest when adjacent: each block marks its distinct `a` rows' words once, then looks `b`'s up."""
        out = np.zeros(len(a))
        if len(a) == 0:
            return out
        shared_w = np.zeros(len(a))
        shared_t = np.zeros(len(a))
        order = np.argsort(a, kind="stable")
        firsts, local = np.unique(a[order], return_inverse=True)
        bounds = np.searchsorted(local, np.arange(0, len(firsts) + block, block))
        for n, lo in enumerate(range(0, len(firsts), block)):
            rows = firsts[lo:lo + block]
            sel = order[bounds[n]:bounds[n + 1]]
            here = local[bounds[n]:bounds[n + 1]] - lo
            for ids, n_vocab, target, weight in ((self.words, self.n_words, shared_w, self.word_weight),
                                                 (self.grams, self.n_grams, shared_t, None)):
                marks = np.zeros((len(rows), n_vocab + 1), dtype=bool)  # last column: the padding id
                mine = ids[rows]
                r, c = np.nonzero(mine >= 0)
                marks[r, mine[r, c]] = True
                other = ids[b[sel]]
                hit = marks[here[:, None], other]
                target[sel] = (hit * weight[other]).sum(axis=1) if weight is not None else hit.sum(axis=1)
        union = self.word_mass[a] + self.word_mass[b] - shared_w
        grams = self.gram_count[a] + self.gram_count[b]
        both = (self.word_count[a] > 0) & (self.word_count[b] > 0)
        with np.errstate(divide="ignore", invalid="ignore"):
            jaccard = np.where(union > 0, shared_w / union, 0.0)
            dice = np.where((self.gram_count[a] > 0) & (self.gram_count[b] > 0), 2 * shared_t / grams, 0.0)
        return np.where(both, (jaccard + dice) / 2, 0.0)


def _padded(rows: list[list[int]]) -> np.ndarray:
    out = np.full((len(rows), max((len(r) for r in rows), default=0) or 1), -1, dtype=np.int64)
    for i, r in enumerate(rows):
        out[i, :len(r)] = r
    return out


def pool_lexical(category_labels: list[str], concept_labels: list[list[str]], cand: np.ndarray,
                 weights: dict[str, float] | None, *, table: LabelTable | None = None) -> np.ndarray:
    """Lexical similarity of every (category row, candidate) in the padded candidate array `cand` (categories x
    pool, -1 = no candidate): the best over the concept's labels, 0 where there is none. `table`: one built
    before over these labels, reused."""
    table = table or LabelTable([*category_labels, *(lab for labs in concept_labels for lab in labs if lab)],
                                weights)
    cat_row = np.array([table.row[lab] for lab in category_labels], dtype=np.int64)
    counts = np.array([sum(1 for lab in labs if lab) for labs in concept_labels], dtype=np.int64)
    flat = np.array([table.row[lab] for labs in concept_labels for lab in labs if lab], dtype=np.int64)
    start = np.concatenate([[0], np.cumsum(counts)[:-1]]) if len(counts) else np.zeros(0, np.int64)
    out = np.zeros(cand.shape, dtype=np.float64)
    ci, k = np.nonzero(cand >= 0)
    if not len(ci):
        return out
    j = cand[ci, k]
    reps = counts[j]
    has = reps > 0
    ci, k, j, reps = ci[has], k[has], j[has], reps[has]
    pair = np.repeat(np.arange(len(j)), reps)
    offset = np.arange(len(pair)) - np.repeat(np.cumsum(reps) - reps, reps)
    sims = table.similarity(cat_row[ci][pair], flat[start[j][pair] + offset])
    best = np.maximum.reduceat(sims, np.cumsum(reps) - reps) if len(sims) else sims
    out[ci, k] = best
    return out
