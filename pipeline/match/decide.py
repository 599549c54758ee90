"""Score every candidate of every category with the fused evidence, parents first, and pick the order.

Categories are visited top-down so a child sees the concept chosen for its parent (the `parent` feature). After
scoring, a reference that repeats a title at several levels is handled: among a top candidate and its ancestors or
descendants within `tie_margin` of text score, a leaf category takes the most specific concept and an inner
category an inner one.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from pipeline.match.features import FEATURES, NEUTRAL, ScoringModel
from pipeline.match.hierarchy_view import HierarchyView
from pipeline.match.lexical_overlap import lexical_similarity, word_weights

T, LEX, MEM, PAR, DEP, INS, SIG_PATH, SIG_LABEL, SIG_GLOSS, ROLE = (FEATURES.index(f) for f in FEATURES)


@dataclass
class Evidence:
    """What the decision step needs besides the two hierarchies."""

    pools: list[list[int]]                 # candidate concept indices per category
    q_text: np.ndarray                     # fused category text vectors (rows = categories)
    r_text: np.ndarray                     # fused concept text vectors (rows = concepts)
    members: np.ndarray | None = None      # category member-title mean vectors (zero row = no members)
    concept_gloss: np.ndarray | None = None
    votes: dict[int, dict[int, float]] | None = None  # category -> concept -> share of shared items there
    signals: dict[str, tuple[np.ndarray, np.ndarray]] | None = None  # path/label/gloss: (category, concept) matrices
    lexical_cache: dict | None = None      # (category, concept) -> lexical overlap, shared by the passes
    word_weights: dict | None = None


@dataclass
class Ranked:
    concepts: list[int]
    probs: list[float]
    features: np.ndarray  # rows in `concepts` order, columns in FEATURES order


def decide(cats: HierarchyView, concepts: HierarchyView, ev: Evidence, model: ScoringModel, *,
           disabled: frozenset[str] = frozenset(), depth_prior: np.ndarray | None = None,
           excluded: dict[int, set[int]] | None = None, fixed_top: dict[int, int] | None = None,
           tie_margin: float = 0.02, only: list[int] | None = None) -> list[Ranked]:
    """Rank the candidates of the categories in `only` (default all); `fixed_top` gives the concept of categories
    that are decided or not being re-ranked, used as parent context."""
    excluded = excluded or {}
    fixed_top = fixed_top or {}
    anc = concepts.ancestors()
    concept_labels = [[concepts.labels[j], *concepts.alt_labels[j]] for j in range(len(concepts.uids))]
    if ev.lexical_cache is None:
        ev.lexical_cache = {}
        ev.word_weights = word_weights([*cats.labels, *concepts.labels])
    lex_cache, weights = ev.lexical_cache, ev.word_weights
    c_depth = np.array(concepts.depth)
    region = [[j] if not concepts.is_leaf[j] or not concepts.parents[j] else list(concepts.parents[j])
              for j in range(len(concepts.uids))]
    chosen: dict[int, int] = {}
    out: list[Ranked | None] = [None] * len(cats.uids)
    has_members = ev.members is not None and ev.concept_gloss is not None
    chosen.update(fixed_top)
    todo = set(range(len(cats.uids))) if only is None else set(only)
    for ci in cats.top_down():
        if ci not in todo:
            continue
        cand = [j for j in ev.pools[ci] if j not in excluded.get(ci, ())]
        if not cand:
            out[ci] = Ranked([], [], np.zeros((0, len(FEATURES))))
            continue
        idx = np.array(cand)
        f = np.empty((len(cand), len(FEATURES)))
        f[:, T] = ev.r_text[idx] @ ev.q_text[ci]
        for k, j in enumerate(cand):
            # Lexical overlap does not change between passes: computed once per pair.
            if (ci, j) not in lex_cache:
                lex_cache[(ci, j)] = max((lexical_similarity(cats.labels[ci], lab, weights)
                                          for lab in concept_labels[j] if lab), default=0.0)
            f[k, LEX] = lex_cache[(ci, j)]
        if has_members and np.any(ev.members[ci]):
            f[:, MEM] = ev.concept_gloss[idx] @ ev.members[ci]
        else:
            f[:, MEM] = f[:, T]
        # The region a child should land in: the parent's concept, or, when that concept is a leaf of the
        # reference (a deeper source mapped into a coarser reference), the leaf's own parent, so siblings count.
        parent_tops = [a for p in cats.parents[ci] if p in chosen for a in region[chosen[p]]]
        if parent_tops:
            f[:, PAR] = [1.0 if any(p == j or p in anc[j] for p in parent_tops) else 0.0 for j in cand]
        else:
            f[:, PAR] = NEUTRAL["parent"]
        f[:, DEP] = depth_prior[cats.depth[ci], c_depth[idx]] if depth_prior is not None else NEUTRAL["depth"]
        for col, name in ((SIG_PATH, "path"), (SIG_LABEL, "label"), (SIG_GLOSS, "gloss")):
            if ev.signals and name in ev.signals:
                qm, rm = ev.signals[name]
                f[:, col] = rm[idx] @ qm[ci]
            else:
                f[:, col] = f[:, T]
        f[:, ROLE] = [1.0 if concepts.is_leaf[j] == cats.is_leaf[ci] else 0.0 for j in cand]
        votes = (ev.votes or {}).get(ci, {})
        f[:, INS] = [votes.get(j, 0.0) for j in cand]
        logits = model.logit(f, disabled)
        order = sorted(range(len(cand)), key=lambda k: (-logits[k], cand[k]))
        order = _repeated_titles(order, cand, f, logits, ci, cats, concepts, anc, tie_margin * _text_weight(model))
        probs = 1.0 / (1.0 + np.exp(-logits))
        top_prob = probs.max()  # a repeated-title winner takes its group's best score, so ranks stay ordered
        ranked_probs = [float(top_prob)] + [float(probs[k]) for k in order[1:]]
        out[ci] = Ranked([cand[k] for k in order], ranked_probs, f[order])
        chosen[ci] = fixed_top.get(ci, cand[order[0]])
    return out  # type: ignore[return-value]


def _text_weight(model: ScoringModel) -> float:
    return max(model.weights.get("text", 0.0), 1e-6)


def _repeated_titles(order, cand, f, logits, ci, cats, concepts, anc, logit_margin):
    best = order[0]
    jb = cand[best]
    group = [best] + [
        k for k in order[1:]
        if logits[k] >= logits[best] - logit_margin and (cand[k] in anc[jb] or jb in anc[cand[k]])
    ]
    if len(group) == 1:
        return order
    want_leaf = cats.is_leaf[ci]
    winner = max(group, key=lambda k: (concepts.is_leaf[cand[k]] == want_leaf, concepts.depth[cand[k]], logits[k]))
    return [winner] + [k for k in order if k != winner]


def learn_depth_prior(cats: HierarchyView, concepts: HierarchyView, ranked: list[Ranked], *,
                      sample: float = 0.5) -> np.ndarray:
    """P(concept depth | category depth) from the most confident first-pass choices, scaled so the most likely
    depth of each row is 1 (Laplace-smoothed). Where the hierarchies line up level by level this favours the same
    level; where a deep source maps into a coarser reference, the reference's usual target level."""
    max_c, max_k = max(cats.depth, default=1), max(concepts.depth, default=1)
    counts = np.ones((max_c + 1, max_k + 1))
    counts[:, 0] = 0
    firsts = sorted(((rk.probs[0], ci, rk.concepts[0]) for ci, rk in enumerate(ranked) if rk.concepts),
                    reverse=True)
    for _, ci, j in firsts[: max(1, int(len(firsts) * sample))]:
        counts[cats.depth[ci], concepts.depth[j]] += 1
    prob = counts / np.maximum(counts.sum(axis=1, keepdims=True), 1)
    return prob / np.maximum(prob.max(axis=1, keepdims=True), 1e-12)
