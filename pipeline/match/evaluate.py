"""Score a source's MAPS_TO edges against an answer key (`source_code,reference_code`, several rows allowed).

Which edges are predictions: a category's machine edges (`auto`, `proposed`) in rank order; a category with none
but an `accepted` edge predicts that concept (a person's decision is the layer's answer); `rejected` edges are never
predictions. Every source code in the answer key is scored; a code with no prediction (or absent from the source)
counts as a miss, and the report says how many there were.

Metrics, over the N scored source codes:
- top1: the rank-1 prediction is among the code's targets; hit@k: one of the first k is; mrr: mean of 1/rank of the
  first correct prediction within the first k (0 when none).
- coverage: share of codes with at least one prediction; auto_coverage: share with at least one `auto` edge.
- auto_precision / auto_recall / auto_f1: over (code, concept) pairs. precision = correct auto edges / auto edges;
  recall = correct auto edges / answer-key pairs; F1 their harmonic mean. auto_rank1_precision: share of codes with
  an `auto` rank 1 whose rank 1 is right (the extra `auto` edges of a 1:n split left out).
- partial: hierarchical partial credit of the rank-1 prediction p, against the code's targets G:
  1 if p is in G; else 0.5 ** h, where h is the number of BROADER steps between p and the nearest target that p
  is an ancestor or a descendant of (one level too broad or too narrow earns 0.5, two levels 0.25, ...); 0 for a
  sibling, a cousin, an unrelated concept or no prediction. `partial_breakdown` counts exact / too_broad /
  too_narrow / other / none.

>>> preds = {"a": [Candidate("X", 0.9, 1, "auto")], "b": [Candidate("Y", 0.4, 1, "proposed")]}
>>> m = score_predictions(preds, {"a": {"X"}, "b": {"Z"}}, k=5)
>>> m["top1"], m["auto_precision"], m["auto_coverage"]
(0.5, 1.0, 0.5)
"""

from __future__ import annotations

from collections import deque
from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from pathlib import Path

import pandas as pd

from pipeline.errors import BadInput, NotFound, Problem
from pipeline.schemes import choose_reference
from pipeline.store import Store

MACHINE = ("auto", "proposed")
PARTIAL_RULE = (
    "rank-1 prediction p, targets G: 1 if p in G; else 0.5**h where h is the number of BROADER steps from p to the "
    "nearest target that p is an ancestor or a descendant of; 0 otherwise (sibling, unrelated, no prediction)"
)


@dataclass(frozen=True)
class Candidate:
    """One predicted reference concept for a source code."""

    code: str
    score: float
    rank: int
    status: str


class ReferenceTree:
    """Parent links of the reference by code, with cached upward distances (several parents allowed).

    >>> t = ReferenceTree({"A": [], "A1": ["A"], "A11": ["A1"]})
    >>> t.steps_up("A11")
    {'A1': 1, 'A': 2}
    """

    def __init__(self, parents: Mapping[str, Iterable[str]]):
        self.parents = {c: list(ps) for c, ps in parents.items()}
        self._up: dict[str, dict[str, int]] = {}

    @classmethod
    def from_structure(cls, frame: pd.DataFrame) -> ReferenceTree:
        """From `concept_structure` rows (uid, code, parent uid; one row per link)."""
        code_of = dict(zip(frame["uid"], frame["code"])) if len(frame) else {}
        parents: dict[str, list[str]] = {c: [] for c in code_of.values()}
        for uid, parent in zip(frame.get("uid", []), frame.get("parent", [])):
            if isinstance(parent, str) and parent in code_of:
                parents[code_of[uid]].append(code_of[parent])
        return cls(parents)

    def steps_up(self, code: str) -> dict[str, int]:
        """Every strict ancestor of `code` with its shortest number of BROADER steps."""
        if code not in self._up:
            dist: dict[str, int] = {}
            queue = deque((p, 1) for p in self.parents.get(code, []))
            while queue:
                c, h = queue.popleft()
                if c in dist:
                    continue
                dist[c] = h
                queue.extend((p, h + 1) for p in self.parents.get(c, []))
            self._up[code] = dist
        return self._up[code]

    def __contains__(self, code: str) -> bool:
        return code in self.parents


def partial_credit(predicted: str | None, gold: set[str], tree: ReferenceTree | None) -> tuple[float, str]:
    """(credit, kind) of one rank-1 prediction under the rule in PARTIAL_RULE.

    >>> t = ReferenceTree({"A": [], "A1": ["A"], "A11": ["A1"], "A12": ["A1"]})
    >>> partial_credit("A1", {"A11"}, t), partial_credit("A11", {"A"}, t), partial_credit("A12", {"A11"}, t)
    ((0.5, 'too_broad'), (0.25, 'too_narrow'), (0.0, 'other'))
    """
    if predicted is None:
        return 0.0, "none"
    if predicted in gold:
        return 1.0, "exact"
    if tree is None:
        return 0.0, "other"
    best, kind = None, "other"
    up_p = tree.steps_up(predicted)
    for g in gold:
        h = tree.steps_up(g).get(predicted)  # p is an ancestor of g: too broad
        if h is not None and (best is None or h < best):
            best, kind = h, "too_broad"
        h = up_p.get(g)  # g is an ancestor of p: too narrow
        if h is not None and (best is None or h < best):
            best, kind = h, "too_narrow"
    return (0.0, "other") if best is None else (0.5 ** best, kind)


