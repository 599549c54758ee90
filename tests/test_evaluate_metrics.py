"""Evaluation metrics on tiny literal cases, each small enough to check by hand.

Definitions of top-1, hit@k, MRR, precision/recall/F1 and expected calibration error: common practice, no source.
The partial-credit rule is ours (stated in pipeline/match/evaluate.py).
"""

import pandas as pd
import pytest

from pipeline.errors import BadInput
from pipeline.match.evaluate import (
    Candidate,
    ReferenceTree,
    best_coverage_at_precision,
    partial_credit,
    precision_coverage_curve,
    predictions_from_edges,
    read_answer_key,
    reliability_curve,
    score_predictions,
)

# A > A1 > (A11, A12); B > B1
TREE = ReferenceTree({"A": [], "A1": ["A"], "A11": ["A1"], "A12": ["A1"], "B": [], "B1": ["B"]})


def c(code, score=0.5, rank=1, status="proposed"):
    return Candidate(code, score, rank, status)


def test_top1_hit_and_mrr_by_hand():
    preds = {
        "s1": [c("A11", rank=1), c("A12", rank=2)],   # right at rank 1
        "s2": [c("B1", rank=1), c("A12", rank=2)],    # right at rank 2
        "s3": [c("B", rank=1)],                       # wrong
        "s4": [],                                     # nothing predicted
    }
    key = {"s1": {"A11"}, "s2": {"A12"}, "s3": {"A"}, "s4": {"B1"}}
    m = score_predictions(preds, key, k=5)
    assert m["scored"] == 4
    assert m["top1"] == 1 / 4
    assert m["hit@5"] == 2 / 4
    assert m["mrr"] == pytest.approx((1 + 1 / 2) / 4)
    assert m["coverage"] == 3 / 4


def test_hit_at_k_only_looks_at_the_first_k():
    preds = {"s": [c("X", rank=1), c("Y", rank=2), c("A", rank=3)]}
    assert score_predictions(preds, {"s": {"A"}}, k=2)["hit@2"] == 0.0
    assert score_predictions(preds, {"s": {"A"}}, k=3)["hit@3"] == 1.0
    assert score_predictions(preds, {"s": {"A"}}, k=2)["mrr"] == 0.0


def test_any_of_several_targets_counts():
    m = score_predictions({"s": [c("B1")]}, {"s": {"A11", "B1"}}, k=5)
    assert m["top1"] == 1.0


def test_auto_precision_recall_f1_over_pairs():
    preds = {
        "s1": [c("A11", 0.9, 1, "auto"), c("B1", 0.88, 2, "auto")],  # one right, one wrong auto edge
        "s2": [c("A12", 0.95, 1, "auto")],                          # right
        "s3": [c("B", 0.4, 1, "proposed")],                          # no auto edge
    }
    key = {"s1": {"A11"}, "s2": {"A12", "A11"}, "s3": {"B"}}  # 4 answer-key pairs
    m = score_predictions(preds, key, k=5)
    assert m["auto_edges"] == 3
    assert m["auto_precision"] == 2 / 3
    assert m["auto_recall"] == 2 / 4
    assert m["auto_f1"] == pytest.approx(2 * (2 / 3) * 0.5 / (2 / 3 + 0.5))
    assert m["auto_coverage"] == 2 / 3
    assert m["auto_rank1_precision"] == 1.0  # both rank-1 auto edges are right; the 1:n extra is not counted


def test_no_auto_edges_leaves_precision_undefined_not_zero():
    m = score_predictions({"s": [c("A")]}, {"s": {"A"}}, k=5)
    assert m["auto_precision"] is None and m["auto_f1"] is None
    assert m["auto_recall"] == 0.0


def test_k_below_one_is_bad_input():
    with pytest.raises(BadInput):
        score_predictions({}, {"s": {"A"}}, k=0)


@pytest.mark.parametrize("predicted, gold, expected", [
    ("A11", {"A11"}, (1.0, "exact")),
    ("A1", {"A11"}, (0.5, "too_broad")),      # parent of the target: one step
    ("A", {"A11"}, (0.25, "too_broad")),      # grandparent: two steps
    ("A11", {"A1"}, (0.5, "too_narrow")),     # child of the target
    ("A12", {"A11"}, (0.0, "other")),         # sibling: no credit
    ("B1", {"A11"}, (0.0, "other")),          # another branch
    (None, {"A11"}, (0.0, "none")),
    ("A1", {"A11", "B"}, (0.5, "too_broad")),  # nearest related target counts
])
def test_partial_credit_rule(predicted, gold, expected):
    assert partial_credit(predicted, gold, TREE) == expected


def test_partial_credit_takes_the_nearest_of_several_parents():
    tree = ReferenceTree({"R": [], "M": ["R"], "X": ["M", "R"]})  # X under M and directly under R
    assert tree.steps_up("X") == {"M": 1, "R": 1}
    assert partial_credit("R", {"X"}, tree) == (0.5, "too_broad")


