"""Neighbour votes: labelled categories of the same source vote for where their look-alikes should land.

A weighted k-nearest-neighbours vote (cosine of the fused category text vectors): for a category, the `k` most
similar labelled categories (never itself) each vote for the concepts they are labelled with, weighted by
similarity to the power `power`; a concept's vote is its share of the total weight, scaled by the best similarity
so a category with no close labelled look-alike gets little, and by how often the vote is right on the labelled
categories themselves (each voted on by the others: leave-one-out). Where look-alikes share a concept (a detailed
source into a coarser reference) the votes count; where each look-alike has a concept of its own (two taxonomies
at the same grain) they fade. The voted concepts also join the candidate pool.

>>> import numpy as np
>>> q = np.array([[1, 0], [0.96, 0.28], [0.96, -0.28], [0, 1]], dtype=np.float32)
>>> votes = neighbour_votes(q, {1: [7], 2: [7], 3: [9]}, [0], k=2)
>>> sorted(votes[0]), round(float(votes[0][7]), 2)   # 2 of 3 labelled categories are voted right by the others
([7], 0.64)
"""

from __future__ import annotations

import json

import numpy as np

K = 10       # labelled neighbours that vote
POWER = 8.0  # similarity sharpening: the nearest look-alikes dominate


def neighbour_votes(q: np.ndarray, labelled: dict[int, list[int]], todo: list[int], *, k: int = K,
                    power: float = POWER, block: int = 2048) -> dict[int, dict[int, float]]:
    """Category -> concept -> vote in 0..1 for the categories in `todo`. `labelled`: category -> its concepts."""
    owners = np.array(sorted(labelled), dtype=np.int64)
    if not len(owners) or not todo:
        return {}
    lab = q[owners].astype(np.float32)
    out: dict[int, dict[int, float]] = {}
    rows_all = np.array(sorted(set(todo) | set(owners.tolist())), dtype=np.int64)
    for lo in range(0, len(rows_all), block):
        rows = rows_all[lo:lo + block]
        sims = q[rows].astype(np.float32) @ lab.T
        sims[rows[:, None] == owners[None, :]] = -np.inf  # a category never votes for itself
        kk = min(k, len(owners))
        top = np.argpartition(-sims, kk - 1, axis=1)[:, :kk]
        for r, ci in enumerate(rows.tolist()):
            s = sims[r, top[r]]
            keep = np.isfinite(s) & (s > 0)
            if not keep.any():
                continue
            s, who = s[keep].astype(np.float64), owners[top[r][keep]]
            w = s ** power
            total = w.sum()
            if total <= 0:
                continue
            scale = float(s.max())
            votes: dict[int, float] = {}
            for weight, n in zip(w, who.tolist()):
                targets = labelled[n]
                for j in targets:
                    votes[j] = votes.get(j, 0.0) + weight / len(targets)
            out[int(ci)] = {j: scale * v / total for j, v in votes.items()}
    trust = reliability(out, labelled)
    keep = set(todo)
    return {ci: {j: v * trust for j, v in vs.items()} for ci, vs in out.items() if ci in keep}


def reliability(votes: dict[int, dict[int, float]], labelled: dict[int, list[int]]) -> float:
    """Share of labelled categories whose best-voted concept (by the others' votes) is one of theirs."""
    scored = [ci for ci in labelled if votes.get(ci)]
    if not scored:
        return 0.0
    hits = sum(max(votes[ci].items(), key=lambda t: (t[1], -t[0]))[0] in labelled[ci] for ci in scored)
    return hits / len(scored)


def widen_pools(pools: list[list[int]], votes: dict[int, dict[int, float]], *, per_category: int = 5) -> int:
    """Add each category's best-voted concepts to its pool (in place); returns how many were added."""
    added = 0
    for ci, vs in votes.items():
        have = set(pools[ci])
        for j, _ in sorted(vs.items(), key=lambda t: (-t[1], t[0]))[:per_category]:
            if j not in have:
                pools[ci].append(j)
                added += 1
    return added


def labels_key(reference: str) -> str:
    """The stored model's field that keeps the labelled pairs `map --learn` was given, for this reference."""
    return f"labels@{reference}"


def stored_labels(model_json: str | None, source: str, reference: str) -> dict[str, list[str]]:
    """Category code -> concept codes of the labelled pairs stored with the model (empty when none)."""
    if not model_json:
        return {}
    data = json.loads(model_json).get(labels_key(reference)) or {}
    return {code: list(concepts) for code, concepts in (data.get(source) or {}).items()}


def labelled_categories(decided: tuple[list, list, list], stored: dict[str, list[str]], cat_codes: list[str],
                        concept_codes: list[str], kpos: dict[str, int], cpos: dict[str, int]) -> dict[int, list[int]]:
    """Category position -> concept positions, from a person's accepted edges (`decided`: category uids, concept
    uids, statuses) and the stored labelled pairs (`stored`: category code -> concept codes)."""
    out: dict[int, list[int]] = {}
    for cat, con, status in zip(*decided):
        if status == "accepted" and cat in kpos and con in cpos:
            out.setdefault(kpos[cat], []).append(cpos[con])
    cat_at = {code: i for i, code in enumerate(cat_codes)}
    con_at = {code: j for j, code in enumerate(concept_codes)}
    for code, targets in stored.items():
        if code in cat_at and cat_at[code] not in out:  # a person's decision outranks a stored label
            js = [con_at[t] for t in targets if t in con_at]
            if js:
                out[cat_at[code]] = js
    return {ci: sorted(set(js)) for ci, js in out.items()}

