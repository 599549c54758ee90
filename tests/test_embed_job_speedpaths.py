"""The embed job's fast paths store exactly what the plain algorithm stores.

The plain algorithm (before the speed work): for every signal, encode the stale texts and put them; for the
`members` signal, take each category's first MEMBER_SAMPLE member titles in item-uid order, hash them with
`content_hash`, and store the L2-normalised mean of their vectors. These tests build a tiny store, recompute
that by hand and compare, and check skipping, chunking, the background writer and its failures.
"""

from __future__ import annotations

import numpy as np
import pytest

from pipeline.embed import embed_job
from pipeline.embed.embed_job import embed
from pipeline.embed.members import member_samples
from pipeline.embed.registry import get_embedder
from pipeline.embed.vector_sink import VectorSink
from pipeline.hashing import content_hash
from pipeline.ingest.items_job import ingest_items
from pipeline.ingest.reference_job import ingest_reference
from pipeline.ingest.source_job import ingest_source
from pipeline.store import open_store

REFERENCE = "code,label,parent_code\nG,Garden,\nGT,Garden tools,G\nK,Kitchen,\nPA,Pans,K\n"
SHOP = "code,label,parent_code\n1,Garden,\n2,Pruning shears,1\n3,Mowers,1\n4,Kitchen,\n5,Frying pans,4\n"
# item keys chosen so that uid order differs from file order and from title order
ITEMS = [("p9", "Bypass pruner", "2"), ("p10", "Anvil pruner", "2"), ("p2", "Ratchet pruner", "2"),
         ("p1", "Pruner holster", "2"), ("m1", "Push mower", "3"), ("m2", "Reel mower", "3"),
         ("f1", "Iron skillet", "5"), ("f2", "Crepe pan", "5"), ("f3", "Crepe pan", "5")]


def _write_items(tmp_path, rows) -> None:
    (tmp_path / "shop_items.csv").write_text(
        "item_key,title,category\n" + "".join(f"{k},{t},{c}\n" for k, t, c in rows))


@pytest.fixture
def store_path(tmp_path):
    (tmp_path / "ref.csv").write_text(REFERENCE)
    (tmp_path / "shop.csv").write_text(SHOP)
    _write_items(tmp_path, ITEMS)
    path = tmp_path / "s.lbug"
    with open_store(path) as store:
        ingest_reference(store, tmp_path / "ref.csv", fmt="tree", scheme="ref")
        ingest_source(store, "shop", tmp_path / "shop.csv", fmt="tree")
        ingest_items(store, "shop", tmp_path / "shop_items.csv")
    return path


def _vectors(store, kind, signal) -> dict[str, tuple[str, str, bytes]]:
    vs = store.get_vectors(kind, signal)
    return {o: (h, e, vs.matrix[i].tobytes()) for i, (o, h, e) in enumerate(vs.iter_rows())}


def _all_vectors(store) -> dict:
    return {(k, s): _vectors(store, k, s) for k, s in (
        ("Concept", "label"), ("Concept", "path"), ("Concept", "gloss"),
        ("Category", "label"), ("Category", "path"), ("Category", "members"))}


def test_members_vector_is_the_mean_of_the_first_titles_by_item_uid(store_path, monkeypatch):
    monkeypatch.setattr(embed_job, "MEMBER_SAMPLE", 2)
    with open_store(store_path) as store:
        counts = embed(store)
        got = _vectors(store, "Category", "members")
    # shop:2 holds p1, p10, p2, p9: string order of the uids, not file order ("shop:p1" < "shop:p10" < "shop:p2")
    titles = ["Pruner holster", "Anvil pruner"]
    model = get_embedder("static")
    mean = model.encode(titles).mean(axis=0)
    mean /= np.linalg.norm(mean)
    h, e, vec = got["shop:2"]
    assert (h, e) == (content_hash(titles), model.embedder_id)
    assert np.allclose(np.frombuffer(vec, dtype=np.float32), mean, atol=1e-6)
    assert sorted(got) == ["shop:2", "shop:3", "shop:5"]  # categories without items get no members vector
    assert counts["members"] == 3 and counts["member_texts"] == 2 + 2 + 2


def test_member_samples_keep_repeated_titles_and_only_the_asked_range(store_path):
    with open_store(store_path) as store:
        assert member_samples(store, "shop", ["shop:5"]) == {"shop:5": ["Iron skillet", "Crepe pan", "Crepe pan"]}
        assert member_samples(store, "shop", ["shop:2", "shop:3"]) == {
            "shop:2": ["Pruner holster", "Anvil pruner", "Ratchet pruner", "Bypass pruner"],
            "shop:3": ["Push mower", "Reel mower"]}
        assert member_samples(store, "shop", ["shop:1"]) == {}
        assert member_samples(store, "shop", []) == {}


