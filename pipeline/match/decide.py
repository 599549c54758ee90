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
from pipeline.match.lexical_batch import LabelTable, pool_lexical
from pipeline.match.lexical_overlap import word_weights

T, LEX, MEM, PAR, DEP, INS, SIG_PATH, SIG_LABEL, SIG_GLOSS, ROLE, SIB, NEI, ALI = (FEATURES.index(f) for f in FEATURES)


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
    lexical_cache: dict | None = None      # the pools' lexical overlap, shared by the passes
    word_weights: dict | None = None
    text_mix: dict[str, float] | None = None  # text = sum of weight * signal cosine (the weights of stack_signals)
    label_table: "LabelTable | None" = None  # tokenised labels shared by the sources of one run
    decided: dict[int, int] | None = None  # category -> concept of a person's accepted edge (the siblings feature)
    labelled: dict[int, list[int]] | None = None  # category -> concepts: accepted edges and stored labels
    neighbours: dict[int, dict[int, float]] | None = None  # category -> concept -> labelled look-alikes' vote
    aligned: np.ndarray | None = None       # category text vectors moved by the map fitted on labelled pairs


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
    that are decided or not being re-ranked, used as parent context.

    One level of the source tree at a time, so every category sees its parents' choices; within a level the
    features of all its categories are computed as arrays (blocks of BLOCK categories)."""
    fixed_top = fixed_top or {}
    n = len(cats.uids)
    cand = _candidates(ev, excluded or {})
    lex = _lexical(ev, cats, concepts, cand)
    rel = _Relations(concepts)
    region = [concepts.region(j) for j in range(len(concepts.uids))]
    votes = _vote_lookup(ev.votes, len(concepts.uids))
    near = _vote_lookup(ev.neighbours, len(concepts.uids))
    # siblings with a label (a person's accepted edge, or a pair `map --learn` was given) pull the family
    labelled = {ci: js[0] for ci, js in ev.labelled.items()} if ev.labelled else (ev.decided or {})
    family = _decided_siblings(cats, labelled, region)
    c_depth = np.array(concepts.depth, dtype=np.int64)
    c_leaf = np.array(concepts.is_leaf, dtype=bool)
    chosen = np.full(n, -1, dtype=np.int64)
    for ci, j in fixed_top.items():
        chosen[ci] = j
    out: list[Ranked | None] = [None] * n
    todo = np.zeros(n, dtype=bool)
    todo[list(range(n)) if only is None else list(only)] = True
    depth = np.array(cats.depth, dtype=np.int64)
    for level in np.unique(depth[todo]):
        rows_all = np.nonzero(todo & (depth == level))[0]
        for lo in range(0, len(rows_all), BLOCK):
            rows = rows_all[lo:lo + BLOCK]
            c = cand[rows]
            # pools are left-packed: trim to this block's longest, so one long pool does not widen every block
            c = c[:, : max(int((c >= 0).sum(axis=1).max()), 1)]
            valid = c >= 0
            f = _features(rows, c, valid, ev, cats, lex, rel, region, chosen, votes, depth_prior, c_depth, c_leaf,
                          family, near)
            level_model = model.for_depth(int(level))
            margin = tie_margin * _text_weight(level_model)
            logits = level_model.logit(f.reshape(-1, len(FEATURES)), disabled).reshape(c.shape)
            logits = np.where(valid, logits, -np.inf)
            order = np.lexsort((np.where(valid, c, np.iinfo(np.int64).max), -logits), axis=1)
            _repeated_titles(order, c, logits, rows, cats, rel, c_leaf, c_depth, margin, depth_prior)
            probs = 1.0 / (1.0 + np.exp(-logits))
            for r, ci in enumerate(rows):
                k = order[r, : int(valid[r].sum())]
                if not len(k):
                    out[ci] = Ranked([], [], np.zeros((0, len(FEATURES))))
                    continue
                # a repeated-title winner takes its group's best score, so ranks stay ordered
                ranked_probs = [float(probs[r, valid[r]].max())] + probs[r, k[1:]].tolist()
                out[ci] = Ranked(c[r, k].tolist(), ranked_probs, f[r, k])
                chosen[ci] = fixed_top.get(ci, int(c[r, k[0]]))
    return out  # type: ignore[return-value]


BLOCK = 512  # categories whose features are held at once (block x pool x vector width floats)


def _candidates(ev: Evidence, excluded: dict[int, set[int]]) -> np.ndarray:
    """Pools as a padded array (-1 = none), with rejected concepts taken out, order kept."""
    width = max((len(p) for p in ev.pools), default=0) or 1
    cand = np.full((len(ev.pools), width), -1, dtype=np.int64)
    for ci, pool in enumerate(ev.pools):
        keep = [j for j in pool if j not in excluded.get(ci, ())] if ci in excluded else pool
        cand[ci, : len(keep)] = keep
    return cand


def _lexical(ev: Evidence, cats: HierarchyView, concepts: HierarchyView, cand: np.ndarray) -> np.ndarray:
    """Lexical overlap of every pool pair. Pairs seen by an earlier pass over the same Evidence are reused (a later
    pass adds the concepts voted for by shared items to the pools, and a few pairs only are new)."""
    if ev.word_weights is None:
        ev.word_weights = word_weights([*cats.labels, *concepts.labels])
    cache = ev.lexical_cache or {}
    if "table" not in cache:
        labels = [[concepts.labels[j], *concepts.alt_labels[j]] for j in range(len(concepts.uids))]
        concept_labels = [lab for labs in labels for lab in labs if lab]
        base = ev.label_table if ev.label_table is not None else LabelTable(concept_labels, None)
        cache.update(table=base.extended([*cats.labels, *concept_labels], ev.word_weights), labels=labels,
                     keys=np.zeros(0, np.int64), values=np.zeros(0))
    m = len(concepts.uids)
    keys = np.where(cand >= 0, np.arange(len(cand))[:, None] * m + cand, -1)
    at = np.minimum(np.searchsorted(cache["keys"], keys), max(len(cache["keys"]) - 1, 0))
    known = (cand >= 0) & (cache["keys"][at] == keys) if len(cache["keys"]) else np.zeros(cand.shape, dtype=bool)
    lex = np.where(known, cache["values"][at] if len(cache["keys"]) else 0.0, 0.0)
    missing = (cand >= 0) & ~known
    if missing.any():
        fresh = pool_lexical(cats.labels, cache["labels"], np.where(missing, cand, -1), ev.word_weights,
                             table=cache["table"])
        lex = np.where(missing, fresh, lex)
        all_keys = np.concatenate([cache["keys"], keys[missing]])
        all_values = np.concatenate([cache["values"], fresh[missing]])
        order = np.argsort(all_keys, kind="stable")
        cache["keys"], cache["values"] = all_keys[order], all_values[order]
    ev.lexical_cache = cache
    return lex


class _Relations:
    """Ancestor-or-descendant tests on concept pairs as sorted int64 keys (descendant * n + ancestor)."""

    def __init__(self, concepts: HierarchyView):
        anc = concepts.ancestors()
        self.n = len(concepts.uids)
        keys = [d * self.n + a for d, ups in enumerate(anc) for a in ups]
        self.keys = np.array(sorted(keys), dtype=np.int64)

    def is_ancestor(self, a: np.ndarray, d: np.ndarray) -> np.ndarray:
        """a[i] is a strict ancestor of d[i] (both >= 0)."""
        if not len(self.keys):
            return np.zeros(np.shape(a), dtype=bool)
        k = np.asarray(d, dtype=np.int64) * self.n + np.asarray(a, dtype=np.int64)
        at = np.minimum(np.searchsorted(self.keys, k), len(self.keys) - 1)
        return self.keys[at] == k


def _vote_lookup(votes: dict[int, dict[int, float]] | None, n_concepts: int):
    if not votes:
        return None
    keys = np.array([ci * n_concepts + j for ci, vs in votes.items() for j in vs], dtype=np.int64)
    vals = np.array([v for vs in votes.values() for v in vs.values()], dtype=np.float64)
    order = np.argsort(keys)
    return keys[order], vals[order], n_concepts


def _gather_dot(queries: np.ndarray, refs: np.ndarray, rows: np.ndarray, c: np.ndarray) -> np.ndarray:
    """queries[rows[r]] . refs[c[r, k]] for every (r, k); padding (-1) reads row 0 and is masked later."""
    return np.einsum("rkd,rd->rk", refs[np.maximum(c, 0)], queries[rows])


def _decided_siblings(cats: HierarchyView, decided: dict[int, int], region: list[list[int]]) -> dict[int, list]:
    """Category -> [(region root, weight)] from its decided siblings, each sibling weighing 1 / their number."""
    if not decided:
        return {}
    children: dict[int, list[int]] = {}
    for ci, ps in enumerate(cats.parents):
        for p in ps:
            children.setdefault(p, []).append(ci)
    out: dict[int, list] = {}
    for ci, ps in enumerate(cats.parents):
        sibs = {s for p in ps for s in children.get(p, ()) if s != ci and s in decided}
        if sibs:
            out[ci] = [(a, 1.0 / len(sibs)) for s in sorted(sibs) for a in region[decided[s]][:1]]
    return out


def _features(rows, c, valid, ev, cats, lex, rel, region, chosen, votes, depth_prior, c_depth, c_leaf, family,
              near=None):
    b, width = c.shape
    f = np.empty((b, width, len(FEATURES)))
    safe = np.maximum(c, 0)
    for col, name in ((SIG_PATH, "path"), (SIG_LABEL, "label"), (SIG_GLOSS, "gloss")):
        if ev.signals and name in ev.signals:
            qm, rm = ev.signals[name]
            f[:, :, col] = _gather_dot(qm, rm, rows, c)
    if ev.text_mix and ev.signals and all(name in ev.signals for name in ev.text_mix):
        # the fused cosine is the weighted sum of the signal cosines: no need to gather the stacked vectors
        cols = {"path": SIG_PATH, "label": SIG_LABEL, "gloss": SIG_GLOSS}
        f[:, :, T] = sum(w * f[:, :, cols[name]] for name, w in ev.text_mix.items())
    else:
        f[:, :, T] = _gather_dot(ev.q_text, ev.r_text, rows, c)
    for col, name in ((SIG_PATH, "path"), (SIG_LABEL, "label"), (SIG_GLOSS, "gloss")):
        if not (ev.signals and name in ev.signals):
            f[:, :, col] = f[:, :, T]
    f[:, :, LEX] = lex[rows, :width]
    f[:, :, ALI] = _gather_dot(ev.aligned, ev.r_text, rows, c) if ev.aligned is not None else f[:, :, T]
    f[:, :, MEM] = f[:, :, T]
    if ev.members is not None and ev.concept_gloss is not None:
        has = np.any(ev.members[rows] != 0, axis=1)
        if has.any():
            f[has, :, MEM] = _gather_dot(ev.members, ev.concept_gloss, rows[has], c[has])
    # the region a child should land in (HierarchyView.region of its parent's concept)
    f[:, :, PAR] = NEUTRAL["parent"]
    owner, tops = [], []
    for r, ci in enumerate(rows):
        for p in cats.parents[ci]:
            if chosen[p] >= 0:
                for a in region[chosen[p]]:
                    owner.append(r)
                    tops.append(a)
    if owner:
        owner_a, tops_a = np.array(owner), np.array(tops)
        with_parent = np.unique(owner_a)
        f[with_parent, :, PAR] = 0.0
        under = (tops_a[:, None] == c[owner_a]) | rel.is_ancestor(np.broadcast_to(tops_a[:, None], c[owner_a].shape),
                                                                  safe[owner_a])
        hit = np.zeros((b, width), dtype=bool)
        np.logical_or.at(hit, owner_a, under)
        f[with_parent, :, PAR] = hit[with_parent]
    cat_depth = np.array([cats.depth[ci] for ci in rows])
    f[:, :, DEP] = depth_prior[cat_depth[:, None], c_depth[safe]] if depth_prior is not None else NEUTRAL["depth"]
    cat_leaf = np.array([cats.is_leaf[ci] for ci in rows], dtype=bool)
    f[:, :, ROLE] = (c_leaf[safe] == cat_leaf[:, None]).astype(np.float64)
    f[:, :, SIB] = NEUTRAL["siblings"]
    if family:
        owner, tops, weight = [], [], []
        for r, ci in enumerate(rows):
            for a, w in family.get(ci, ()):
                owner.append(r)
                tops.append(a)
                weight.append(w)
        if owner:
            owner_a, tops_a = np.array(owner), np.array(tops)
            under = (tops_a[:, None] == c[owner_a]) | rel.is_ancestor(
                np.broadcast_to(tops_a[:, None], c[owner_a].shape), safe[owner_a])
            share = np.zeros((b, width))
            np.add.at(share, owner_a, under * np.array(weight)[:, None])
            f[:, :, SIB] = share
    f[:, :, INS] = _looked_up(votes, rows, safe, valid)
    f[:, :, NEI] = _looked_up(near, rows, safe, valid)
    return f


def _looked_up(lookup, rows, safe, valid) -> np.ndarray | float:
    """Values of a `_vote_lookup` table for every (row, candidate); 0 where it has none."""
    if lookup is None:
        return 0.0
    keys, vals, n_concepts = lookup
    k = rows[:, None].astype(np.int64) * n_concepts + safe
    at = np.minimum(np.searchsorted(keys, k), len(keys) - 1)
    return np.where((keys[at] == k) & valid, vals[at], 0.0)


def _text_weight(model: ScoringModel) -> float:
    return max(model.weights.get("text", 0.0) + model.weights.get("aligned", 0.0), 1e-6)


def _repeated_titles(order, c, logits, rows, cats, rel, c_leaf, c_depth, margin, depth_prior) -> None:
    """Among the best candidate and its ancestors or descendants within `margin` of its logit, a leaf category
    takes the most specific concept, and an inner category an inner one at the level its peers usually land on
    (the learned depth prior; the deepest before it is learned). Rewrites `order` rows in place."""
    r_idx = np.arange(len(rows))
    best = order[:, 0]
    jb = c[r_idx, best]
    ranked_c = np.take_along_axis(c, order, axis=1)
    ranked_l = np.take_along_axis(logits, order, axis=1)
    safe = np.maximum(ranked_c, 0)
    jb_safe = np.broadcast_to(np.maximum(jb, 0)[:, None], safe.shape)
    close = (ranked_c >= 0) & (ranked_l >= ranked_l[:, :1] - margin)
    close[:, 0] = False
    related = rel.is_ancestor(safe, jb_safe) | rel.is_ancestor(jb_safe, safe)
    group = close & related & (jb[:, None] >= 0)
    for r in np.nonzero(group.any(axis=1))[0]:
        members = [0, *np.nonzero(group[r])[0].tolist()]
        ci = rows[r]
        want_leaf = cats.is_leaf[ci]

        def level(m: int) -> float:
            d = int(c_depth[ranked_c[r, m]])
            return float(depth_prior[cats.depth[ci], d]) if depth_prior is not None and not want_leaf else d

        win = max(members, key=lambda m: (bool(c_leaf[ranked_c[r, m]]) == want_leaf, level(m), ranked_l[r, m]))
        if win:
            row = order[r].tolist()
            w = row.pop(win)
            order[r] = [w, *row]


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
