"""Review queues: the categories that need a person, each with why, ordered by how many items they affect.

- unmapped: no live edge and no candidate above the floor (or every candidate was rejected).
- uncertain: no accepted edge, and the best candidate is below the auto threshold of its run (status
  `proposed`), or it leads the second by less than `margin`.
- conflicting: live edges (accepted, or auto) into unrelated branches (no common top-level concept); a child
  mapped outside the subtree of its parent category's concept; or two sources' categories sharing at least
  `min_shared` item keys (and `min_share` of the smaller one) whose concepts are unrelated (neither is the other
  or an ancestor of it).
- stale: decisions a reference upgrade sent back to review (edge status `stale`: the concept was retired or
  moved), and live edges to concepts retired from the reference, or changed (their content hash differs from the
  one recorded when the edge was last proposed or decided).

>>> QUEUES
('unmapped', 'uncertain', 'conflicting', 'stale')
"""

from __future__ import annotations

import json
from collections import defaultdict
from dataclasses import dataclass, field

import pandas as pd

from pipeline.errors import BadInput, NotFound, Problem
from pipeline.review.decisions import pick_reference
from pipeline.review.tree import ConceptTree
from pipeline.store import Store

QUEUES = ("unmapped", "uncertain", "conflicting", "stale")
LIVE = ("accepted", "auto")


@dataclass
class QueueSettings:
    margin: float = 0.03      # a best candidate leading the second by less than this is uncertain
    min_shared: int = 3       # item keys two categories of different sources must share to be compared...
    min_share: float = 0.2    # ...and the fraction of the smaller category's items they make up
    samples: int = 3          # member item titles shown per category


@dataclass
class QueueEntry:
    queue: str
    uid: str
    source: str
    code: str
    label: str
    path: str
    items: int
    reasons: list[str] = field(default_factory=list)
    candidates: list[dict] = field(default_factory=list)
    titles: list[str] = field(default_factory=list)

    def to_dict(self) -> dict:
        return {"queue": self.queue, "category_uid": self.uid, "source": self.source, "category_code": self.code,
                "category_label": self.label, "category_path": self.path, "items": self.items,
                "titles": self.titles, "reason": "; ".join(self.reasons), "candidates": self.candidates}


