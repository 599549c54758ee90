"""record_machine_edges: a run's proposals enter the history once, changes and withdrawals are recorded."""

import pytest

from pipeline.review.events import edge_history
from pipeline.store import open_store
from review_graphs import EDGES, build, write_machine_edges


@pytest.fixture
def store(tmp_path):
    with open_store(build(tmp_path)) as s:
        yield s


def actions(store, uid):
    return [(h["action"], h["concept_code"], h["run_id"]) for h in edge_history(store, uid).to_dict("records")]


def test_first_run_records_every_proposal_with_score_and_rank(store):
    hist = edge_history(store, "shop:5").to_dict("records")
    assert [(h["action"], h["concept_code"], h["status"], h["rank"]) for h in hist] == [
        ("proposed", "PA", "auto", 1), ("proposed", "KC", "proposed", 2)]
    assert hist[0]["score"] == pytest.approx(0.85)


def test_an_unchanged_rerun_records_nothing(store):
    write_machine_edges(store, EDGES, "map-test-2")
    assert [a[2] for a in actions(store, "shop:5")] == ["map-test-1", "map-test-1"]


def test_a_changed_score_and_a_vanished_edge_are_recorded(store):
    changed = [e for e in EDGES if e[0] != "shop:5"] + [("shop:5", "ref:PA", 0.95, 1, "auto")]
    write_machine_edges(store, changed, "map-test-2")
    assert actions(store, "shop:5") == [("proposed", "PA", "map-test-1"), ("proposed", "KC", "map-test-1"),
                                        ("proposed", "PA", "map-test-2"), ("withdrawn", "KC", "map-test-2")]
