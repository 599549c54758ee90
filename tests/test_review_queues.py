"""The four review queues on a tiny hand-made crosswalk (tests/review_graphs.py): which categories, why, in what
order."""

import pytest

from pipeline.errors import BadInput, NotFound
from pipeline.ingest.reference_job import ingest_reference
from pipeline.review.decisions import Decision, decide
from pipeline.review.queues import QueueSettings, queue_frame, review_queue
from pipeline.store import open_store
from review_graphs import REFERENCE, build, edges_of


@pytest.fixture
def store(tmp_path):
    with open_store(build(tmp_path)) as s:
        yield s


def codes(entries):
    return [f"{e.source}:{e.code}" for e in entries]


def test_unmapped_lists_categories_without_candidates(store):
    got = review_queue(store, "unmapped")
    assert codes(got) == ["shop:6"]
    assert got[0].reasons == ["no candidate above the floor"]
    assert got[0].titles == ["Gift card", "Mystery box"]
    assert got[0].candidates == []


def test_uncertain_has_low_scores_and_small_margins_most_items_first(store):
    got = review_queue(store, "uncertain")
    assert codes(got) == ["shop:3", "shop:5"]  # 3 items, then 2
    assert "below the auto threshold" in got[0].reasons[0]
    assert got[1].reasons == ["first two candidates within 0.010 (PA 0.85, KC 0.84)"]
    assert [c["concept_code"] for c in got[1].candidates] == ["PA", "KC"]
    assert got[1].candidates[0]["evidence"] == {"path~path": 0.85, "label~label": 0.75}


def test_margin_is_a_setting(store):
    got = review_queue(store, "uncertain", settings=QueueSettings(margin=0.005))
    assert codes(got) == ["shop:3"]


def test_conflicting_finds_child_outside_parent_subtree_and_shared_items(store):
    got = {f"{e.source}:{e.code}": e.reasons for e in review_queue(store, "conflicting")}
    assert set(got) == {"shop:7", "shop:2", "mart:2"}
    assert got["shop:7"] == ["mapped to KN (Knives), outside the subtree of G (Garden) where its parent 1 "
                             "(Garden) is mapped"]
    assert got["shop:2"] == ["shares 4 item keys with mart:2 (Cutters), which maps to unrelated LM (Lawn mowers)"]


def test_conflicting_finds_live_edges_in_unrelated_branches(store):
    decide(store, Decision("accept", "shop", "4", "K"))
    decide(store, Decision("accept", "shop", "4", "G", note="kitchen garden"))  # 1:n across two branches
    got = {e.code: e.reasons for e in review_queue(store, "conflicting", sources=["shop"])}
    assert got["4"] == ["live edges into unrelated branches: K (Kitchen) and G (Garden)"]


def test_source_filter_and_limit(store):
    assert codes(review_queue(store, "conflicting", sources=["mart"])) == ["mart:2"]
    assert len(review_queue(store, "conflicting", limit=1)) == 1
    with pytest.raises(NotFound):
        review_queue(store, "unmapped", sources=["nope"])
    with pytest.raises(BadInput):
        review_queue(store, "everything")


def test_a_decision_takes_the_category_out_of_uncertain(store):
    decide(store, Decision("accept", "shop", "3", "LM"))
    assert codes(review_queue(store, "uncertain")) == ["shop:5"]


def test_stale_after_a_reference_upgrade(store, tmp_path):
    decide(store, Decision("accept", "shop", "5", "PA", by="ana"))
    assert review_queue(store, "stale") == []
    v2 = REFERENCE.replace("PA,Pans,KC\n", "").replace("LM,Lawn mowers,G", "LM,Lawn and turf mowers,G")
    (tmp_path / "ref_v2.csv").write_text(v2)
    ingest_reference(store, tmp_path / "ref_v2.csv", fmt="tree", scheme="ref")
    got = {f"{e.source}:{e.code}": e.reasons for e in review_queue(store, "stale")}
    # the upgrade sent the decision back to review (status stale, pipeline/ingest/reference_job.py)
    assert got["shop:5"] == ["decision by ana on PA (Pans) went back to review: the concept was retired in a "
                             "reference upgrade"]
    assert got["mart:2"] == ["auto edge to LM (Lawn and turf mowers), which changed since it was proposed "
                             "(now: Garden > Lawn and turf mowers)"]
    # re-confirming the changed edge, and remapping the retired one, take them out of the queue
    decide(store, Decision("accept", "mart", "2", "LM"))
    decide(store, Decision("remap", "shop", "5", "KC"))
    assert review_queue(store, "stale") == []
    assert edges_of(store, "shop:5") == {"KC": "accepted", "PA": "rejected"}


def test_queue_frame_folds_rows_for_a_terminal(store):
    df = queue_frame(review_queue(store, "uncertain"))
    assert list(df.columns) == ["source", "code", "path", "items", "titles", "candidates", "why"]
    assert df.iloc[1]["candidates"] == "PA Pans 0.85 auto; KC Cookware 0.84 proposed"
