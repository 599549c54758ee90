"""Job: map the live categories of each source onto the reference, writing scored MAPS_TO edges.

Decided edges (accepted / rejected) are never touched: a rejected concept is never proposed again for that
category, and a category with an accepted edge gets no machine edges at all.

Steps: text candidates by blocked matrix products (plus member-title candidates), fused evidence per candidate
(`features.py`), a logistic score (default weights, or a model learned with `learn.py`), parents first, then a
second pass with the depth-agreement prior learned from the first pass's most confident choices.
"""

from __future__ import annotations

import json
import logging
from collections import defaultdict
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from pipeline.errors import BadInput, NotFound, Problem
from pipeline.match.candidates import stack_side, top_k
from pipeline.match.lexical_batch import LabelTable
from pipeline.match.pools import text_pools
from pipeline.match.region_pool import extend_pools
from pipeline.match.decide import Evidence, Ranked, decide, learn_depth_prior
from pipeline.match.features import FEATURES, ScoringModel
from pipeline.match.hierarchy_view import HierarchyView
from pipeline.match.match_type import match_type
from pipeline.match.alignment import aligned_pools, aligned_vectors
from pipeline.match.neighbours import labelled_categories, neighbour_votes, stored_labels, widen_pools
from pipeline.hashing import content_hash as hash_text
from pipeline.schemes import choose_reference
from pipeline.store import Store

log = logging.getLogger(__name__)

# (category signal, concept signal, weight): path carries context, label the node's own words, gloss the
# concept's alt labels and definition.
DEFAULT_SIGNALS = (("path", "path", 0.5), ("label", "label", 0.3), ("label", "gloss", 0.2))
MODEL_KEY = "scoring_model"


@dataclass
class MapSettings:
    candidates: int = 5            # edges written per category (rank 1..k)
    auto_threshold: float | None = None  # rank-1 probability that makes an edge auto (None: stored or 0.80)
    floor: float = 0.01            # candidates below this probability get no edge
    pool: int = 25                 # text candidates scored per category
    member_pool: int = 10          # extra candidates from member item titles
    tie_margin: float = 0.02       # text-score margin for the repeated-title rule
    multi_margin: float = 0.0      # > 0 allows 1:n: a second auto edge this close to the first (off by default)
    depth_sample: float = 0.5      # share of first-pass choices the depth prior is learned from
    disabled: frozenset[str] = field(default_factory=frozenset)  # features switched off (ablation)
    region_pool: int = 10          # candidates added from under the parent's concept after the first pass (0: off)
    index_above: int | None = 20000  # references larger than this use the store's vector index (if any) for pools


def map_sources(store: Store, *, sources: list[str] | None = None, reference: str | None = None,
                settings: MapSettings | None = None, run_id: str = "",
                only: dict[str, list[str]] | None = None) -> dict:
    """Map `sources` (default all). `only`: source -> category uids to re-map alone (incremental runs); the
    other categories keep their edges and serve as parent context."""
    settings = settings or MapSettings()
    unknown_features = set(settings.disabled) - set(FEATURES)
    if unknown_features:
        raise BadInput(Problem(f"unknown feature(s) {sorted(unknown_features)}; known: {', '.join(FEATURES)}",
                               field="--without"))
    schemes = store.rows("schemes_list")
    reference = choose_reference(schemes, reference)
    all_sources = [s["key"] for s in schemes if s["role"] == "source"]
    if sources:
        unknown = [s for s in sources if s not in all_sources]
        if unknown:
            raise NotFound(f"unknown source(s): {', '.join(unknown)}; known: {', '.join(all_sources) or 'none'}")
    targets = sources or all_sources
    if not targets:
        raise NotFound("no source taxonomies in the store; ingest one with `graftwork ingest source`")
    model = load_model(store)
    threshold = settings.auto_threshold
    if threshold is None:
        stored = store.scalar("meta_get", key="auto_threshold")
        threshold = float(stored) if stored else 0.80
    concept_side = _load_side(store, "Concept", reference)
    concepts = concept_side[0]
    # the reference's labels are tokenised once for every source of the run
    label_table = LabelTable([lab for j in range(len(concepts.uids))
                              for lab in (concepts.labels[j], *concepts.alt_labels[j]) if lab], None)
    # fused concept text vectors, shared by every source's plan (10k concepts: 46 MB each)
    concept_text = fused_concept_text(concept_side[1])
    summary = {"reference": reference, "model": model.source, "auto_threshold": threshold, "sources": {}}
    plans = {}
    for key in targets:
        subset = None if only is None else only.get(key, [])
        if subset is not None and not subset:
            continue
        plans[key] = _plan(store, key, reference, concept_side, settings, model, subset, label_table,
                           concept_text)
        store.release_memory()  # what the engine allocated reading this source's vectors
    # Instance evidence: where the same item keys landed in the other sources, from this run's own first
    # choices (or the stored edges of sources not being re-mapped), so the result never depends on an earlier run.
    if "instance" not in settings.disabled and len(plans) and len(all_sources) > 1:
        tops = {u: con for plan in plans.values() for u, con in plan.first_choice().items()}
        remapped = None if only is None else [plan.cats.uids[ci] for plan in plans.values() for ci in plan.todo]
        _add_instance_votes(store, plans, tops, reference, remapped)
    for key, plan in plans.items():
        summary["sources"][key] = _write(store, plan, settings, model, threshold, run_id)
    return summary


