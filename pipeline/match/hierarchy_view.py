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
        first = frame.drop_duplicates("uid").set_index("uid")
        uids = list(order) if order is not None else list(first.index)
        uids = [u for u in uids if u in first.index]
        pos = {u: i for i, u in enumerate(uids)}
        parents: list[list[int]] = [[] for _ in uids]
        for uid, parent in zip(frame["uid"], frame["parent"]):
            if isinstance(parent, str) and uid in pos and parent in pos:
                parents[pos[uid]].append(pos[parent])
        alts = first["alt_labels"] if "alt_labels" in first.columns else None
        return cls(
            uids=uids,
            codes=[first.at[u, "code"] for u in uids],
            labels=[first.at[u, "label"] for u in uids],
            depth=[int(first.at[u, "depth"]) for u in uids],
            is_leaf=[bool(first.at[u, "is_leaf"]) for u in uids],
            parents=parents,
            alt_labels=[list(alts[u]) if alts is not None and alts[u] is not None else [] for u in uids],
        )

    def ancestors(self) -> list[frozenset[int]]:
        """Strict ancestors of every node, built parents-first (the hierarchy is acyclic: ingest checked it)."""
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
