"""Candidate retrieval and hierarchy-aware re-ranking, on tiny literal inputs."""

import numpy as np
import pandas as pd
import pytest

from pipeline.match.candidates import stack_signals, top_k
from pipeline.match.hierarchy_view import HierarchyView
from pipeline.match.match_type import match_type
from pipeline.match.normalise import normalise_label
from pipeline.match.decide import Evidence, decide, learn_depth_prior
from pipeline.match.features import FEATURES, ScoringModel


def test_top_k_matches_a_full_sort_in_every_block():
    rng = np.random.default_rng(3)
    q = rng.standard_normal((37, 8)).astype(np.float32)
    r = rng.standard_normal((50, 8)).astype(np.float32)
    idx, sc = top_k(q, r, k=4, block=5)
    full = q @ r.T
    expected = np.argsort(-full, axis=1, kind="stable")[:, :4]
    assert np.array_equal(idx, expected)
    assert np.allclose(sc, np.take_along_axis(full, expected, axis=1))


def test_stacked_signals_give_the_weighted_sum_of_cosines():
    rng = np.random.default_rng(4)
    a, b, c, d = (rng.standard_normal((3, 5)).astype(np.float32) for _ in range(4))
    q, r = stack_signals([(a, b, 0.7), (c, d, 0.3)])
    assert np.allclose(q @ r.T, 0.7 * a @ b.T + 0.3 * c @ d.T, atol=1e-5)


def _view(rows):
    return HierarchyView.from_rows(pd.DataFrame(rows, columns=["uid", "code", "label", "depth", "is_leaf", "parent"]))


# reference: R > G "Mixed farming" > C "Mixed farming" (a title repeated at two levels), and X elsewhere
CONCEPTS = _view([
    ("r", "R", "Farming", 1, False, None),
    ("g", "G", "Mixed farming", 2, False, "r"),
    ("c", "C", "Mixed farming", 3, True, "g"),
    ("x", "X", "Fishing", 1, True, None),
])
TEXT_ONLY = ScoringModel(weights={"text": 10.0}, bias=-5.0)


def _evidence(text_rows):
    """Evidence whose fused text score of category i with concept j is text_rows[i][j] (one-hot trick)."""
    t = np.array(text_rows, dtype=np.float32)
    return Evidence(pools=[list(range(t.shape[1]))] * t.shape[0], q_text=t, r_text=np.eye(t.shape[1], dtype=np.float32))


def test_repeated_title_goes_to_the_deeper_concept_for_a_leaf_category():
    cats = _view([("s1", "1", "Mixed farming", 1, True, None)])
    ranked = decide(cats, CONCEPTS, _evidence([[0.2, 0.90, 0.89, 0.1]]), TEXT_ONLY)
    assert ranked[0].concepts[0] == 2  # "c", the leaf


def test_repeated_title_stays_on_the_inner_concept_for_an_inner_category():
    cats = _view([("s1", "1", "Mixed farming", 1, False, None), ("s2", "2", "Mixed farming", 2, True, "s1")])
    ranked = decide(cats, CONCEPTS, _evidence([[0.2, 0.89, 0.90, 0.1], [0.2, 0.90, 0.89, 0.1]]), TEXT_ONLY)
    assert ranked[0].concepts[0] == 1  # inner category -> inner concept "g"
    assert ranked[1].concepts[0] == 2  # its leaf child -> leaf concept "c"


def test_a_clear_winner_is_not_overridden_by_the_repeated_title_rule():
    cats = _view([("s1", "1", "Mixed farming", 1, True, None)])
    ranked = decide(cats, CONCEPTS, _evidence([[0.2, 0.95, 0.80, 0.1]]), TEXT_ONLY)
    assert ranked[0].concepts[0] == 1


def test_the_parent_choice_favours_candidates_in_its_region():
    cats = _view([("p", "P", "Farming", 1, False, None), ("k", "K", "Fish and farms", 2, True, "p")])
    model = ScoringModel(weights={"text": 10.0, "parent": 1.0}, bias=-5.0)
    ranked = decide(cats, CONCEPTS, _evidence([[0.9, 0.1, 0.1, 0.1], [0.1, 0.1, 0.48, 0.50]]), model)
    assert ranked[1].concepts[0] == 2  # "c" sits under "r", the parent's choice: 4.8 + 1 beats 5.0
    assert ranked[1].features[0][FEATURES.index("parent")] == 1.0