def mapping_tags(store: Store, source: str, reference: str, pending: pd.DataFrame | None = None) -> dict[str, str]:
    """What each category's edges would be made from now: its content, the embedder, the reference version and the
    scoring model. A category whose stored `mapped_with` differs needs mapping (this survives a run killed
    half-way). `pending`: the `categories_pending` rows, when the caller has them already."""
    ref = store.rows("scheme_get", key=reference)
    ref_hash = ref[0]["content_hash"] if ref else ""
    embedder = store.scalar("meta_get", key="embedder_id") or ""
    model = store.scalar("meta_get", key=MODEL_KEY) or ""
    if pending is None:
        pending = store.frame("categories_pending", scheme=source)
    suffix = f"|{embedder}|{ref_hash}|{hash_text(model)}"
    return {u: f"{h}{suffix}" for u, h in zip(pending["uid"], pending["content_hash"])}


def fused_concept_text(cmats: dict[str, np.ndarray]) -> np.ndarray:
    """The concept side of the fused text similarity (DEFAULT_SIGNALS), one row per concept."""
    return stack_side([(cmats[b], w) for _, b, w in DEFAULT_SIGNALS])


def categories_to_map(store: Store, source: str, reference: str) -> tuple[list[str], int]:
    """Live categories of `source` whose edges are out of date, and how many live categories it has."""
    pending = store.frame("categories_pending", scheme=source)
    tags = mapping_tags(store, source, reference, pending)
    return [u for u, m in zip(pending["uid"], pending["mapped_with"]) if tags.get(u) != m], len(pending)


def load_model(store: Store) -> ScoringModel:
    stored = store.scalar("meta_get", key=MODEL_KEY)
    return ScoringModel.from_json(json.loads(stored)) if stored else ScoringModel()  # "" = forgotten


def _load_side(store: Store, kind: str, scheme: str, needed=None):
    """The hierarchy of `scheme` and its signal vectors. `needed(view)`: the uids whose vectors are used (the
    other rows stay zero), for an incremental map that touches a few categories of a large source."""
    structure = store.frame("concept_structure" if kind == "Concept" else "category_structure", scheme=scheme)
    signals = ("path", "label", "gloss") if kind == "Concept" else ("path", "label")
    uids = sorted(set(structure["uid"])) if len(structure) else []
    view = HierarchyView.from_rows(structure, order=uids)
    owners = uids if needed is None else sorted(needed(view))
    mats, embedders = {}, set()
    for sig in signals:
        vs = store.get_vectors(kind, sig, owners=owners)
        if len(vs) != len(owners):
            raise NotFound(
                f"{len(owners) - len(vs)} {kind.lower()} vectors ({sig}) missing for {scheme!r}; run `graftwork embed`"
            )
        if needed is None:
            mats[sig] = vs.matrix
        else:
            mats[sig] = np.zeros((len(uids), vs.matrix.shape[1] if len(vs) else 1), dtype=np.float32)
            pos = {u: i for i, u in enumerate(uids)}
            mats[sig][[pos[o] for o in vs.owners]] = vs.matrix
        embedders |= set(vs.embedders)
    return view, mats, embedders


@dataclass
class _Plan:
    source: str
    reference: str
    cats: HierarchyView
    concepts: HierarchyView
    ev: Evidence
    fixed: dict
    excluded: dict
    context: dict
    todo: list
    prior: np.ndarray | None
    first: list | None = None
    tags: dict = field(default_factory=dict)  # category uid -> what it is mapped with (see mapping_tag)

    def first_choice(self) -> dict[str, str]:
        out = {self.cats.uids[ci]: self.concepts.uids[j] for ci, j in self.context.items()}
        for ci in self.todo:
            rk = self.first[ci] if self.first else None
            if ci in self.fixed:
                out[self.cats.uids[ci]] = self.concepts.uids[self.fixed[ci]]
            elif rk is not None and rk.concepts:
                out[self.cats.uids[ci]] = self.concepts.uids[rk.concepts[0]]
        return out


