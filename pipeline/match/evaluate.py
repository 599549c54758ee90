"""Score a source's MAPS_TO edges against an answer key (`source_code,reference_code`, several rows allowed).

A source code counts as correct at rank k when one of its first k candidates is among its answer-key targets.
Only source codes that appear in the answer key are scored.
"""

from __future__ import annotations

from pathlib import Path

import pandas as pd

from pipeline.errors import BadInput, Problem
from pipeline.match.map_job import _pick_reference
from pipeline.store import Store


def read_answer_key(path: str | Path) -> dict[str, set[str]]:
    from pipeline.ingest.text_input import read_csv_rows

    key: dict[str, set[str]] = {}
    for _line, row in read_csv_rows(path, required=["source_code", "reference_code"]):
        key.setdefault(row["source_code"].strip(), set()).add(row["reference_code"].strip())
    if not key:
        raise BadInput(Problem("answer key has no rows", file=str(path)))
    return key


def evaluate(store: Store, source: str, answer_key: dict[str, set[str]], *, reference: str | None = None,
             k: int = 5) -> dict:
    reference = _pick_reference(store.rows("schemes_list"), reference)
    edges = store.frame("ranked_edges", source=source, reference=reference)
    by_code: dict[str, list[tuple[int, str, float, str]]] = {}
    for row in edges.itertuples(index=False):
        by_code.setdefault(row.source_code, []).append((int(row.rank), row.concept_code, float(row.score),
                                                        row.status))
    n = len(answer_key)
    top1 = hit_k = 0
    rr = 0.0
    auto_total = auto_correct = 0
    for code, gold in answer_key.items():
        cands = sorted(by_code.get(code, []))
        machine = [c for c in cands if c[3] in ("auto", "proposed")] or cands
        ranks = [i for i, c in enumerate(machine[:k], start=1) if c[1] in gold]
        if ranks:
            hit_k += 1
            rr += 1.0 / ranks[0]
            top1 += ranks[0] == 1
        autos = [c for c in cands if c[3] == "auto"]
        if autos:
            auto_total += 1
            auto_correct += autos[0][1] in gold
    return {
        "source": source,
        "reference": reference,
        "scored": n,
        "top1": top1 / n,
        f"hit@{k}": hit_k / n,
        "mrr": rr / n,
        "auto_coverage": auto_total / n,
        "auto_precision": (auto_correct / auto_total) if auto_total else None,
    }


def answer_key_from_frame(frame: pd.DataFrame) -> dict[str, set[str]]:
    key: dict[str, set[str]] = {}
    for s, r in zip(frame["source_code"].astype(str), frame["reference_code"].astype(str)):
        key.setdefault(s, set()).add(r)
    return key
