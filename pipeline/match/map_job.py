"""Job: map every live category of each source onto the reference, writing scored MAPS_TO edges.

Decided edges (accepted / rejected) are never touched: a rejected concept is never proposed again for that
category, and a category with an accepted edge gets no machine edges at all.
"""

from __future__ import annotations

import json
import logging
from collections import defaultdict
from dataclasses import dataclass

import numpy as np
import pandas as pd

from pipeline.errors import BadInput, NotFound, Problem
from pipeline.match.candidates import stack_signals, top_k
from pipeline.match.hierarchy_view import HierarchyView
from pipeline.match.match_type import match_type
from pipeline.match.rank import RankSettings, learn_depth_prior, rerank
from pipeline.store import Store

log = logging.getLogger(__name__)

# (category signal, concept signal, weight): path carries context, label the node's own words, gloss the
# concept's alt labels and definition.
DEFAULT_SIGNALS = (("path", "path", 0.5), ("label", "label", 0.3), ("label", "gloss", 0.2))


@dataclass
class MapSettings:
    candidates: int = 5          # edges written per category (rank 1..k)
    auto_threshold: float = 0.80  # rank-1 score at or above this -> status auto
    floor: float = 0.30          # candidates below this get no edge
    pool: int = 25               # text candidates re-ranked by the hierarchy rules
    parent_bonus: float = 0.05
    tie_margin: float = 0.02
    depth_weight: float = 0.10


def map_sources(store: Store, *, sources: list[str] | None = None, reference: str | None = None,
                settings: MapSettings | None = None, run_id: str = "") -> dict:
    settings = settings or MapSettings()
    schemes = store.rows("schemes_list")
    reference = _pick_reference(schemes, reference)
    all_sources = [s["key"] for s in schemes if s["role"] == "source"]
    if sources:
        unknown = [s for s in sources if s not in all_sources]
        if unknown:
            raise NotFound(f"unknown source(s): {', '.join(unknown)}; known: {', '.join(all_sources) or 'none'}")
    targets = sources or all_sources
    if not targets:
        raise NotFound("no source taxonomies in the store; ingest one with `graftwork ingest source`")
    concept_side = _load_side(store, "Concept", reference)
    summary = {"reference": reference, "sources": {}}
    for key in targets:
        summary["sources"][key] = _map_one(store, key, reference, concept_side, settings, run_id)
    return summary


def _pick_reference(schemes: list[dict], reference: str | None) -> str:
    refs = [s["key"] for s in schemes if s["role"] == "reference"]
    if reference:
        if reference not in refs:
            raise NotFound(f"no reference scheme {reference!r}; known: {', '.join(refs) or 'none'}")
        return reference
    if not refs:
        raise NotFound("no reference hierarchy in the store; ingest one with `graftwork ingest reference`")
    if len(refs) > 1:
        raise BadInput(Problem(f"several reference schemes ({', '.join(refs)}); choose one with --reference",
                               field="--reference"))
    return refs[0]


def _load_side(store: Store, kind: str, scheme: str):
    structure = store.frame("concept_structure" if kind == "Concept" else "category_structure", scheme=scheme)
    signals = ("path", "label", "gloss") if kind == "Concept" else ("path", "label")
    uids = sorted(set(structure["uid"])) if len(structure) else []
    mats, embedders = {}, set()
    for sig in signals:
        vs = store.get_vectors(kind, sig, owners=uids)
        if len(vs) != len(uids):
            raise NotFound(
                f"{len(uids) - len(vs)} {kind.lower()} vectors ({sig}) missing for {scheme!r}; run `graftwork embed`"
            )
        mats[sig] = vs.matrix
        embedders |= set(vs.embedders)
    view = HierarchyView.from_rows(structure, order=uids)
    return view, mats, embedders


