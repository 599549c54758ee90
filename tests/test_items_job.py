"""ingest_items: what lands in the graph, batch by batch, and the job's guarantees (precheck, skip by hash,
whole batches, re-runs, place marks)."""

import json

import pytest

from pipeline.errors import BadInput
from pipeline.hashing import file_hash
from pipeline.ingest import items_job
from pipeline.ingest.items_job import ingest_items, read_ahead
from pipeline.ingest.source_job import ingest_source
from pipeline.store import open_store

HEADER = "item_key,title,category,colour,size\n"


def _source(tmp_path, store, key="shop"):
    tax = tmp_path / f"{key}.csv"
    tax.write_text("code,label,parent_code\ng,Garden,\nw,Water,g\nt,Tools,g\nx,Unused,\n")
    ingest_source(store, key, tax, fmt="tree")


def _items(store) -> dict:
    return {r["uid"]: (r["title"], json.loads(r["attributes"])) for r in store.rows("audit_items")}


def _links(store) -> set:
    return {(r["item"], r["category"]) for r in store.rows("audit_filed_under")}


def _write(tmp_path, text, name="items.csv"):
    p = tmp_path / name
    p.write_text(HEADER + text, encoding="utf-8")
    return p


def test_rows_land_as_items_and_links(tmp_path, engine):
    p = _write(tmp_path, "k1,Hose,g|w,green,\nk2,Rake,t,,L\n")
    with engine.open() as s:
        _source(tmp_path, s)
        r = ingest_items(s, "shop", p)
        assert (r["rows_items"], r["links"], r["rejected"], r["batches"]) == (2, 3, 0, 1)
        assert _items(s) == {"shop:k1": ("Hose", {"colour": "green"}), "shop:k2": ("Rake", {"size": "L"})}
        assert _links(s) == {("shop:k1", "shop:g"), ("shop:k1", "shop:w"), ("shop:k2", "shop:t")}


def test_an_item_spanning_batches_keeps_every_batchs_attributes(tmp_path, engine):
    # Regression: the continuation batch replaced the stored attributes with its own, so k1 lost colour=red.
    p = _write(tmp_path, "k1,Hose,g,red,\nk2,Rake,t,,\nk1,Hose,w,blue,L\nk3,Can,w,,\nk1,Hose,t,,XL\n")
    with engine.open() as s:
        _source(tmp_path, s)
        r = ingest_items(s, "shop", p, batch_size=2)
        assert r["batches"] == 3
        # the first row's value of an attribute wins, across batches as within one
        assert _items(s)["shop:k1"] == ("Hose", {"colour": "red", "size": "L"})
        assert {c for i, c in _links(s) if i == "shop:k1"} == {"shop:g", "shop:w", "shop:t"}


def test_same_graph_whatever_the_batch_size(tmp_path):
    text = "".join(f"k{i % 7},T{i % 7},{'gwt'[i % 3]},{'' if i % 2 else f'c{i}'},{f's{i}' if i % 5 == 0 else ''}\n"
                   for i in range(40))
    p = _write(tmp_path, text)
    graphs = []
    for size in (1, 3, 50_000):
        with open_store(tmp_path / f"b{size}.lbug") as s:
            _source(tmp_path, s)
            ingest_items(s, "shop", p, batch_size=size)
            graphs.append((_items(s), _links(s)))
    assert graphs[0] == graphs[1] == graphs[2]
    assert graphs[0][0]["shop:k0"] == ("T0", {"colour": "c0", "size": "s0"})


def test_same_file_again_is_skipped_by_content_hash(tmp_path, engine):
    p = _write(tmp_path, "k1,Hose,g,,\n")
    with engine.open() as s:
        _source(tmp_path, s)
        ingest_items(s, "shop", p)
        again = ingest_items(s, "shop", p)
        assert again["skipped"] is True and again["rows_items"] == 0


def test_forced_rerun_converges_to_the_same_graph(tmp_path, engine):
    p = _write(tmp_path, "k1,Hose,g,red,\nk2,Rake,t,,\nk1,Hose,w,,L\n")
    with engine.open() as s:
        _source(tmp_path, s)
        ingest_items(s, "shop", p, batch_size=2)
        before = (_items(s), _links(s))
        ingest_items(s, "shop", p, batch_size=2, force=True)
        assert (_items(s), _links(s)) == before