def test_node_vectors_hash_their_text_with_content_hash(store_path):
    with open_store(store_path) as store:
        embed(store)
        got = _vectors(store, "Category", "path")
    assert got["shop:2"][0] == content_hash("Garden > Pruning shears")


def test_small_chunks_and_tiny_transactions_store_the_same_bytes(store_path, tmp_path, monkeypatch):
    import shutil

    other = tmp_path / "other.lbug"
    shutil.copy(store_path, other)
    with open_store(store_path) as store:
        embed(store)
        plain = _all_vectors(store)
    monkeypatch.setattr(embed_job, "READ_CHUNK", 1)
    monkeypatch.setattr(embed_job, "READ_AHEAD", 1)
    monkeypatch.setattr(embed_job, "MEMBER_CHUNK", 2)
    monkeypatch.setattr(embed_job, "BATCH", 3)
    monkeypatch.setattr("pipeline.embed.vector_sink.MAX_ROWS", 2)
    with open_store(other) as store:
        embed(store)
        chunked = _all_vectors(store)
    assert chunked == plain


def test_a_rerun_skips_everything_and_changes_nothing(store_path):
    with open_store(store_path) as store:
        embed(store)
        before = _all_vectors(store)
        again = embed(store)
        assert _all_vectors(store) == before
    assert (again["embedded"], again["members"], again["member_texts"]) == (0, 0, 0)
    assert again["skipped"] == 3 * 4 + 2 * 5  # 4 concepts x 3 signals, 5 categories x 2 signals


def test_only_a_category_whose_sampled_titles_changed_is_re_embedded(store_path, tmp_path, monkeypatch):
    monkeypatch.setattr(embed_job, "MEMBER_SAMPLE", 2)
    with open_store(store_path) as store:
        embed(store)
        before = _vectors(store, "Category", "members")
    # shop:p9 is third in uid order, so outside the 2-title sample of shop:2; shop:m2 is inside shop:3's
    changed = [(k, t + " new" if k in ("p9", "m2") else t, c) for k, t, c in ITEMS]
    _write_items(tmp_path, changed)
    with open_store(store_path) as store:
        ingest_items(store, "shop", tmp_path / "shop_items.csv")
        counts = embed(store)
        after = _vectors(store, "Category", "members")
    assert counts["members"] == 1 and counts["member_texts"] == 2
    assert after["shop:2"] == before["shop:2"] and after["shop:5"] == before["shop:5"]
    assert after["shop:3"][0] == content_hash(["Push mower", "Reel mower new"])


def test_a_failing_encode_writes_nothing_half_and_a_rerun_finishes(store_path, monkeypatch):
    real = get_embedder("static")

    class Breaks:
        embedder_id, dim = real.embedder_id, real.dim

        def encode(self, texts, batch_size=2048):
            if "Push mower" in texts:  # the members phase, after every node text was put
                raise RuntimeError("encoder broke")
            return real.encode(texts)

    monkeypatch.setattr("pipeline.embed.registry.get_embedder", lambda name, **kw: Breaks())
    with open_store(store_path) as store:
        with pytest.raises(RuntimeError, match="encoder broke"):
            embed(store)
        # the batches gathered for the one transaction were dropped whole
        assert all(len(v) == 0 for v in _all_vectors(store).values())
    monkeypatch.undo()
    with open_store(store_path) as store:
        counts = embed(store)
        assert all(len(v) > 0 for v in _all_vectors(store).values())
    assert (counts["embedded"], counts["skipped"], counts["members"]) == (22, 0, 3)


def test_a_failure_after_a_full_transaction_keeps_that_transaction(store_path, monkeypatch):
    monkeypatch.setattr("pipeline.embed.vector_sink.MAX_ROWS", 4)  # the concept signals commit, 4 rows each
    real = get_embedder("static")

    class Breaks:
        embedder_id, dim = real.embedder_id, real.dim

        def encode(self, texts, batch_size=2048):
            if "Garden > Pruning shears" in texts:  # the category path signal
                raise RuntimeError("encoder broke")
            return real.encode(texts)

    monkeypatch.setattr("pipeline.embed.registry.get_embedder", lambda name, **kw: Breaks())
    with open_store(store_path) as store:
        with pytest.raises(RuntimeError, match="encoder broke"):
            embed(store)
        kept = {k: len(v) for k, v in _all_vectors(store).items() if v}
    assert kept == {("Concept", "label"): 4, ("Concept", "path"): 4, ("Concept", "gloss"): 4,
                    ("Category", "label"): 5}


