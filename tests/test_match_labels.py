"""Labels reaching the evidence: neighbour votes and the ridge alignment, on small invented taxonomies."""

import json

import numpy as np
import pandas as pd

from pipeline.match.alignment import aligned_vectors
from pipeline.match.decide import Evidence, decide
from pipeline.match.features import FEATURES, ScoringModel
from pipeline.match.hierarchy_view import HierarchyView
from pipeline.match.neighbours import labelled_categories, labels_key, neighbour_votes, reliability, stored_labels


def _view(rows):
    return HierarchyView.from_rows(pd.DataFrame(rows, columns=["uid", "code", "label", "depth", "is_leaf", "parent"]))


def _unit(m):
    m = np.asarray(m, dtype=np.float32)
    return m / np.linalg.norm(m, axis=1, keepdims=True)


def test_look_alikes_sharing_a_concept_vote_for_it():
    # categories 1, 2, 3 look alike and are labelled with concept 5; category 4 is far and labelled 6
    q = _unit([[1, 0.05], [1, 0.1], [1, -0.1], [1, 0.0], [0, 1]])
    votes = neighbour_votes(q, {1: [5], 2: [5], 3: [5], 4: [6]}, [0], k=3)
    assert max(votes[0], key=votes[0].get) == 5
    # every look-alike agrees; the votes are scaled by their record on the labelled set: the far category 4 is
    # voted wrong by the others, 1..3 right, so 3/4
    assert 0.74 < votes[0][5] <= 0.75


def test_votes_fade_where_each_look_alike_has_a_concept_of_its_own():
    q = _unit([[1, 0.05], [1, 0.1], [1, -0.1], [1, 0.0]])
    labelled = {1: [5], 2: [6], 3: [7]}  # same grain on both sides: neighbours never share a concept
    votes = neighbour_votes(q, labelled, [0], k=3)
    assert reliability(neighbour_votes(q, labelled, [1, 2, 3], k=3), labelled) == 0.0
    assert all(v == 0.0 for v in votes[0].values())


def test_the_neighbour_vote_flips_a_close_text_call():
    # reference: A "Dairy farming", B "Dairy products"; source: K1..K3 labelled on A, K4 unlabelled
    concepts = _view([("a", "A", "Dairy farming", 1, True, None), ("b", "B", "Dairy products", 1, True, None)])
    cats = _view([(f"k{i}", f"K{i}", f"Milk {i}", 1, True, None) for i in range(1, 5)])
    text = np.array([[0.8, 0.2], [0.8, 0.2], [0.8, 0.2], [0.48, 0.50]], dtype=np.float32)
    ev = Evidence(pools=[[0, 1]] * 4, q_text=text, r_text=np.eye(2, dtype=np.float32))
    model = ScoringModel(weights={"text": 10.0, "neighbours": 4.0}, bias=-5.0)
    assert decide(cats, concepts, ev, model)[3].concepts[0] == 1  # B on text alone
    shape = _unit([[1, 0.1], [1, 0.12], [1, 0.08], [1, 0.1]])  # the four look alike
    ev.neighbours = neighbour_votes(shape, {0: [0], 1: [0], 2: [0]}, [3])
    ranked = decide(cats, concepts, ev, model)
    assert ranked[3].concepts[0] == 0
    assert ranked[3].features[0][FEATURES.index("neighbours")] > 0.5


def test_the_ridge_map_learns_how_the_two_sides_word_things():
    rng = np.random.default_rng(5)
    r = _unit(rng.standard_normal((60, 12)))
    rotation, _ = np.linalg.qr(rng.standard_normal((12, 12)))
    q = _unit(r @ rotation)  # category i is concept i, worded in a rotated space
    labelled = {i: [i] for i in range(40)}
    unlabelled = list(range(40, 60))
    raw = (q[unlabelled] @ r.T).argmax(axis=1)
    assert np.mean(raw == np.array(unlabelled)) < 0.3
    aligned = aligned_vectors(q, r, labelled, unlabelled)
    assert aligned is not None
    assert np.mean((aligned[unlabelled] @ r.T).argmax(axis=1) == np.array(unlabelled)) > 0.9
    # a labelled category's own vector comes from a map fitted without it, so it is no free answer
    assert np.mean((aligned[:40] @ r.T).argmax(axis=1) == np.arange(40)) > 0.8


def test_no_map_from_too_few_labels():
    r = _unit(np.eye(4))
    assert aligned_vectors(r, r, {0: [0], 1: [1]}, [2, 3]) is None


def test_the_aligned_feature_defaults_to_text_without_labels():
    concepts = _view([("a", "A", "One", 1, True, None), ("b", "B", "Two", 1, True, None)])
    cats = _view([("k", "K", "One", 1, True, None)])
    ev = Evidence(pools=[[0, 1]], q_text=np.array([[0.7, 0.3]], dtype=np.float32), r_text=np.eye(2, dtype=np.float32))
    f = decide(cats, concepts, ev, ScoringModel())[0].features
    assert np.allclose(f[:, FEATURES.index("aligned")], f[:, FEATURES.index("text")])


def test_stored_labels_and_decisions_make_the_labelled_set():
    model_json = json.dumps({"weights": {}, "bias": 0.0, labels_key("ref"): {"src": {"1": ["X"], "2": ["Y"]}}})
    stored = stored_labels(model_json, "src", "ref")
    assert stored == {"1": ["X"], "2": ["Y"]}
    assert stored_labels(model_json, "src", "other") == {} and stored_labels("", "src", "ref") == {}
    kpos, cpos = {"src:1": 0, "src:2": 1}, {"ref:X": 0, "ref:Y": 1, "ref:Z": 2}
    decided = (["src:2", "src:1"], ["ref:Z", "ref:Y"], ["accepted", "rejected"])
    out = labelled_categories(decided, stored, ["1", "2"], ["X", "Y", "Z"], kpos, cpos)
    assert out == {0: [0], 1: [2]}  # a person's acceptance outranks the stored label; a rejection is no label


def test_a_learned_model_scores_only_the_depths_its_labels_came_from():
    learned = ScoringModel(weights={"text": 1.0, "role": 9.0}, bias=0.0, source="learned", depths=[3])
    assert learned.for_depth(3) is learned
    assert learned.for_depth(1).weights == ScoringModel().weights
    assert ScoringModel.from_json(learned.to_json()).depths == [3]
    assert ScoringModel().for_depth(1).depths is None and "depths" not in ScoringModel().to_json()