def _plan(store: Store, source: str, reference: str, concept_side, settings: MapSettings, model: ScoringModel,
          subset: list[str] | None, label_table: LabelTable | None = None,
          concept_text: np.ndarray | None = None) -> _Plan:
    concepts, cmats, c_emb = concept_side
    needed = None
    if subset is not None:
        # Only the categories being mapped, and the labelled ones (neighbour votes, alignment), use vectors.
        stored = stored_labels(store.scalar("meta_get", key=MODEL_KEY), source, reference)
        decided = store.frame("decided_edges", source=source, reference=reference)
        accepted = set(decided["category"][decided["status"] == "accepted"]) if len(decided) else set()

        def needed(view: HierarchyView) -> set[str]:
            labelled = {u for u, code in zip(view.uids, view.codes) if code in stored} | accepted
            return (set(subset) | labelled) & set(view.uids)
    cats, qmats, q_emb = _load_side(store, "Category", source, needed)
    if cats.uids and (c_emb != q_emb or len(c_emb) != 1):
        raise NotFound(f"vectors of {source!r} and {reference!r} come from different embedders "
                       f"({sorted(c_emb | q_emb)}); run `graftwork embed` again")
    kpos = {u: i for i, u in enumerate(cats.uids)}
    cpos = {u: i for i, u in enumerate(concepts.uids)}
    todo = list(range(len(cats.uids))) if subset is None else sorted(kpos[u] for u in subset if u in kpos)
    if concept_text is None:
        concept_text = fused_concept_text(cmats)
    ev, fixed, excluded = _evidence_for(store, source, reference, cats, concepts, qmats, cmats, concept_text,
                                        settings, todo, kpos, cpos)
    ev.label_table = label_table
    context = dict(fixed)
    for ci, js in (ev.labelled or {}).items():
        context.setdefault(ci, js[0])  # a labelled category is parent context for its children
    if subset is not None:
        # Incremental: the categories not re-mapped keep their current choice as parent context.
        live = store.frame("live_top_edges", source=source, reference=reference)
        todo_set = set(todo)
        for cat, con in zip(live.get("category", []), live.get("concept", [])):
            if cat in kpos and con in cpos and kpos[cat] not in todo_set:
                context.setdefault(kpos[cat], cpos[con])
    plan = _Plan(source, reference, cats, concepts, ev, fixed, excluded, context, todo, None)
    plan.tags = mapping_tags(store, source, reference)
    prior_key = f"depth_prior:{source}"
    if subset is None:
        first = decide(cats, concepts, ev, model, disabled=settings.disabled, excluded=excluded, fixed_top=context,
                       tie_margin=settings.tie_margin, only=todo)
        if "depth" not in settings.disabled and cats.uids:
            plan.prior = learn_depth_prior(cats, concepts, first, sample=settings.depth_sample)
            store.run("meta_set", key=prior_key, value=json.dumps(plan.prior.round(6).tolist()))
    else:
        first = None
        stored = store.scalar("meta_get", key=prior_key)
        plan.prior = _fit_prior(np.array(json.loads(stored)), cats, concepts) if stored else None
    if settings.region_pool > 0 and cats.uids:
        tops = dict(context)
        for ci, rk in enumerate(first or []):
            if rk is not None and rk.concepts:
                tops.setdefault(ci, rk.concepts[0])
        extend_pools(ev.pools, cats, concepts, tops, ev.q_text, ev.r_text, todo, per_category=settings.region_pool)
    if cats.uids:
        plan.first = decide(cats, concepts, ev, model, disabled=settings.disabled, depth_prior=plan.prior,
                            excluded=excluded, fixed_top=context, tie_margin=settings.tie_margin, only=todo)
    return plan