def _map_one(store: Store, source: str, reference: str, concept_side, settings: MapSettings, run_id: str) -> dict:
    concepts, cmats, c_emb = concept_side
    cats, qmats, q_emb = _load_side(store, "Category", source)
    if not cats.uids:
        return {"categories": 0, "auto": 0, "proposed": 0, "unmapped": 0}
    if c_emb != q_emb or len(c_emb) != 1:
        raise NotFound(f"vectors of {source!r} and {reference!r} come from different embedders "
                       f"({sorted(c_emb | q_emb)}); run `graftwork embed` again")
    q, r = stack_signals([(qmats[a], cmats[b], w) for a, b, w in DEFAULT_SIGNALS])
    idx, sc = top_k(q, r, settings.pool)  # fused score = sum of weight x cosine (weights sum to 1)

    cpos = {u: i for i, u in enumerate(concepts.uids)}
    kpos = {u: i for i, u in enumerate(cats.uids)}
    decided = store.frame("decided_edges", source=source, reference=reference)
    excluded: dict[int, set[int]] = defaultdict(set)
    fixed: dict[int, int] = {}
    for cat, con, status in zip(decided.get("category", []), decided.get("concept", []), decided.get("status", [])):
        if cat in kpos and con in cpos:
            if status == "rejected":
                excluded[kpos[cat]].add(cpos[con])
            else:
                fixed[kpos[cat]] = cpos[con]
    rank_settings = RankSettings(parent_bonus=settings.parent_bonus, tie_margin=settings.tie_margin,
                                 depth_weight=settings.depth_weight)
    ranked = rerank(cats, concepts, idx, sc, excluded=excluded, fixed_top=fixed, settings=rank_settings)
    if settings.depth_weight > 0:
        # Second pass: the depth agreement the confident first-pass choices show, applied to every category.
        prior = learn_depth_prior(cats, concepts, ranked, sample=rank_settings.depth_sample)
        ranked = rerank(cats, concepts, idx, sc, excluded=excluded, fixed_top=fixed, settings=rank_settings,
                        depth_prior=prior)

    top = {ci: (fixed.get(ci) if ci in fixed else (rk.concepts[0] if rk.concepts else None))
           for ci, rk in enumerate(ranked)}
    family_top: dict[tuple[int, int], int] = defaultdict(int)  # (parent, concept) -> children landing there
    for ci in range(len(cats.uids)):
        for p in cats.parents[ci]:
            if top[ci] is not None:
                family_top[(p, top[ci])] += 1

    rows, counts = [], {"categories": len(cats.uids), "auto": 0, "proposed": 0, "unmapped": 0, "decided": len(fixed)}
    for ci, rk in enumerate(ranked):
        if ci in fixed:
            continue
        kept = [(j, s, t, b) for j, s, t, b in zip(rk.concepts, rk.scores, rk.text, rk.bonus) if s >= settings.floor]
        kept = kept[: settings.candidates]
        if not kept:
            counts["unmapped"] += 1
            continue
        for rank, (j, s, t, b) in enumerate(kept, start=1):
            score = float(min(1.0, max(0.0, s)))
            status = "auto" if rank == 1 and score >= settings.auto_threshold else "proposed"
            if rank == 1:
                counts[status] += 1
            shared = any(p == j for p in (top.get(pp) for pp in cats.parents[ci])) or any(
                family_top[(p, j)] > 1 for p in cats.parents[ci]
            )
            rows.append({
                "category": cats.uids[ci],
                "concept": concepts.uids[j],
                "score": score,
                "rank": rank,
                "match_type": match_type(cats.labels[ci], [concepts.labels[j], *concepts.alt_labels[j]],
                                         shared_with_family=shared, split=False),
                "status": status,
                "method": "text+structure",
                "evidence": _evidence(qmats, cmats, ci, j, t, b),
                "run_id": run_id,
            })
    with store.transaction():
        store.run("machine_edges_clear", uids=cats.uids, reference=reference)
        if rows:
            store.bulk("machine_edges_create", pd.DataFrame(rows))
    log.info("mapped %s: %s", source, counts)
    return counts


def _evidence(qmats, cmats, ci: int, j: int, text: float, bonus: float) -> str:
    """Per-signal cosines behind one edge, so a steward sees why it was proposed."""
    ev = {f"{a}~{b}": round(float(qmats[a][ci] @ cmats[b][j]), 4) for a, b, _ in DEFAULT_SIGNALS}
    ev.update(text=round(text, 4), parent_bonus=round(bonus, 4))
    return json.dumps(ev, sort_keys=True)
