"""The review page through Flask's test client: pages render, writes need the token, non-local needs it for all."""

import pytest

from pipeline.review.web.app import create_app
from pipeline.review.web.server import is_loopback
from pipeline.store import open_store
from review_graphs import build, edges_of


@pytest.fixture
def store(tmp_path):
    return build(tmp_path)


@pytest.fixture
def client(store):
    return create_app(store, token="tok", by="ana").test_client()


@pytest.mark.parametrize("url, text", [
    ("/queue/uncertain", "Garden &gt; Mowers"), ("/queue/conflicting", "outside the subtree"),
    ("/queue/unmapped", "Oddments"), ("/queue/stale", "Nothing here"),
    ("/category?uid=shop:5&queue=uncertain", "first two candidates within"), ("/concept?uid=ref:G", "Lawn mowers"),
    ("/search?q=pan", "Pans"),
])
def test_pages_render(client, url, text):
    r = client.get(url)
    assert r.status_code == 200
    assert text in r.get_data(as_text=True)


def test_category_page_shows_evidence_subtree_items_and_history(client):
    page = client.get("/category?uid=shop:2").get_data(as_text=True)
    assert "path~path" in page and "Reference around PR" in page
    assert "Bypass pruner 20 cm" in page and "proposed" in page and "map-test-1" in page


def test_decision_needs_the_page_token(client, store):
    body = {"action": "accept", "source": "shop", "category": "3", "concept": "LM"}
    assert client.post("/api/decide", json=body).status_code == 403
    r = client.post("/api/decide", json=body, headers={"X-Review-Token": "tok"})
    assert r.status_code == 200 and r.json["status"] == "applied"
    with open_store(store, read_only=True) as s:
        assert edges_of(s, "shop:3") == {"LM": "accepted"}
        assert s.frame("review_events_category", category="shop:3")["actor"].iloc[-1] == "ana"


def test_a_bad_decision_is_a_400_with_the_reason(client):
    r = client.post("/api/decide", json={"action": "accept", "source": "shop", "category": "3", "concept": "ZZ"},
                    headers={"X-Review-Token": "tok"})
    assert r.status_code == 400 and "ZZ" in r.json["error"]


def test_concept_search_api(client):
    assert [h["code"] for h in client.get("/api/concepts?q=mow").json] == ["LM"]


def test_non_local_bind_needs_the_token_for_every_page(store):
    c = create_app(store, token="tok", require_token=True).test_client()
    assert c.get("/queue/uncertain").status_code == 401
    assert c.get("/queue/uncertain?token=tok").status_code == 200
    assert c.get("/queue/unmapped").status_code == 200  # the cookie from the first visit


def test_loopback_detection():
    assert is_loopback("127.0.0.1") and is_loopback("::1") and is_loopback("localhost")
    assert not is_loopback("0.0.0.0") and not is_loopback("192.0.2.4")