def test_a_later_file_updates_known_items_and_adds_links(tmp_path, engine):
    with engine.open() as s:
        _source(tmp_path, s)
        ingest_items(s, "shop", _write(tmp_path, "k1,Hose,g,red,\n", "a.csv"))
        ingest_items(s, "shop", _write(tmp_path, "k1,Hose 2,w,,M\nk9,New,t,,\n", "b.csv"))
        assert _items(s) == {"shop:k1": ("Hose 2", {"size": "M"}), "shop:k9": ("New", {})}
        assert _links(s) == {("shop:k1", "shop:g"), ("shop:k1", "shop:w"), ("shop:k9", "shop:t")}


def test_bad_bytes_deep_in_the_file_stop_it_before_any_batch(tmp_path, engine):
    p = tmp_path / "items.csv"
    p.write_bytes((HEADER + "".join(f"k{i},T{i},g,,\n" for i in range(50))).encode() + b"k99,Caf\xe9,g,,\n")
    with engine.open() as s:
        _source(tmp_path, s)
        with pytest.raises(BadInput, match=r"items.csv:52: byte 0xe9"):
            ingest_items(s, "shop", p, batch_size=10)
        assert _items(s) == {}


def test_rejects_file_names_line_field_and_reason(tmp_path, engine):
    p = _write(tmp_path, "k1,Hose,g,,\n,No key,g,,\nk3,Lost,zz,,\n")
    out = tmp_path / "rejects.csv"
    with engine.open() as s:
        _source(tmp_path, s)
        r = ingest_items(s, "shop", p, reject_file=out)
        assert (r["rows_items"], r["rejected"], r["reject_file"]) == (1, 2, str(out))
    assert out.read_text().splitlines() == [
        "line,field,reason,raw",
        "3,item_key,empty item key,\",No key,g,,\"",
        "4,category,unknown category 'zz',\"k3,Lost,zz,,\"",
    ]


def test_categories_that_received_items_are_marked_to_place(tmp_path, engine):
    p = _write(tmp_path, "k1,Hose,w,,\nk2,Rake,t,,\n")
    with engine.open() as s:
        _source(tmp_path, s)
        s.run("categories_mark_placed", uids=["shop:g", "shop:w", "shop:t", "shop:x"])  # as after a place run
        ingest_items(s, "shop", p)
        rows = s.rows("categories_pending", scheme="shop")
        assert {r["uid"] for r in rows if r["place_new"]} == {"shop:w", "shop:t"}
        assert not any(r["place_dirty"] for r in rows)  # their edges did not change: placed items stay


def test_a_failed_batch_leaves_earlier_batches_whole_and_nothing_of_itself(tmp_path, engine, monkeypatch):
    p = _write(tmp_path, "k1,Hose,g,,\nk2,Rake,t,,\nk3,Can,w,,\nk4,Pot,g,,\n")
    real = items_job._write_batch
    calls = []

    def failing(store, key, batch, now, **kw):
        calls.append(len(batch))
        if len(calls) == 2:
            real(store, key, batch, now, **kw)  # writes everything, then the commit is refused
            raise RuntimeError("killed before commit")
        real(store, key, batch, now, **kw)

    monkeypatch.setattr(items_job, "_write_batch",
                        lambda store, key, batch, now, **kw: _in_tx(store, failing, key, batch, now, **kw))
    with engine.open() as s:
        _source(tmp_path, s)
        with pytest.raises(RuntimeError, match="killed"):
            ingest_items(s, "shop", p, batch_size=2)
        assert set(_items(s)) == {"shop:k1", "shop:k2"}
        assert {i for i, _ in _links(s)} == {"shop:k1", "shop:k2"}
        assert s.rows("ingested_file_get", key=f"shop\x1f{file_hash(p)}") == []  # the file is not marked taken
    monkeypatch.undo()
    with engine.open() as s:  # the re-run finishes the file
        ingest_items(s, "shop", p, batch_size=2)
        assert set(_items(s)) == {"shop:k1", "shop:k2", "shop:k3", "shop:k4"}


def _in_tx(store, fn, *a, **kw):
    with store.transaction():
        fn(store, *a, **kw)


def test_read_ahead_keeps_order_and_raises_the_readers_error():
    def gen():
        yield 1
        yield 2
        raise BadInput([])

    got = []
    with pytest.raises(BadInput):
        for x in read_ahead(gen()):
            got.append(x)
    assert got == [1, 2]


def test_read_ahead_stops_and_closes_the_reader_when_the_consumer_stops():
    closed = []

    def gen():
        try:
            for i in range(1_000):
                yield i
        finally:
            closed.append(True)

    for x in read_ahead(gen()):
        if x == 3:
            break
    assert closed == [True]
