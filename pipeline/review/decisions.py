"""A person's decisions on MAPS_TO edges: accept, reject, remap, reopen. They outrank every later run.

- accept: the edge becomes `accepted` (created if the machine never proposed it); the category's machine edges
  are dropped, as the map job does for a category with an accepted edge. Other accepted edges stay (1:n).
- reject: the edge becomes `rejected` (created if absent), so the concept is never proposed again for it.
- remap: the category goes to this concept instead: it is accepted, the edges the category lived through until
  now (accepted or auto) become `rejected`, its other machine edges are dropped.
- reopen: the decision is withdrawn: a decided edge that a run had proposed goes back to `proposed` (the next run
  replaces it), one a person made is removed. Without a concept, every decision of the category is reopened.
  A `stale` edge (a decision a reference upgrade sent back to review) counts as a decision here; accepting it
  again confirms it, and a remap rejects it.

Each change appends an `EdgeEvent` (pipeline/review/events.py), and the category's items are placed again.
A decision with a `ref` (an imported sheet row, a queued decision) is applied at most once.
"""

from __future__ import annotations

import getpass
import os
from dataclasses import dataclass, replace

from pipeline.errors import BadInput, NotFound, Problem
from pipeline.ingest.graph_writer import node_uid
from pipeline.review.events import event_row, now_iso, write_events
from pipeline.review.search import exact_label_matches, search_concepts
from pipeline.review.tree import ConceptTree
from pipeline.schemes import pick_reference  # noqa: F401 (used here and re-exported)
from pipeline.store import Store

ACTIONS = ("accept", "reject", "remap", "reopen")
DECIDED = ("accepted", "rejected", "stale")  # stale: a decision a reference upgrade sent back to review
USER_ENV = "GRAFTWORK_USER"


@dataclass(frozen=True)
class Decision:
    """What a person decided, before it is checked against the store.
    `concept` is a concept code; a label (or, for remap, any search text) is looked up when no code matches."""

    action: str
    source: str
    category: str
    concept: str = ""
    note: str = ""
    by: str = ""
    at: str = ""
    ref: str = ""
    file: str | None = None  # where the decision came from, for error messages
    line: int | None = None

    def to_dict(self) -> dict:
        return {k: getattr(self, k) for k in ("action", "source", "category", "concept", "note", "by", "at", "ref")}


@dataclass(frozen=True)
class Resolved:
    decision: Decision
    category: str  # uid
    concept: str | None  # uid
    concept_code: str | None


def who(by: str | None = None) -> str:
    """The person deciding: `--by`, else $GRAFTWORK_USER, else the login name."""
    if by:
        return by
    if os.environ.get(USER_ENV):
        return os.environ[USER_ENV]
    try:
        return getpass.getuser()
    except (KeyError, OSError):
        return "unknown"


def decide(store: Store, decision: Decision, *, reference: str | None = None, place_items: bool = True) -> dict:
    """Apply one decision (raises BadInput/NotFound naming what is wrong; nothing is written then)."""
    return apply_decisions(store, [decision], reference=reference, place_items=place_items)


def apply_decisions(store: Store, decisions: list[Decision], *, reference: str | None = None,
                    place_items: bool = True, strict: bool = True) -> dict:
    """Check every decision, then apply the good ones in one transaction and re-place the affected categories.

    strict: any bad decision raises and nothing is written; otherwise bad ones are skipped and listed under
    `invalid` (as Problems naming file, line and field). Decisions whose `ref` was applied before are skipped.
    """
    reference = pick_reference(store, reference)
    tree = ConceptTree.load(store, reference)
    resolved, problems, first = [], [], None
    for d in decisions:
        try:
            resolved.append(resolve(store, d, reference, tree))
        except (BadInput, NotFound) as exc:
            first = first or exc
            problems.extend(_problems(exc, d))
    if problems and strict:
        raise first if len(decisions) == 1 else BadInput(problems)
    refs = sorted({r.decision.ref for r in resolved if r.decision.ref})
    done = set(store.frame("review_event_refs", refs=refs)["ref"]) if refs else set()
    summary = {"reference": reference, "applied": 0, "skipped_already_applied": 0, "decisions": [],
               "invalid": [str(p) for p in problems], "invalid_rows": [problem_dict(p) for p in problems]}
    affected: list[str] = []
    with store.transaction():
        for r in resolved:
            if r.decision.ref and r.decision.ref in done:
                summary["skipped_already_applied"] += 1
                continue
            changes = _apply(store, r, reference, tree)
            done.add(r.decision.ref)
            summary["applied"] += 1
            summary["decisions"].append({"action": r.decision.action, "category": r.category,
                                         "concept": r.concept or "", "changes": changes})
            if r.category not in affected:
                affected.append(r.category)
        if affected and place_items:
            from pipeline.place.place_job import place

            summary["placed"] = place(store, categories=affected, reference=reference)
    return summary