def test_a_rolled_back_write_of_many_batches_leaves_the_key_index_sound(tmp_path):
    # LadybugDB 0.22: rolling back two COPYs into Vector in one transaction left the primary-key index pointing
    # at missing rows ("Index contains an invalid node offset") once the store was reopened (seen, not documented)
    path = tmp_path / "v.lbug"
    ones = np.ones((2, 4), np.float32)
    with open_store(path) as store:
        with pytest.raises(KeyError), store.transaction():
            store.put_vector_batches([("Concept", "label", "e", ["a", "b"], ["h", "h"], ones),
                                      ("Concept", "path", "e", ["a", "b"], ["h", "h"], ones)])
            raise KeyError("rolled back")
    with open_store(path) as store:
        assert store.vector_hashes("Concept", "label", ["a", "b"]) == {}
        store.put_vectors("Concept", "label", "e", ["a"], ["h2"], ones[:1])
        assert store.vector_hashes("Concept", "label", ["a", "b"]) == {"a": ("h2", "e")}


def test_put_vector_batches_lets_a_later_batch_replace_an_earlier_one(tmp_path):
    with open_store(tmp_path / "v.lbug") as store:
        store.put_vector_batches([("Concept", "label", "e", ["a", "b"], ["h1", "h1"], np.zeros((2, 4), np.float32)),
                                  ("Concept", "label", "e", ["b"], ["h2"], np.ones((1, 4), np.float32))])
        got = store.get_vectors("Concept", "label")
    assert (got.owners, got.hashes) == (["a", "b"], ["h1", "h2"])
    assert got.matrix[1].tolist() == [1.0] * 4


def test_sink_commits_batches_in_few_transactions_and_reads_see_them(tmp_path):
    with open_store(tmp_path / "v.lbug") as store:
        m = np.arange(12, dtype=np.float32).reshape(3, 4)
        with VectorSink(store, max_rows=3) as sink:
            sink.put("Concept", "path", "e", ["a", "b"], ["h1", "h2"], m[:2])
            sink.put("Concept", "path", "e", ["c"], ["h3"], lambda: m[2:])  # computed on the store thread
            seen = sink.submit(store.vector_hashes, "Concept", "path", ["a", "c", "zz"]).result()
            sink.put("Concept", "label", "e", ["a", "b"], ["h4", "h5"], m[:2])
        got = store.get_vectors("Concept", "path")
        assert got.owners == ["a", "b", "c"] and np.array_equal(got.matrix, m)
        assert seen == {"a": ("h1", "e"), "c": ("h3", "e")}
        assert [rows for rows, _ in sink.commits] == [3, 2]  # a write once 3 rows are in, then the rest


def test_sink_write_error_reaches_the_caller_and_writes_nothing_of_its_transaction(tmp_path):
    with open_store(tmp_path / "v.lbug") as store:
        store.put_vectors("Concept", "path", "e", ["kept"], ["h"], np.ones((1, 4), np.float32))
        sink = VectorSink(store)
        sink.put("Concept", "path", "e", ["a"], ["h"], np.ones((1, 4), np.float32))
        sink.put("Concept", "path", "e", ["b"], ["h"], np.ones((2, 4), np.float32))  # 1 owner, 2 vectors
        with pytest.raises(ValueError, match="1 owners, 1 hashes and 2 vectors"):
            sink.close()
        assert store.get_vectors("Concept", "path").owners == ["kept"]


def test_sink_left_by_an_exception_drops_what_it_gathered(tmp_path):
    with open_store(tmp_path / "v.lbug") as store:
        with pytest.raises(KeyError), VectorSink(store) as sink:
            sink.put("Concept", "path", "e", ["a"], ["h"], np.ones((1, 4), np.float32))
            raise KeyError("caller failed")
        assert len(store.get_vectors("Concept", "path")) == 0
        store.put_vectors("Concept", "path", "e", ["a"], ["h"], np.ones((1, 4), np.float32))  # store still usable
        assert store.get_vectors("Concept", "path").owners == ["a"]


def test_vector_hashes_leave_out_owners_without_a_vector(tmp_path):
    with open_store(tmp_path / "v.lbug") as store:
        store.put_vectors("Category", "label", "e1", ["x:1", "x:2"], ["h1", "h2"], np.zeros((2, 8), np.float32))
        assert store.vector_hashes("Category", "label", ["x:2", "x:3"]) == {"x:2": ("h2", "e1")}
        assert store.vector_hashes("Category", "path", ["x:1"]) == {}
        assert store.vector_hashes("Category", "label", []) == {}


def test_uids_the_joined_form_cannot_order_fall_back_to_the_exact_query(store_path, tmp_path):
    # "shop:a" sorts before "shop:a\x01b", but "shop:a\x01zebra" would sort after "shop:a\x01b\x01apple":
    # the guard in category_member_sample must send this range to category_member_sample_exact
    _write_items(tmp_path, ITEMS + [("a", "zebra", "3"), ("a\x01b", "apple", "3")])
    with open_store(store_path) as store:
        ingest_items(store, "shop", tmp_path / "shop_items.csv")
        assert member_samples(store, "shop", ["shop:3"], sample=1) == {"shop:3": ["zebra"]}
        assert member_samples(store, "shop", ["shop:2", "shop:3"], sample=2) == {
            "shop:2": ["Pruner holster", "Anvil pruner"], "shop:3": ["zebra", "apple"]}
