"""In-memory view of one hierarchy for ranking: index by uid, depth, leaf flag, parents, ancestor sets."""

from __future__ import annotations

from dataclasses import dataclass

import pandas as pd


@dataclass
class HierarchyView:
    uids: list[str]
    codes: list[str]
    labels: list[str]
    depth: list[int]
    is_leaf: list[bool]
    parents: list[list[int]]
    alt_labels: list[list[str]]

    @classmethod
    def from_rows(cls, frame: pd.DataFrame, order: list[str] | None = None) -> "HierarchyView":
        """`frame`: rows of uid, code, label, depth, is_leaf, parent (one per link) as the *_structure queries give.
        `order`: uids in the order of a vector matrix (nodes without vectors are dropped)."""
        first = frame.drop_duplicates("uid")
        known = dict(zip(first["uid"], range(len(first))))
        uids = [u for u in (list(order) if order is not None else first["uid"]) if u in known]
        pos = {u: i for i, u in enumerate(uids)}
        parents: list[list[int]] = [[] for _ in uids]
        for uid, parent in zip(frame["uid"], frame["parent"]):
            if isinstance(parent, str) and uid in pos and parent in pos:
                parents[pos[uid]].append(pos[parent])
        at = [known[u] for u in uids]

        def column(name: str) -> list:
            values = first[name].tolist()
            return [values[k] for k in at]

        alts = column("alt_labels") if "alt_labels" in first.columns else [None] * len(uids)
        return cls(
            uids=uids,
            codes=column("code"),
            labels=column("label"),
            depth=[int(d) for d in column("depth")],
            is_leaf=[bool(x) for x in column("is_leaf")],
            parents=parents,
            alt_labels=[list(a) if a is not None else [] for a in alts],
        )

    def ancestors(self) -> list[frozenset[int]]:
        """Strict ancestors of every node, built parents-first (the hierarchy is acyclic: ingest checked it).
        Computed once per view: the map step asks for them in every pass."""
        cached = self.__dict__.get("_ancestors")
        if cached is None:
            cached = self.__dict__["_ancestors"] = self._build_ancestors()
        return cached

    def region(self, j: int) -> list[int]:
        """Where a child of something mapped to node j should land: j's subtree, or, when j is a leaf, its
        parents' subtrees (a deeper source mapped into a coarser reference: siblings count)."""
        return [j] if not self.is_leaf[j] or not self.parents[j] else list(self.parents[j])

    def _build_ancestors(self) -> list[frozenset[int]]:
        n = len(self.uids)
        children: list[list[int]] = [[] for _ in range(n)]
        pending = [len(ps) for ps in self.parents]
        for c, ps in enumerate(self.parents):
            for p in ps:
                children[p].append(c)
        result: list[frozenset[int]] = [frozenset()] * n
        queue = [i for i in range(n) if pending[i] == 0]
        while queue:
            i = queue.pop()
            acc: set[int] = set()
            for p in self.parents[i]:
                acc.add(p)
                acc |= result[p]
            result[i] = frozenset(acc)
            for c in children[i]:
                pending[c] -= 1
                if pending[c] == 0:
                    queue.append(c)
        return result

    def top_down(self) -> list[int]:
        """Node indices with parents before children (by depth, then position)."""
        return sorted(range(len(self.uids)), key=lambda i: (self.depth[i], i))
