"""The reference hierarchy in memory, for review: ancestors, subtrees, branch tops and the neighbourhood of a concept.

Retired concepts are kept (a decision may still point at one) but flagged.

>>> import pandas as pd
>>> t = ConceptTree.from_frame(pd.DataFrame({"uid": ["r:G", "r:T", "r:K"], "code": ["G", "T", "K"],
...     "label": ["Garden", "Tools", "Kitchen"], "parent": [None, "r:G", None]}))
>>> t.related("r:G", "r:T"), t.same_branch("r:T", "r:K"), t.in_subtree("r:T", "r:G")
(True, False, True)
"""

from __future__ import annotations

from dataclasses import dataclass, field

import pandas as pd

from pipeline.store import Store


@dataclass
class ConceptNode:
    uid: str
    code: str
    label: str
    path: str = ""
    depth: int = 0
    retired: bool = False
    content_hash: str = ""
    alt_labels: list[str] = field(default_factory=list)
    parents: list[str] = field(default_factory=list)
    children: list[str] = field(default_factory=list)


class ConceptTree:
    def __init__(self, nodes: dict[str, ConceptNode]):
        self.nodes = nodes
        self._ancestors: dict[str, frozenset[str]] = {}

    @classmethod
    def load(cls, store: Store, reference: str) -> "ConceptTree":
        return cls.from_frame(store.frame("review_concept_tree", reference=reference))

    @classmethod
    def from_frame(cls, df: pd.DataFrame) -> "ConceptTree":
        nodes: dict[str, ConceptNode] = {}
        for r in df.to_dict("records"):
            n = nodes.get(r["uid"])
            if n is None:
                alts = r.get("alt_labels")
                n = nodes[r["uid"]] = ConceptNode(
                    uid=r["uid"], code=r["code"], label=r.get("label") or r["code"], path=r.get("path") or "",
                    depth=int(r.get("depth") or 0), retired=bool(r.get("retired") or False),
                    content_hash=r.get("content_hash") or "", alt_labels=list(alts) if alts is not None else [])
            parent = r.get("parent")
            if isinstance(parent, str) and parent not in n.parents:
                n.parents.append(parent)
        for n in nodes.values():
            for p in n.parents:
                if p in nodes:
                    nodes[p].children.append(n.uid)
        for n in nodes.values():
            n.children.sort(key=lambda u: (nodes[u].label.casefold(), u))
        return cls(nodes)

    def __contains__(self, uid: str) -> bool:
        return uid in self.nodes

    def ancestors(self, uid: str) -> frozenset[str]:
        """Strict ancestors (the hierarchy is acyclic: ingest checked it); memoised per tree."""
        if uid not in self._ancestors:
            out: set[str] = set()
            for p in self.nodes[uid].parents if uid in self.nodes else ():
                if p in self.nodes:
                    out.add(p)
                    out |= self.ancestors(p)
            self._ancestors[uid] = frozenset(out)
        return self._ancestors[uid]

    def tops(self, uid: str) -> frozenset[str]:
        """The top-level concepts whose branch holds `uid` (itself, when it is one)."""
        chain = self.ancestors(uid) | {uid}
        return frozenset(u for u in chain if u in self.nodes and not self.nodes[u].parents)

    def in_subtree(self, uid: str, root: str) -> bool:
        return uid == root or root in self.ancestors(uid)

    def related(self, a: str, b: str) -> bool:
        """One is the other or an ancestor of it."""
        return self.in_subtree(a, b) or self.in_subtree(b, a)

    def same_branch(self, a: str, b: str) -> bool:
        return bool(self.tops(a) & self.tops(b))

    def chain(self, uid: str) -> list[ConceptNode]:
        """The concept's ancestors from the top down, then the concept (first parent at each step)."""
        out: list[ConceptNode] = []
        cur: str | None = uid
        while cur in self.nodes and len(out) < 64:
            out.append(self.nodes[cur])
            ps = [p for p in self.nodes[cur].parents if p in self.nodes]
            cur = ps[0] if ps else None
        return out[::-1]

    def neighbourhood(self, uid: str, *, siblings: int = 8, children: int = 12) -> dict:
        """What a steward needs to see around a candidate: its ancestors, a few siblings and its children."""
        n = self.nodes[uid]
        parent = next((p for p in n.parents if p in self.nodes), None)
        sibs = [s for s in (self.nodes[parent].children if parent else self.roots()) if s != uid]
        return {
            "chain": self.chain(uid),
            "siblings": [self.nodes[s] for s in sibs[:siblings]],
            "more_siblings": max(0, len(sibs) - siblings),
            "children": [self.nodes[c] for c in n.children[:children]],
            "more_children": max(0, len(n.children) - children),
        }

    def roots(self) -> list[str]:
        return sorted((u for u, n in self.nodes.items() if not n.parents),
                      key=lambda u: (self.nodes[u].label.casefold(), u))