def resolve(store: Store, d: Decision, reference: str, tree: ConceptTree | None = None) -> Resolved:
    """Check a decision against the store: known action, source, live category, and a concept it can name."""
    where = {"file": d.file, "line": d.line}
    if d.action not in ACTIONS:
        raise BadInput(Problem(f"unknown decision {d.action!r}; use one of: {', '.join(ACTIONS)}",
                               field="decision", **where))
    scheme = store.rows("scheme_get", key=d.source)
    if not scheme or scheme[0]["role"] != "source":
        raise NotFound(f"no source taxonomy {d.source!r} in the store")
    cat = store.rows("review_category_get", uid=node_uid(d.source, d.category))
    if not cat:
        raise NotFound(f"no category {d.category!r} in source {d.source!r}")
    if cat[0]["retired"]:
        raise BadInput(Problem(f"category {d.source}:{d.category} is retired (gone from its source file)",
                               field="category", **where))
    if not d.concept and d.action != "reopen":
        raise BadInput(Problem(f"{d.action} needs a concept", field="concept", **where))
    if d.action == "reopen":
        return _resolve_reopen(store, d, cat[0]["uid"], reference, where)
    tree = tree or ConceptTree.load(store, reference)
    node = tree.nodes.get(node_uid(reference, d.concept))
    if node is None:
        exact = exact_label_matches(tree, d.concept)
        if len(exact) == 1:
            node = exact[0]
        elif d.action == "remap" and not exact:
            found = search_concepts(tree, d.concept, limit=6)
            if len(found) == 1:
                node = found[0]
            elif found:
                raise BadInput(Problem(f"{d.concept!r} names several concepts: " + "; ".join(
                    f"{n.code} {n.label}" for n in found[:5]) + " — give the code", field="concept", **where))
        elif len(exact) > 1:
            raise BadInput(Problem(f"label {d.concept!r} fits several concepts: " + ", ".join(
                n.code for n in exact[:5]) + " — give the code", field="concept", **where))
    if node is None:
        raise NotFound(f"no concept {d.concept!r} (code or label) in reference {reference!r}")
    if node.retired and d.action in ("accept", "remap"):
        raise BadInput(Problem(f"concept {node.code} ({node.label}) is retired from {reference!r}; "
                               "choose a live concept", field="concept", **where))
    return Resolved(d, cat[0]["uid"], node.uid, node.code)


def _resolve_reopen(store: Store, d: Decision, category: str, reference: str, where: dict) -> Resolved:
    decided = {e["concept"]: e["concept_code"] for e in store.rows("review_category_edges", category=category,
                                                                    reference=reference)
               if e["status"] in DECIDED}
    if not d.concept:
        if not decided:
            raise NotFound(f"no decision to reopen on {category}")
        return Resolved(d, category, None, None)
    uid = node_uid(reference, d.concept)
    if uid not in decided:
        raise BadInput(Problem(f"no decision on {category} -> {d.concept} to reopen", field="concept", **where))
    return Resolved(d, category, uid, d.concept)


def _apply(store: Store, r: Resolved, reference: str, tree: ConceptTree) -> list[str]:
    d = r.decision
    at = d.at or now_iso()
    by = who(d.by)
    edges = {e["concept"]: e for e in store.rows("review_category_edges", category=r.category, reference=reference)}
    events: list[dict] = []
    changes: list[str] = []

    def event(action: str, concept: str, status: str, before: str, note: str = d.note) -> None:
        e = edges.get(concept, {})
        h = tree.nodes[concept].content_hash if concept in tree.nodes else ""
        events.append(event_row(action, category=r.category, concept=concept, status=status, status_before=before,
                                score=e.get("score"), rank=e.get("rank"), actor=by, note=note, concept_hash=h,
                                ref=d.ref, at=at, seq=len(events)))
        changes.append(f"{action} {concept}")

    def set_status(concept: str, status: str, note: str = d.note) -> None:
        before = edges[concept]["status"] if concept in edges else ""
        if concept in edges:
            store.run("review_edge_set", category=r.category, concept=concept, status=status, by=by, at=at,
                      note=note)
        else:
            store.run("review_edge_create", category=r.category, concept=concept, status=status,
                      match_type=_match_type(store, r, tree), rank=1 if status == "accepted" else None, by=by,
                      at=at, note=note)
        event(status, concept, status, before, note)

    def drop(concept: str) -> None:
        store.run("review_edge_delete", category=r.category, concept=concept)
        event("superseded", concept, "", edges[concept]["status"], note=f"{d.action} {r.concept_code}")

    if d.action in ("accept", "remap"):
        set_status(r.concept, "accepted")
        for concept, e in edges.items():
            if concept == r.concept:
                continue
            if d.action == "remap" and e["status"] in ("accepted", "auto", "stale"):
                set_status(concept, "rejected", note=_join(f"remapped to {r.concept_code}", d.note))
            elif e["status"] in ("auto", "proposed"):
                drop(concept)
    elif d.action == "reject":
        set_status(r.concept, "rejected")
    else:  # reopen
        targets = [r.concept] if r.concept else [c for c, e in edges.items() if e["status"] in DECIDED]
        targets = [c for c in targets if c in edges and edges[c]["status"] in DECIDED]
        for concept in targets:
            e = edges[concept]
            if e["method"] == "steward":
                store.run("review_edge_delete", category=r.category, concept=concept)
                event("reopened", concept, "", e["status"])
            else:
                store.run("review_edge_reopen", category=r.category, concept=concept)
                event("reopened", concept, "proposed", e["status"])
    write_events(store, events)
    return changes


def _match_type(store: Store, r: Resolved, tree: ConceptTree) -> str:
    """A person's new edge: exactMatch when the labels agree, closeMatch otherwise (the steward may refine it)."""
    cat = store.rows("review_category_get", uid=r.category)[0]
    node = tree.nodes[r.concept]
    labels = {node.label.casefold(), *(a.casefold() for a in node.alt_labels)}
    return "exactMatch" if (cat["label"] or "").casefold() in labels else "closeMatch"


def problem_dict(p: Problem) -> dict:
    return {"file": p.file, "line": p.line, "field": p.field, "message": p.message}


def _join(*parts: str) -> str:
    return "; ".join(p for p in parts if p)


def _problems(exc: Exception, d: Decision) -> list[Problem]:
    if isinstance(exc, BadInput):
        return [p if p.file or p.line else replace(p, file=d.file, line=d.line) for p in exc.problems]
    return [Problem(str(exc), file=d.file, line=d.line)]