def _add_instance_votes(store: Store, plans: dict[str, _Plan], tops: dict[str, str], reference: str,
                        remapped: list[str] | None = None) -> None:
    """Votes for the categories being mapped; `remapped`: their uids, when only some are (an incremental run
    then reads the shared items of those alone)."""
    pairs = (store.frame("shared_category_pairs") if remapped is None
             else store.frame("shared_category_pairs_of", uids=sorted(remapped)))
    if pairs.empty:
        return
    if any(u not in tops for u in pairs["other"]):
        # Categories of sources not in this run: their stored live edges.
        for s in {u.split(":", 1)[0] for u in pairs["other"] if u not in tops}:
            live = store.frame("live_top_edges", source=s, reference=reference)
            for cat, con in zip(live.get("category", []), live.get("concept", [])):
                tops.setdefault(cat, con)
    pairs = pairs.assign(top=pairs["other"].map(tops)).dropna(subset=["top"])
    for plan in plans.values():
        kpos = pd.Series(range(len(plan.cats.uids)), index=plan.cats.uids)
        cpos = pd.Series(range(len(plan.concepts.uids)), index=plan.concepts.uids)
        mine = pairs[pairs["category"].isin(kpos.index) & pairs["top"].isin(cpos.index)]
        # each category's shared items, tallied by the concept their other copy's category landed on
        tally = mine.groupby(["category", "top"], sort=True)["items"].sum().astype(float).reset_index()
        tally["share"] = tally["items"] / tally.groupby("category")["items"].transform("sum")
        votes: dict[int, dict[int, float]] = defaultdict(dict)
        for cat, top, share in zip(kpos[tally["category"]].tolist(), cpos[tally["top"]].tolist(), tally["share"]):
            if share > 0:
                votes[cat][top] = float(share)
                if top not in plan.ev.pools[cat]:
                    plan.ev.pools[cat].append(top)
        plan.ev.votes = votes or None


def _write(store: Store, plan: _Plan, settings: MapSettings, model: ScoringModel, threshold: float,
           run_id: str) -> dict:
    cats, concepts = plan.cats, plan.concepts
    if not cats.uids:
        return {"categories": 0, "auto": 0, "proposed": 0, "unmapped": 0, "decided": 0}
    ranked = plan.first
    if plan.ev.votes:
        ranked = decide(cats, concepts, plan.ev, model, disabled=settings.disabled, depth_prior=plan.prior,
                        excluded=plan.excluded, fixed_top=plan.context, tie_margin=settings.tie_margin,
                        only=plan.todo)
    rows, counts = _edge_rows(cats, concepts, ranked, plan.todo, plan.fixed, settings, threshold, model, run_id)
    with store.transaction():
        store.run("machine_edges_clear", uids=[cats.uids[ci] for ci in plan.todo], reference=plan.reference)
        if rows:
            store.bulk("machine_edges_create", pd.DataFrame(rows))
        if plan.todo:
            from pipeline.review.events import record_machine_edges  # the audit trail of every edge

            uids = [cats.uids[ci] for ci in plan.todo]
            counts["history"] = record_machine_edges(store, rows, run_id, categories=uids)
            store.bulk("categories_mark_mapped", pd.DataFrame({"uid": uids, "tag": [plan.tags.get(u, "") for u in uids]}))
    counts["categories"] = len(plan.todo)
    log.info("mapped %s: %s", plan.source, counts)
    return counts


def _fit_prior(prior: np.ndarray, cats: HierarchyView, concepts: HierarchyView) -> np.ndarray:
    """A stored prior padded to today's depths (new deeper levels get the neutral value)."""
    need = (max(cats.depth, default=1) + 1, max(concepts.depth, default=1) + 1)
    out = np.full((max(need[0], prior.shape[0]), max(need[1], prior.shape[1])), 0.5)
    out[: prior.shape[0], : prior.shape[1]] = prior
    return out