def predictions_from_edges(edges: pd.DataFrame) -> dict[str, list[Candidate]]:
    """`ranked_edges` rows -> source code -> predictions in rank order (rule in the module docstring)."""
    machine: dict[str, list[Candidate]] = {}
    accepted: dict[str, list[Candidate]] = {}
    for row in edges.itertuples(index=False):
        cand = Candidate(str(row.concept_code), float(row.score), int(row.rank), str(row.status))
        if cand.status in MACHINE:
            machine.setdefault(str(row.source_code), []).append(cand)
        elif cand.status == "accepted":
            accepted.setdefault(str(row.source_code), []).append(cand)
    out = {code: sorted(c, key=lambda x: (x.rank, -x.score, x.code)) for code, c in machine.items()}
    for code, c in accepted.items():
        out.setdefault(code, sorted(c, key=lambda x: (x.rank, -x.score, x.code)))
    return out


def score_predictions(predictions: Mapping[str, list[Candidate]], answer_key: Mapping[str, set[str]], *,
                      k: int = 5, tree: ReferenceTree | None = None) -> dict:
    """The metrics of the module docstring for predictions (rank order) against an answer key."""
    if k < 1:
        raise BadInput(Problem(f"k must be at least 1, got {k}", field="--k"))
    n = len(answer_key)
    if n == 0:
        raise BadInput(Problem("answer key has no rows"))
    top1 = hit_k = covered = auto_codes = 0
    rr = partial = 0.0
    auto_edges = auto_correct = pairs = rank1_auto = rank1_auto_correct = 0
    kinds = {"exact": 0, "too_broad": 0, "too_narrow": 0, "other": 0, "none": 0}
    for code, gold in answer_key.items():
        cands = list(predictions.get(code, []))
        pairs += len(gold)
        covered += bool(cands)
        first = next((i for i, c in enumerate(cands[:k], start=1) if c.code in gold), None)
        if first is not None:
            hit_k += 1
            rr += 1.0 / first
            top1 += first == 1
        autos = {c.code for c in cands if c.status == "auto"}
        if cands and cands[0].status == "auto":
            rank1_auto += 1
            rank1_auto_correct += cands[0].code in gold
        auto_codes += bool(autos)
        auto_edges += len(autos)
        auto_correct += len(autos & gold)
        credit, kind = partial_credit(cands[0].code if cands else None, gold, tree)
        partial += credit
        kinds[kind] += 1
    precision = auto_correct / auto_edges if auto_edges else None
    recall = auto_correct / pairs
    if precision is None:
        f1 = None  # no auto edges at all: precision and F1 are undefined, not zero
    else:
        f1 = 2 * precision * recall / (precision + recall) if precision + recall else 0.0
    return {
        "scored": n,
        "top1": top1 / n,
        f"hit@{k}": hit_k / n,
        "mrr": rr / n,
        "coverage": covered / n,
        "auto_coverage": auto_codes / n,
        "auto_edges": auto_edges,
        "auto_precision": precision,
        "auto_recall": recall,
        "auto_f1": f1,
        "auto_rank1_precision": rank1_auto_correct / rank1_auto if rank1_auto else None,
        "partial": partial / n if tree is not None else None,
        "partial_breakdown": kinds if tree is not None else None,
    }


def precision_coverage_curve(predictions: Mapping[str, list[Candidate]],
                             answer_key: Mapping[str, set[str]]) -> list[dict]:
    """What auto-accepting rank 1 at each threshold would give: one point per distinct rank-1 score, best first.

    coverage = codes whose rank-1 score is >= threshold / all scored codes; precision = share of those whose rank 1
    is correct.

    >>> p = {"a": [Candidate("X", 0.9, 1, "auto")], "b": [Candidate("Y", 0.5, 1, "proposed")]}
    >>> [(pt["threshold"], pt["coverage"], pt["precision"]) for pt in precision_coverage_curve(p, {"a": {"X"},
    ...  "b": {"Z"}})]
    [(0.9, 0.5, 1.0), (0.5, 1.0, 0.5)]
    """
    n = len(answer_key)
    tops = sorted(((c[0].score, c[0].code in answer_key[code]) for code, c in predictions.items()
                   if code in answer_key and c), key=lambda t: -t[0])
    points, right = [], 0
    for seen, (score, ok) in enumerate(tops, start=1):
        right += ok
        if seen == len(tops) or tops[seen][0] != score:
            points.append({"threshold": round(score, 6), "coverage": seen / n, "precision": right / seen,
                           "codes": seen})
    return points


