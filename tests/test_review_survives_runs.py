"""Decisions outrank every later run: they survive `map` and whole-pipeline re-runs and a reference upgrade,
on the invented demo scenario (small)."""

import pytest

from pipeline.jobs.demo import run_demo
from pipeline.match.map_job import map_sources
from pipeline.place.place_job import place
from pipeline.review.decisions import Decision, apply_decisions
from pipeline.review.queues import review_queue
from pipeline.store import open_store


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    tmp = tmp_path_factory.mktemp("review_demo")
    store = tmp / "demo.lbug"
    run_demo(store, data_dir=tmp / "data", n_items=300, seed=5)
    with open_store(store) as s:
        source = "fennelgrist"
        edges = s.frame("review_edges", sources=[source], reference="market")
        ranked = edges[edges["rank"] == 2].head(3)  # three categories with a second candidate
        a, b, c = ranked.to_dict("records")
        concepts = s.frame("concept_structure", scheme="market")
        far = concepts[~concepts["uid"].isin(edges["concept"])].iloc[0]  # a concept nobody proposed
        decisions = [
            Decision("accept", source, a["category"].split(":", 1)[1], a["concept_code"], by="ana"),
            Decision("reject", source, b["category"].split(":", 1)[1], b["concept_code"], by="ana"),
            Decision("remap", source, c["category"].split(":", 1)[1], far["code"], by="ana"),
        ]
        apply_decisions(s, decisions)
    expected = {a["category"]: (a["concept"], "accepted"), b["category"]: (b["concept"], "rejected"),
                c["category"]: (far["uid"], "accepted")}
    return tmp, store, expected


def decided(store):
    df = store.frame("review_edges", sources=[], reference="market")
    return {(r["category"], r["concept"]): r["status"] for r in df.to_dict("records")
            if r["status"] in ("accepted", "rejected", "stale")}


def check(store, expected):
    got = decided(store)
    for cat, (concept, status) in expected.items():
        assert got[(cat, concept)] == status
        others = store.frame("review_category_edges", category=cat, reference="market")
        if status == "accepted":  # no machine edge competes with an accepted one
            assert set(others["status"]) <= {"accepted", "rejected"}
        else:  # a rejected concept is never proposed again
            assert len(others[(others["concept"] == concept) & (others["status"] != "rejected")]) == 0


def test_decisions_survive_a_map_rerun(demo):
    _, store, expected = demo
    with open_store(store) as s:
        map_sources(s, run_id="map-again")
        place(s)
        check(s, expected)


def test_decisions_survive_a_whole_pipeline_rerun(demo):
    tmp, store, expected = demo
    run_demo(store, data_dir=tmp / "data", n_items=300, seed=5)
    with open_store(store) as s:
        check(s, expected)
        # the accepted categories' items are placed where the person said
        cat, (concept, _) = next((k, v) for k, v in expected.items() if v[1] == "accepted")
        placed = s.rows("review_category_placements", uid=cat)
        n = int(s.scalar("review_category_item_count", uid=cat) or 0)
        assert placed == ([{"concept": concept, "status": "accepted", "items": n}] if n else [])


def test_decisions_survive_a_reference_upgrade_and_show_as_stale(demo):
    tmp, store, expected = demo
    cat, (concept, _) = next((k, v) for k, v in expected.items() if v[1] == "accepted")
    code = concept.split(":", 1)[1]
    ttl = (tmp / "data" / "reference.ttl").read_text()
    marker = f'skos:notation "{code}"'
    assert marker in ttl
    v2 = tmp / "reference_v2.ttl"
    # a new version of the reference in which the accepted concept's code is gone (so it is retired)
    v2.write_text(ttl.replace(marker, f'skos:notation "{code}-v2"'))
    from pipeline.ingest.reference_job import ingest_reference

    with open_store(store) as s:
        ingest_reference(s, v2, scheme="market")
        # the decision is kept, sent back to review (status stale) by the upgrade, and listed in the stale queue
        assert decided(s)[(cat, concept)] in ("accepted", "stale")
        edge = [e for e in s.rows("review_edges", sources=[], reference="market")
                if (e["category"], e["concept"]) == (cat, concept)][0]
        assert edge["decided_by"] == "ana"
        stale = {e.uid: e.reasons for e in review_queue(s, "stale", limit=None)}
        assert any("retired" in r for r in stale[cat])