def test_rejected_concepts_are_never_candidates():
    cats = _view([("s1", "1", "Fishing", 1, True, None)])
    ranked = decide(cats, CONCEPTS, _evidence([[0.1, 0.1, 0.1, 0.99]]), TEXT_ONLY, excluded={0: {3}})
    assert 3 not in ranked[0].concepts


def test_probabilities_follow_the_logistic_model():
    cats = _view([("s1", "1", "Fishing", 1, True, None)])
    ranked = decide(cats, CONCEPTS, _evidence([[0.1, 0.2, 0.3, 0.5]]), TEXT_ONLY)
    assert ranked[0].probs[0] == pytest.approx(0.5)  # 10 * 0.5 - 5 = 0


def test_depth_prior_prefers_the_depth_confident_choices_show():
    cats = _view([("a", "A", "x", 1, True, None), ("b", "B", "y", 1, True, None), ("c", "C", "z", 1, True, None)])
    ranked = decide(cats, CONCEPTS, _evidence([[0.1, 0.95, 0.1, 0.1], [0.1, 0.9, 0.1, 0.1], [0.1, 0.1, 0.2, 0.1]]),
                    TEXT_ONLY)
    prior = learn_depth_prior(cats, CONCEPTS, ranked, sample=0.67)
    assert prior[1, 2] == 1.0 and prior[1, 3] < prior[1, 2]


def test_ancestors_of_a_multi_parent_node():
    v = _view([("a", "A", "A", 1, False, None), ("b", "B", "B", 1, False, None), ("c", "C", "C", 2, True, "a"),
               ("c", "C", "C", 2, True, "b"), ("d", "D", "D", 3, True, "c")])
    anc = v.ancestors()
    assert anc[v.uids.index("d")] == {v.uids.index(x) for x in "abc"}


def test_match_type_rules():
    assert normalise_label("Pots & Planters") == "pots and planters"
    assert match_type("Pots & planters", ["Pots and planters"], shared_with_family=False, split=False) == "exactMatch"
    assert match_type("Secateurs", ["Pruning tools"], shared_with_family=True, split=False) == "broadMatch"
    assert match_type("Secateurs", ["Pruning tools"], shared_with_family=False, split=False) == "closeMatch"


def test_repeated_title_for_an_inner_category_follows_the_learned_level():
    # reference: S "Energy supply" (depth 1) > D "Energy supply" (depth 2) > leaf K; both inner, same title
    concepts = _view([
        ("s", "S", "Energy supply", 1, False, None),
        ("d", "D", "Energy supply", 2, False, "s"),
        ("k", "K", "Power plants", 3, True, "d"),
    ])
    cats = _view([("t", "T", "Energy supply", 1, False, None), ("u", "U", "Plants", 2, True, "t")])
    ev = _evidence([[0.90, 0.895, 0.1], [0.1, 0.1, 0.9]])
    without = decide(cats, concepts, ev, TEXT_ONLY)
    assert without[0].concepts[0] == 1  # no prior yet: the deeper inner concept, as before
    prior = np.full((3, 4), 0.2)
    prior[1, 1] = 1.0  # top-level categories usually land on top-level concepts
    ranked = decide(cats, concepts, ev, TEXT_ONLY, depth_prior=prior)
    assert ranked[0].concepts[0] == 0


