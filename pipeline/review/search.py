"""Find reference concepts by code or label: the CLI's remap target and the review page's search box.

Scoring is plain and predictable: the code itself, then a label equal to the query, then labels starting with it,
then labels holding every query word (preferred labels before alternative ones, shallower concepts first).

>>> from pipeline.review.tree import ConceptTree, ConceptNode
>>> t = ConceptTree({"r:1": ConceptNode("r:1", "1", "Pruning shears", alt_labels=["Secateurs"]),
...                  "r:2": ConceptNode("r:2", "2", "Shears")})
>>> [n.code for n in search_concepts(t, "shears")]
['2', '1']
>>> [n.code for n in search_concepts(t, "secat")]
['1']
"""

from __future__ import annotations

import re

from pipeline.review.tree import ConceptNode, ConceptTree

_WORD = re.compile(r"\w+")


def search_concepts(tree: ConceptTree, query: str, *, limit: int = 20,
                    include_retired: bool = False) -> list[ConceptNode]:
    q = query.strip().casefold()
    if not q:
        return []
    words = _WORD.findall(q)
    hits: list[tuple[tuple, ConceptNode]] = []
    for n in tree.nodes.values():
        if n.retired and not include_retired:
            continue
        best = None
        if n.code.casefold() == q:
            best = 0
        for weight, label in [(0, n.label)] + [(1, a) for a in n.alt_labels]:
            lab = label.casefold()
            if lab == q:
                rank = 1 + weight
            elif lab.startswith(q):
                rank = 3 + weight
            elif words and all(any(t.startswith(w) for t in _WORD.findall(lab)) for w in words):
                rank = 5 + weight
            elif q in lab:
                rank = 7 + weight
            else:
                continue
            best = rank if best is None else min(best, rank)
        if best is not None:
            hits.append(((best, n.depth, n.label.casefold(), n.code), n))
    hits.sort(key=lambda h: h[0])
    return [n for _, n in hits[:limit]]


def exact_label_matches(tree: ConceptTree, text: str) -> list[ConceptNode]:
    """Live concepts whose preferred or alternative label equals `text` (case-insensitive)."""
    q = text.strip().casefold()
    return [n for n in tree.nodes.values()
            if not n.retired and (n.label.casefold() == q or any(a.casefold() == q for a in n.alt_labels))]