def best_coverage_at_precision(curve: list[dict], precision: float) -> dict | None:
    """The curve point with the most coverage whose precision is still >= `precision` (None if no point is)."""
    ok = [p for p in curve if p["precision"] >= precision]
    return max(ok, key=lambda p: p["coverage"]) if ok else None


def reliability_curve(predictions: Mapping[str, list[Candidate]], answer_key: Mapping[str, set[str]], *,
                      bins: int = 10) -> dict:
    """Rank-1 score against how often rank 1 is right, in `bins` equal-width score bins over 0..1.

    `ece` (expected calibration error) = sum over bins of (codes in bin / codes) x |accuracy - mean score|.

    >>> p = {"a": [Candidate("X", 0.95, 1, "auto")], "b": [Candidate("Y", 0.05, 1, "proposed")]}
    >>> r = reliability_curve(p, {"a": {"X"}, "b": {"Z"}}, bins=2)
    >>> [(b["count"], b["accuracy"]) for b in r["bins"]], round(r["ece"], 3)
    ([(1, 0.0), (1, 1.0)], 0.05)
    """
    tops = [(min(1.0, max(0.0, c[0].score)), c[0].code in answer_key[code]) for code, c in predictions.items()
            if code in answer_key and c]
    out, total = [], len(tops)
    ece = 0.0
    for b in range(bins):
        lo, hi = b / bins, (b + 1) / bins
        inside = [(s, ok) for s, ok in tops if lo <= s < hi or (b == bins - 1 and s == 1.0)]
        if inside:
            conf = sum(s for s, _ in inside) / len(inside)
            acc = sum(ok for _, ok in inside) / len(inside)
            ece += len(inside) / total * abs(acc - conf)
        else:
            conf = acc = None
        out.append({"low": lo, "high": hi, "count": len(inside), "mean_score": conf, "accuracy": acc})
    return {"bins": out, "ece": ece if total else None, "codes": total}


def read_answer_key(path: str | Path) -> dict[str, set[str]]:
    """`source_code,reference_code` CSV (other columns ignored) -> source code -> target codes.

    Empty codes are rejected with their line; all problems of the file are reported together.
    """
    from pipeline.ingest.text_input import read_csv_rows

    key: dict[str, set[str]] = {}
    problems: list[Problem] = []
    for line, row in read_csv_rows(path, required=["source_code", "reference_code"]):
        src, ref = row["source_code"].strip(), row["reference_code"].strip()
        for name, value in (("source_code", src), ("reference_code", ref)):
            if not value:
                problems.append(Problem("empty code", file=str(path), line=line, field=name))
        if src and ref:
            key.setdefault(src, set()).add(ref)
    if problems:
        raise BadInput(problems)
    if not key:
        raise BadInput(Problem("answer key has no rows", file=str(path)))
    return key


def load_predictions(store: Store, source: str, reference: str) -> dict[str, list[Candidate]]:
    return predictions_from_edges(store.frame("ranked_edges", source=source, reference=reference))


def load_tree(store: Store, reference: str) -> ReferenceTree:
    return ReferenceTree.from_structure(store.frame("concept_structure", scheme=reference))


def evaluate(store: Store, source: str, answer_key: dict[str, set[str]], *, reference: str | None = None,
             k: int = 5) -> dict:
    """The flat metrics for one source against `answer_key` (see the module docstring), plus input checks:
    `not_in_source` (answer-key codes the source does not have) and `unknown_targets` (target codes the reference
    does not have)."""
    data = gather(store, source, answer_key, reference=reference)
    return flat_metrics(data, k=k)


@dataclass
class Gathered:
    """What one evaluation reads from the store, read once and shared by the metrics, curves and report."""

    source: str
    reference: str
    answer_key: dict[str, set[str]]
    predictions: dict[str, list[Candidate]]
    tree: ReferenceTree
    source_codes: set[str]


def gather(store: Store, source: str, answer_key: dict[str, set[str]], *, reference: str | None = None) -> Gathered:
    schemes = store.rows("schemes_list")
    reference = choose_reference(schemes, reference)
    sources = [s["key"] for s in schemes if s["role"] == "source"]
    if source not in sources:
        raise NotFound(f"unknown source {source!r}; known: {', '.join(sources) or 'none'}")
    codes = store.frame("category_codes", scheme=source)
    return Gathered(source, reference, answer_key, load_predictions(store, source, reference),
                    load_tree(store, reference), set(codes["code"].astype(str)) if len(codes) else set())


def flat_metrics(data: Gathered, *, k: int = 5) -> dict:
    return {
        "source": data.source,
        "reference": data.reference,
        **score_predictions(data.predictions, data.answer_key, k=k, tree=data.tree),
        "not_in_source": sum(code not in data.source_codes for code in data.answer_key),
        "unknown_targets": len({t for ts in data.answer_key.values() for t in ts if t not in data.tree}),
    }


def answer_key_from_frame(frame: pd.DataFrame) -> dict[str, set[str]]:
    key: dict[str, set[str]] = {}
    for s, r in zip(frame["source_code"].astype(str), frame["reference_code"].astype(str)):
        key.setdefault(s, set()).add(r)
    return key