def _evidence_for(store, source, reference, cats, concepts, qmats, cmats, r, settings, todo, kpos, cpos):
    q = stack_side([(qmats[a], w) for a, _, w in DEFAULT_SIGNALS])
    pools, how = text_pools(store, q, r, todo, settings.pool, concept_uids=concepts.uids,
                            signal_queries={b: qmats[a] for a, b, _ in DEFAULT_SIGNALS},
                            index_above=settings.index_above)
    log.info("candidate pools of %s categories: %s search", len(todo), how)
    # Only the categories being mapped use their members vector (an incremental run maps a few).
    members = store.get_vectors("Category", "members", owners=[cats.uids[ci] for ci in todo])
    mem_matrix = None
    if len(members) and "members" not in settings.disabled:
        mem_matrix = np.zeros((len(cats.uids), members.matrix.shape[1]), dtype=np.float32)
        for owner, vec in zip(members.owners, members.matrix):
            mem_matrix[kpos[owner]] = vec
        with_members = [ci for ci in todo if np.any(mem_matrix[ci])]
        if with_members and settings.member_pool > 0:
            midx, _ = top_k(mem_matrix[with_members], cmats["gloss"], settings.member_pool)
            for row, ci in enumerate(with_members):
                pools[ci] = list(dict.fromkeys(pools[ci] + [int(j) for j in midx[row]]))
    decided = store.frame("decided_edges", source=source, reference=reference)
    excluded: dict[int, set[int]] = defaultdict(set)
    fixed: dict[int, int] = {}
    for cat, con, status in zip(decided.get("category", []), decided.get("concept", []), decided.get("status", [])):
        if cat in kpos and con in cpos:
            if status == "rejected":
                excluded[kpos[cat]].add(cpos[con])
            else:
                fixed[kpos[cat]] = cpos[con]
    signals = {b if a == "label" and b == "gloss" else a: (qmats[a], cmats[b]) for a, b, _ in DEFAULT_SIGNALS}
    mix = {b if a == "label" and b == "gloss" else a: w for a, b, w in DEFAULT_SIGNALS}
    ev = Evidence(pools=pools, q_text=q, r_text=r, members=mem_matrix, concept_gloss=cmats["gloss"],
                  signals=signals, text_mix=mix, decided=dict(fixed))
    ev.labelled = labelled_categories(
        (decided.get("category", []), decided.get("concept", []), decided.get("status", [])),
        stored_labels(store.scalar("meta_get", key=MODEL_KEY), source, reference), cats.codes, concepts.codes,
        kpos, cpos)
    if "neighbours" not in settings.disabled and ev.labelled:
        ev.neighbours = neighbour_votes(q, ev.labelled, todo)
        widen_pools(pools, ev.neighbours)
    if "aligned" not in settings.disabled and ev.labelled:
        ev.aligned = aligned_vectors(q, r, ev.labelled, todo)
        if ev.aligned is not None:
            widen_pools(pools, aligned_pools(ev.aligned, r, todo))
    return ev, fixed, excluded


_EVIDENCE_ORDER = sorted(range(len(FEATURES)), key=lambda k: FEATURES[k])
_EVIDENCE_TEXT = "{" + ", ".join(f'"{FEATURES[k]}": %r' for k in _EVIDENCE_ORDER) + "}"


def _evidence_json(f: np.ndarray) -> str:
    """The features as a JSON object, keys sorted, values rounded to 4 places (json.dumps would give the same text
    at a few times the cost, on every edge of every run)."""
    return _EVIDENCE_TEXT % tuple(round(v, 4) for v in f[_EVIDENCE_ORDER].tolist())


def _edge_rows(cats, concepts, ranked: list[Ranked], todo, fixed, settings, threshold, model, run_id):
    anc = concepts.ancestors()
    top = {ci: fixed.get(ci, ranked[ci].concepts[0] if ranked[ci] and ranked[ci].concepts else None)
           for ci in todo}
    family_top: dict[tuple[int, int], int] = defaultdict(int)  # (parent, concept) -> children landing there
    for ci, j in top.items():
        for p in cats.parents[ci]:
            if j is not None:
                family_top[(p, j)] += 1
    rows = []
    counts = {"auto": 0, "proposed": 0, "unmapped": 0, "decided": 0, "multi": 0}
    for ci in todo:
        if ci in fixed:
            counts["decided"] += 1
            continue
        rk = ranked[ci]
        kept = [(j, p, f) for j, p, f in zip(rk.concepts, rk.probs, rk.features) if p >= settings.floor]
        kept = kept[: settings.candidates]
        if not kept:
            counts["unmapped"] += 1
            continue
        statuses = ["auto" if kept[0][1] >= threshold else "proposed"] + ["proposed"] * (len(kept) - 1)
        if statuses[0] == "auto" and settings.multi_margin > 0:
            # 1:n: another concept in a different branch, nearly as likely and itself above the threshold.
            for n, (j, p, _) in enumerate(kept[1:], start=1):
                jb = kept[0][0]
                if p >= threshold and p >= kept[0][1] - settings.multi_margin and j not in anc[jb] and jb not in anc[j]:
                    statuses[n] = "auto"
        split = statuses.count("auto") > 1
        counts[statuses[0]] += 1
        counts["multi"] += split
        for rank, ((j, p, f), status) in enumerate(zip(kept, statuses), start=1):
            shared = any(p_ == j for p_ in (top.get(pp) for pp in cats.parents[ci])) or any(
                family_top[(pp, j)] > 1 for pp in cats.parents[ci])
            rows.append({
                "category": cats.uids[ci],
                "concept": concepts.uids[j],
                "score": round(float(p), 6),
                "rank": rank,
                "match_type": match_type(cats.labels[ci], [concepts.labels[j], *concepts.alt_labels[j]],
                                         shared_with_family=shared, split=split and status == "auto"),
                "status": status,
                "method": f"fused:{model.source}",
                "evidence": _evidence_json(f),
                "run_id": run_id,
            })
    return rows, counts
