"""Decisions on edges: what each one does to the edges, the items' placements and the history."""

import pytest

from pipeline.errors import BadInput, NotFound
from pipeline.ingest.reference_job import ingest_reference
from pipeline.review.decisions import Decision, apply_decisions, decide, who
from pipeline.review.events import edge_history
from pipeline.store import open_store
from review_graphs import REFERENCE, build, edges_of


@pytest.fixture
def store(tmp_path):
    with open_store(build(tmp_path)) as s:
        yield s


def test_accept_a_proposed_edge_drops_the_machine_edges_and_places_items(store):
    summary = decide(store, Decision("accept", "shop", "3", "LM", note="mowers are mowers", by="ana"))
    assert summary["applied"] == 1
    assert edges_of(store, "shop:3") == {"LM": "accepted"}
    edge = store.rows("review_edges", sources=["shop"], reference="ref")
    lm = [e for e in edge if e["category"] == "shop:3"][0]
    assert (lm["decided_by"], lm["note"]) == ("ana", "mowers are mowers")
    assert summary["placed"]["categories"] == 1  # only this category was placed again


def test_accept_places_the_items_of_the_category(store):
    before = int(store.frame("count_placed", reference="ref")["placements"].iloc[0])
    decide(store, Decision("accept", "shop", "3", "LM"))
    after = int(store.frame("count_placed", reference="ref")["placements"].iloc[0])
    assert after == before + 3  # three items under shop:3


def test_reject_the_auto_edge_unplaces_and_keeps_others(store):
    before = int(store.frame("count_placed", reference="ref")["placements"].iloc[0])
    decide(store, Decision("reject", "shop", "5", "PA"))
    assert edges_of(store, "shop:5") == {"PA": "rejected", "KC": "proposed"}
    after = int(store.frame("count_placed", reference="ref")["placements"].iloc[0])
    assert after == before - 2


def test_reject_a_concept_never_proposed_creates_a_rejected_edge(store):
    decide(store, Decision("reject", "shop", "6", "KN"))
    assert edges_of(store, "shop:6") == {"KN": "rejected"}


def test_remap_rejects_the_live_edge_and_finds_the_concept_by_label(store):
    decide(store, Decision("remap", "shop", "7", "knives", note="wrong branch"))  # label, not code
    assert edges_of(store, "shop:7") == {"KN": "accepted"}  # same concept: the auto edge became accepted
    decide(store, Decision("remap", "shop", "2", "garden tools"))
    assert edges_of(store, "shop:2") == {"GT": "accepted", "PR": "rejected"}
    hist = edge_history(store, "shop:2")
    assert list(hist["action"])[-2:] == ["accepted", "rejected"]
    assert hist.iloc[-1]["note"] == "remapped to GT"


def test_remap_search_must_be_unambiguous(store):
    with pytest.raises(BadInput, match="several concepts"):
        decide(store, Decision("remap", "shop", "6", "ers"))  # Pruners, Lawn mowers


def test_exact_label_wins_over_search(store):
    decide(store, Decision("remap", "shop", "6", "Garden"))
    assert edges_of(store, "shop:6") == {"G": "accepted"}


def test_reopen_hands_machine_edges_back_and_removes_a_persons_own(store):
    decide(store, Decision("accept", "shop", "5", "PA"))
    decide(store, Decision("reject", "shop", "6", "KN"))
    decide(store, Decision("reopen", "shop", "5"))
    decide(store, Decision("reopen", "shop", "6", "KN"))
    assert edges_of(store, "shop:5") == {"PA": "proposed"}
    assert edges_of(store, "shop:6") == {}
    with pytest.raises(NotFound, match="no decision to reopen"):
        decide(store, Decision("reopen", "shop", "3"))


def test_bad_decisions_name_what_is_wrong_and_write_nothing(store):
    before = store.frame("review_edges", sources=[], reference="ref")
    with pytest.raises(NotFound, match="no category '99'"):
        decide(store, Decision("accept", "shop", "99", "LM"))
    with pytest.raises(NotFound, match="no concept 'ZZ'"):
        decide(store, Decision("accept", "shop", "3", "ZZ"))
    with pytest.raises(NotFound, match="no source taxonomy"):
        decide(store, Decision("accept", "nope", "3", "LM"))
    with pytest.raises(BadInput, match="unknown decision"):
        apply_decisions(store, [Decision("accept", "shop", "3", "LM"), Decision("maybe", "shop", "3", "LM")])
    assert store.frame("review_edges", sources=[], reference="ref").equals(before)


def test_accepting_a_retired_concept_is_refused(store, tmp_path):
    (tmp_path / "v2.csv").write_text(REFERENCE.replace("KN,Knives,K\n", ""))
    ingest_reference(store, tmp_path / "v2.csv", fmt="tree", scheme="ref")
    with pytest.raises(BadInput, match="retired"):
        decide(store, Decision("accept", "shop", "7", "KN"))


def test_history_names_the_run_and_the_person(store):
    decide(store, Decision("accept", "shop", "3", "LM", by="ana", note="checked"))
    hist = edge_history(store, "shop:3").to_dict("records")
    assert [(h["action"], h["concept_code"], h["run_id"] or h["actor"]) for h in hist] == [
        ("proposed", "LM", "map-test-1"), ("proposed", "GT", "map-test-1"),
        ("accepted", "LM", "ana"), ("superseded", "GT", "ana")]
    assert hist[0]["score"] == pytest.approx(0.62)
    assert hist[2]["note"] == "checked"


def test_who_comes_from_by_then_the_environment(monkeypatch):
    monkeypatch.setenv("GRAFTWORK_USER", "bo")
    assert who() == "bo"
    assert who("ana") == "ana"


def test_a_ref_is_applied_once(store):
    d = Decision("reject", "shop", "5", "KC", ref="r-1")
    assert apply_decisions(store, [d])["applied"] == 1
    decide(store, Decision("reopen", "shop", "5", "KC"))
    again = apply_decisions(store, [d])
    assert (again["applied"], again["skipped_already_applied"]) == (0, 1)
    assert edges_of(store, "shop:5")["KC"] == "proposed"