def test_partial_score_and_breakdown():
    preds = {"s1": [c("A11")], "s2": [c("A1")], "s3": [c("B1")], "s4": []}
    key = {"s1": {"A11"}, "s2": {"A12"}, "s3": {"A"}, "s4": {"B"}}
    m = score_predictions(preds, key, k=5, tree=TREE)
    assert m["partial"] == pytest.approx((1 + 0.5 + 0 + 0) / 4)
    assert m["partial_breakdown"] == {"exact": 1, "too_broad": 1, "too_narrow": 0, "other": 1, "none": 1}


def test_partial_is_absent_without_a_tree():
    assert score_predictions({"s": [c("A")]}, {"s": {"A"}}, k=5)["partial"] is None


def test_precision_coverage_curve_by_hand():
    preds = {"a": [c("X", 0.9)], "b": [c("Y", 0.7)], "c": [c("Z", 0.7)], "d": [c("Q", 0.2)], "e": []}
    key = {"a": {"X"}, "b": {"Y"}, "c": {"W"}, "d": {"Q"}, "e": {"E"}}
    pts = precision_coverage_curve(preds, key)
    assert [(p["threshold"], p["coverage"], p["precision"]) for p in pts] == [
        (0.9, 1 / 5, 1.0), (0.7, 3 / 5, 2 / 3), (0.2, 4 / 5, 3 / 4)]
    assert best_coverage_at_precision(pts, 0.7)["threshold"] == 0.2
    assert best_coverage_at_precision(pts, 0.99)["coverage"] == 1 / 5
    assert best_coverage_at_precision(pts, 1.01) is None


def test_reliability_bins_by_hand():
    preds = {"a": [c("X", 0.95)], "b": [c("Y", 0.91)], "c": [c("Z", 0.15)], "d": [c("Q", 1.0)]}
    key = {"a": {"X"}, "b": {"N"}, "c": {"Z"}, "d": {"Q"}}
    rel = reliability_curve(preds, key, bins=10)
    top, low = rel["bins"][9], rel["bins"][1]
    assert (top["count"], top["accuracy"]) == (3, 2 / 3)  # 1.0 falls into the last bin
    assert top["mean_score"] == pytest.approx((0.95 + 0.91 + 1.0) / 3)
    assert (low["count"], low["accuracy"]) == (1, 1.0)
    assert rel["bins"][5]["count"] == 0 and rel["bins"][5]["accuracy"] is None
    expected = 3 / 4 * abs(2 / 3 - (0.95 + 0.91 + 1.0) / 3) + 1 / 4 * abs(1.0 - 0.15)
    assert rel["ece"] == pytest.approx(expected)


def test_predictions_from_edges_machine_first_accepted_fallback_rejected_never():
    edges = pd.DataFrame([
        ("s1", "B", 2, 0.4, "proposed"), ("s1", "A", 1, 0.9, "auto"), ("s1", "R", 1, 0.9, "rejected"),
        ("s2", "C", 1, 1.0, "accepted"),
        ("s3", "D", 1, 0.8, "rejected"),
    ], columns=["source_code", "concept_code", "rank", "score", "status"])
    preds = predictions_from_edges(edges)
    assert [x.code for x in preds["s1"]] == ["A", "B"]
    assert [x.code for x in preds["s2"]] == ["C"]
    assert "s3" not in preds


def test_read_answer_key_groups_several_rows(tmp_path):
    f = tmp_path / "key.csv"
    f.write_text("source_code,reference_code,relation\n1, A ,x\n1,B,\n2,C,\n")
    assert read_answer_key(f) == {"1": {"A", "B"}, "2": {"C"}}


def test_read_answer_key_names_every_empty_code(tmp_path):
    f = tmp_path / "key.csv"
    f.write_text("source_code,reference_code\n1,A\n,B\n3,\n")
    with pytest.raises(BadInput) as err:
        read_answer_key(f)
    text = str(err.value)
    assert "key.csv:3 [source_code]" in text and "key.csv:4 [reference_code]" in text


def test_read_answer_key_missing_column(tmp_path):
    f = tmp_path / "key.csv"
    f.write_text("source,reference_code\n1,A\n")
    with pytest.raises(BadInput, match="source_code"):
        read_answer_key(f)


def test_benchmark_split_keeps_a_codes_rows_together():
    import importlib.util
    from pathlib import Path

    spec = importlib.util.spec_from_file_location("bench_oracles",
                                                  Path(__file__).parent.parent / "benchmarks" / "oracles.py")
    bench = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(bench)
    rows = [{"source_code": str(i // 2), "reference_code": f"R{i}"} for i in range(20)]  # 10 codes, 2 rows each
    learn, held = bench.split_key(rows, 0.2, seed=1)
    assert len({r["source_code"] for r in learn}) == 2 and len(learn) == 4
    assert not {r["source_code"] for r in learn} & {r["source_code"] for r in held}
    assert bench.split_key(rows, 0.2, seed=1) == (learn, held)  # seeded
    assert bench.scheme_keys(Path("a1-to-b2")) == ("a1", "b2")
    assert bench.scheme_keys(Path("odd name")) == ("source", "reference")
