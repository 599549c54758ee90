"""The reference hierarchy as a DataFrame, with each concept's ancestors, for paths, levels and top concepts."""

from __future__ import annotations

import pandas as pd

from pipeline.store import Store


class ReferenceTree:
    """Live concepts of one reference: `frame` has uid, code, label, iri, depth, path, parent_code (first parent).

    Polyhierarchies keep every parent link in `parents`; `ancestors(code)` follows the first parent by code order,
    the same path `Concept.path` shows.
    """

    def __init__(self, rows: pd.DataFrame):
        rows = rows.copy()
        self.parents: dict[str, list[str]] = {}
        for code, parent in zip(rows["code"], rows["parent_code"]):
            self.parents.setdefault(code, [])
            if isinstance(parent, str) and parent:
                self.parents[code].append(parent)
        self.frame = rows.drop_duplicates("code").reset_index(drop=True)
        self.frame["parent_code"] = [(self.parents[c] or [None])[0] for c in self.frame["code"]]
        self.frame["depth"] = self.frame["depth"].astype(int)
        self._by_code = self.frame.set_index("code")
        self._children: dict[str, list[str]] = {}
        for code, ps in self.parents.items():
            for p in ps:
                self._children.setdefault(p, []).append(code)

    @classmethod
    def load(cls, store: Store, reference: str) -> ReferenceTree:
        return cls(store.frame("query_concepts", reference=reference))

    def __contains__(self, code: str) -> bool:
        return code in self._by_code.index

    def label(self, code: str) -> str:
        return str(self._by_code.at[code, "label"])

    def uid(self, code: str) -> str:
        return str(self._by_code.at[code, "uid"])

    def ancestors(self, code: str) -> list[str]:
        """Codes from the top concept down to `code`'s parent."""
        out, seen = [], {code}
        c = code
        while self.parents.get(c):
            c = self.parents[c][0]
            if c in seen:  # ingest rejects cycles; never loop forever on a damaged store
                break
            seen.add(c)
            out.append(c)
        return out[::-1]

    def top(self, code: str) -> str:
        chain = self.ancestors(code)
        return chain[0] if chain else code

    def children(self, code: str) -> list[str]:
        return sorted(self._children.get(code, []))

    def descendants(self, code: str, max_hops: int) -> list[tuple[str, int]]:
        """(code, hops below `code`) for every descendant up to `max_hops`, breadth first."""
        out, frontier, seen = [], [code], {code}
        for hop in range(1, max_hops + 1):
            nxt = []
            for c in frontier:
                for child in self.children(c):
                    if child not in seen:
                        seen.add(child)
                        out.append((child, hop))
                        nxt.append(child)
            frontier = nxt
        return out