class ReviewSnapshot:
    """What every queue reads, loaded once: live categories, their edges, the reference tree."""

    def __init__(self, store: Store, *, sources: list[str] | None = None, reference: str | None = None,
                 settings: QueueSettings | None = None):
        self.store = store
        self.settings = settings or QueueSettings()
        self.reference = pick_reference(store, reference)
        known = [s["key"] for s in store.rows("schemes_list") if s["role"] == "source"]
        unknown = [s for s in sources or [] if s not in known]
        if unknown:
            raise NotFound(f"unknown source(s): {', '.join(unknown)}; known: {', '.join(known) or 'none'}")
        # Everything is loaded (other sources matter for shared item keys); `sources` filters what is listed.
        self.sources = list(sources or [])
        cats = store.frame("review_categories", sources=[])
        self.parents: dict[str, list[str]] = defaultdict(list)
        self.categories: dict[str, dict] = {}
        for r in cats.to_dict("records"):
            if isinstance(r["parent"], str):
                self.parents[r["uid"]].append(r["parent"])
            self.categories.setdefault(r["uid"], r)
        edges = store.frame("review_edges", sources=[], reference=self.reference)
        self.edges: dict[str, list[dict]] = defaultdict(list)
        for e in edges.to_dict("records"):
            self.edges[e["category"]].append(e)
        for es in self.edges.values():
            es.sort(key=_edge_order)
        self.tree = ConceptTree.load(store, self.reference)

    # -- per-category views ---------------------------------------------------------------------------------------
    def live(self, uid: str) -> list[dict]:
        """The edges items are placed through: accepted ones, else the auto one."""
        es = self.edges.get(uid, [])
        accepted = [e for e in es if e["status"] == "accepted"]
        return accepted or [e for e in es if e["status"] == "auto"]

    def machine(self, uid: str) -> list[dict]:
        return [e for e in self.edges.get(uid, []) if e["status"] in ("auto", "proposed")]

    def candidates(self, uid: str) -> list[dict]:
        return candidate_dicts(self.edges.get(uid, []))

    # -- queues ---------------------------------------------------------------------------------------------------
    def reasons(self, queue: str) -> dict[str, list[str]]:
        if queue not in QUEUES:
            raise BadInput(Problem(f"unknown queue {queue!r}; use one of: {', '.join(QUEUES)}", field="QUEUE"))
        found = getattr(self, f"_{queue}")()
        if self.sources:
            found = {u: r for u, r in found.items() if self.categories[u]["source"] in self.sources}
        return found

    def _unmapped(self) -> dict[str, list[str]]:
        out = {}
        for uid in self.categories:
            es = self.edges.get(uid, [])
            if any(e["status"] in ("accepted", "auto", "proposed", "stale") for e in es):
                continue  # (a stale decision is listed in the stale queue)
            rejected = sum(e["status"] == "rejected" for e in es)
            out[uid] = [f"every candidate was rejected ({rejected})" if rejected else "no candidate above the floor"]
        return out

    def _uncertain(self) -> dict[str, list[str]]:
        out = {}
        for uid in self.categories:
            es = self.edges.get(uid, [])
            if any(e["status"] == "accepted" for e in es):
                continue
            ms = self.machine(uid)
            if not ms:
                continue
            first = ms[0]
            why = []
            if first["status"] == "proposed":
                why.append(f"best candidate {first['concept_code']} scored {_fmt(first['score'])}, below the "
                           "auto threshold")
            if len(ms) > 1 and _num(first["score"]) is not None and _num(ms[1]["score"]) is not None:
                gap = float(first["score"]) - float(ms[1]["score"])
                if gap < self.settings.margin:
                    why.append(f"first two candidates within {gap:.3f} ({first['concept_code']} "
                               f"{_fmt(first['score'])}, {ms[1]['concept_code']} {_fmt(ms[1]['score'])})")
            if why:
                out[uid] = why
        return out

    def _conflicting(self) -> dict[str, list[str]]:
        t = self.tree
        out: dict[str, list[str]] = defaultdict(list)
        live = {uid: [e for e in self.live(uid) if e["concept"] in t] for uid in self.categories}
        for uid, es in live.items():
            for i, a in enumerate(es):
                for b in es[i + 1:]:
                    if not t.same_branch(a["concept"], b["concept"]):
                        out[uid].append(f"live edges into unrelated branches: {_name(a)} and {_name(b)}")
        for uid, es in live.items():
            for parent in self.parents.get(uid, []):
                pes = live.get(parent, [])
                if not es or not pes:
                    continue
                for e in es:
                    if not any(t.in_subtree(e["concept"], p["concept"]) for p in pes):
                        pcat = self.categories[parent]
                        out[uid].append(f"mapped to {_name(e)}, outside the subtree of {_name(pes[0])} where its "
                                        f"parent {pcat['code']} ({pcat['label']}) is mapped")
        for uid, other, shared in self._shared_pairs():
            a, b = live.get(uid, []), live.get(other, [])
            if a and b and not any(t.related(x["concept"], y["concept"]) for x in a for y in b):
                ocat = self.categories[other]
                out[uid].append(f"shares {shared} item keys with {ocat['source']}:{ocat['code']} "
                                f"({ocat['label']}), which maps to unrelated {_name(b[0])}")
        return dict(out)

    def _shared_pairs(self) -> list[tuple[str, str, int]]:
        """(category, other source's category, shared item keys), both directions."""
        keys = self.store.frame("review_item_keys", sources=[])
        if keys.empty:
            return []
        keys = keys[keys["category"].isin(self.categories.keys())]
        pairs = keys.merge(keys, on="item_key", suffixes=("_a", "_b"))
        pairs = pairs[pairs["source_a"] != pairs["source_b"]]
        if pairs.empty:
            return []
        shared = pairs.groupby(["category_a", "category_b"])["item_key"].nunique()
        size = keys.groupby("category")["item_key"].nunique()
        out = []
        for (a, b), n in shared.items():
            if n < self.settings.min_shared:
                continue
            if n < self.settings.min_share * min(size[a], size[b]):
                continue
            out.append((a, b, int(n)))
        return out

    def _stale(self) -> dict[str, list[str]]:
        t = self.tree
        seen = self.store.frame("review_events_hashes", sources=[])
        last_hash = {}
        if not seen.empty:
            seen = seen.sort_values(["at", "seq"]).drop_duplicates(["category", "concept"], keep="last")
            last_hash = {(r.category, r.concept): r.concept_hash for r in seen.itertuples()}
        out: dict[str, list[str]] = defaultdict(list)
        for uid in self.categories:
            for e in self.edges.get(uid, []):
                if e["status"] == "stale":
                    node = t.nodes.get(e["concept"])
                    what = "was retired" if node is None or node.retired else f"moved (now: {node.path})"
                    by = f" by {e['decided_by']}" if e["decided_by"] else ""
                    out[uid].append(f"decision{by} on {_name(e)} went back to review: the concept {what} in a "
                                    "reference upgrade")
                    continue
                if e["status"] not in LIVE:
                    continue
                node = t.nodes.get(e["concept"])
                if node is None or node.retired:
                    out[uid].append(f"{e['status']} edge to {_name(e)}, which was retired from the reference")
                    continue
                before = last_hash.get((uid, e["concept"]))
                if before and before != node.content_hash:
                    out[uid].append(f"{e['status']} edge to {_name(e)}, which changed since it was "
                                    f"{'decided' if e['status'] == 'accepted' else 'proposed'} "
                                    f"(now: {node.path or node.label})")
        return dict(out)