def test_vectorised_lexical_overlap_equals_the_pairwise_rule():
    from pipeline.match.lexical_batch import pool_lexical
    from pipeline.match.lexical_overlap import lexical_similarity, word_weights

    cats = ["Pots & Planters", "Garden tools", "Other", "", "Boxes and crates", "Secateurs"]
    concept_labels = [["Planters and pots"], ["Tools, garden", "Hand tools"], [], ["Crates", ""], ["Lawn mowers"]]
    weights = word_weights(cats + [labs[0] for labs in concept_labels if labs])
    cand = np.array([[0, 1, 2, -1], [1, 4, 0, 3], [2, 3, -1, -1], [0, 1, 3, 4], [3, 0, 1, 2], [4, 0, -1, 1]])
    got = pool_lexical(cats, concept_labels, cand, weights)
    for i, row in enumerate(cand):
        for k, j in enumerate(row):
            want = 0.0 if j < 0 else max((lexical_similarity(cats[i], lab, weights)
                                           for lab in concept_labels[j] if lab), default=0.0)
            assert got[i, k] == pytest.approx(want, abs=1e-12), (cats[i], j)
    assert got[0, 0] == pytest.approx(1.0) and got[1, 1] == 0.0


def test_children_get_candidates_from_under_their_parents_concept():
    from pipeline.match.region_pool import extend_pools

    concepts = _view([
        ("r", "R", "Trade", 1, False, None),
        ("a", "A", "Agents", 2, True, "r"),
        ("b", "B", "Brokers", 2, True, "r"),
        ("x", "X", "Mining", 1, True, None),
    ])
    cats = _view([("p", "P", "Trade", 1, False, None), ("k", "K", "Fee-based sales", 2, True, "p")])
    q = np.array([[1, 0, 0], [0, 1, 0]], dtype=np.float32)
    r = np.array([[1, 0, 0], [0, 0.9, 0.1], [0, 0.5, 0.5], [0, 0.95, 0]], dtype=np.float32)
    pools = [[0], [3]]
    added = extend_pools(pools, cats, concepts, {0: 0}, q, r, [1], per_category=1)
    assert added == 1 and pools[1] == [3, 1]  # "Agents", the best-scoring concept under "Trade"
    assert extend_pools([[0], [3]], cats, concepts, {0: 0}, q, r, [1], max_region=2) == 0  # region too wide


def test_evidence_text_is_the_json_of_the_rounded_features():
    import json

    from pipeline.match.map_job import _evidence_json

    f = np.array([0.123456, 1.0, 0.5, 0.0, 1e-6, 0.99999, -0.25, 0.3333333, 0.6666666, 1 / 7, 2 / 3, 0.25, 0.875])
    assert len(f) == len(FEATURES)
    assert json.loads(_evidence_json(f)) == {n: round(float(v), 4) for n, v in zip(FEATURES, f)}
    assert _evidence_json(f) == json.dumps({n: round(float(v), 4) for n, v in zip(FEATURES, f)}, sort_keys=True)


def test_a_decided_sibling_pulls_the_undecided_ones_to_its_region():
    # reference: R > {A, B} and S > {C}; categories P > {k1 (decided on A), k2 (unsure between B and C)}
    concepts = _view([
        ("r", "R", "Trade", 1, False, None), ("a", "A", "Agents", 2, True, "r"), ("b", "B", "Brokers", 2, True, "r"),
        ("s", "S", "Retail", 1, False, None), ("c", "C", "Shops", 2, True, "s"),
    ])
    cats = _view([("p", "P", "Sales", 1, False, None), ("k1", "K1", "Agents", 2, True, "p"),
                  ("k2", "K2", "Intermediaries", 2, True, "p")])
    text = [[0.5, 0.1, 0.1, 0.5, 0.1], [0.1, 0.9, 0.1, 0.1, 0.1], [0.1, 0.1, 0.60, 0.1, 0.62]]
    model = ScoringModel(weights={"text": 10.0, "siblings": 2.0}, bias=-5.0)
    alone = decide(cats, concepts, _evidence(text), model)
    assert alone[2].concepts[0] == 4  # "C" on text alone
    ev = _evidence(text)
    ev.decided = {1: 1}  # a person accepted K1 -> A
    ranked = decide(cats, concepts, ev, model)
    assert ranked[2].concepts[0] == 2  # "B", beside A under R
    assert ranked[2].features[0][FEATURES.index("siblings")] == 1.0
    assert ranked[0].features[0][FEATURES.index("siblings")] == 0.0  # P has no siblings