def review_queue(store: Store, queue: str, *, sources: list[str] | None = None, reference: str | None = None,
                 limit: int | None = 50, settings: QueueSettings | None = None,
                 snapshot: ReviewSnapshot | None = None) -> list[QueueEntry]:
    """The categories in `queue`, most items first, with candidates, sample member titles and reasons."""
    snap = snapshot or ReviewSnapshot(store, sources=sources, reference=reference, settings=settings)
    reasons = snap.reasons(queue)
    order = sorted(reasons, key=lambda u: (-int(snap.categories[u]["items"]), snap.categories[u]["source"],
                                           snap.categories[u]["code"]))
    if limit is not None:
        order = order[: max(0, limit)]
    titles = _titles(store, order, snap.settings.samples)
    out = []
    for uid in order:
        c = snap.categories[uid]
        out.append(QueueEntry(queue=queue, uid=uid, source=c["source"], code=c["code"], label=c["label"],
                              path=c["path"], items=int(c["items"]), reasons=reasons[uid],
                              candidates=snap.candidates(uid), titles=titles.get(uid, [])))
    return out


def queue_counts(snapshot: ReviewSnapshot) -> dict[str, int]:
    return {q: len(snapshot.reasons(q)) for q in QUEUES}


def queue_frame(entries: list[QueueEntry], *, candidates: int = 3) -> pd.DataFrame:
    """One line per category for a terminal: candidates and titles folded into short text."""
    rows = []
    for e in entries:
        cands = "; ".join(f"{c['concept_code']} {c['concept_label']} {_fmt(c['score'])} {c['status']}"
                          for c in e.candidates[:candidates])
        rows.append({"source": e.source, "code": e.code, "path": e.path, "items": e.items,
                     "titles": " | ".join(e.titles), "candidates": cands or "-", "why": "; ".join(e.reasons)})
    return pd.DataFrame(rows, columns=["source", "code", "path", "items", "titles", "candidates", "why"])


def candidate_dicts(edges: list[dict], *, include_rejected: bool = False) -> list[dict]:
    """Edges (rows of review_edges) as the candidates a steward sees, in review order."""
    out = []
    for e in sorted(edges, key=_edge_order):
        if e["status"] == "rejected" and not include_rejected:
            continue
        out.append({"concept_uid": e["concept"], "concept_code": e["concept_code"],
                    "concept_label": e["concept_label"], "concept_path": e["concept_path"],
                    "score": _num(e["score"]), "rank": _int(e["rank"]), "status": e["status"],
                    "match_type": e["match_type"], "evidence": _evidence(e["evidence"]),
                    "retired": bool(e["concept_retired"]), "method": e.get("method") or "",
                    "decided_by": e["decided_by"] or "", "decided_at": e["decided_at"] or "",
                    "note": e["note"] or ""})
    return out


def _titles(store: Store, uids: list[str], n: int) -> dict[str, list[str]]:
    if not uids or n <= 0:
        return {}
    df = store.frame("review_member_titles", uids=uids)
    return {u: list(g["title"].head(n)) for u, g in df.groupby("category", sort=False)}


def _edge_order(e: dict):
    status_first = {"accepted": 0, "stale": 1, "auto": 2, "proposed": 3, "rejected": 4}.get(e["status"], 5)
    rank = _int(e["rank"])
    return (status_first, rank if rank is not None else 10**6, -(_num(e["score"]) or 0.0), e["concept"])


def _num(x) -> float | None:
    return None if x is None or (isinstance(x, float) and x != x) else float(x)


def _int(x) -> int | None:
    v = _num(x)
    return None if v is None else int(v)


def _fmt(x) -> str:
    v = _num(x)
    return "-" if v is None else f"{v:.2f}"


def _name(e: dict) -> str:
    return f"{e['concept_code']} ({e['concept_label']})"


def _evidence(text) -> dict:
    if not isinstance(text, str) or not text:
        return {}
    try:
        ev = json.loads(text)
    except ValueError:
        return {"text": text}
    return ev if isinstance(ev, dict) else {"value": ev}
