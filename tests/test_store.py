"""Stores: schema on first open, clear errors for foreign files and locks, vectors that round-trip.

Tests taking `engine` run on the embedded engine and (marked neo4j) on a Neo4j server; file and lock tests are
about the embedded engine's single file and stay LadybugDB-only.
"""

import subprocess
import time
import sys

import numpy as np
import pandas as pd
import pytest

from pipeline.errors import NotAStore
from pipeline.store import open_store


def test_schema_is_created_once_and_reopens(engine):
    with engine.open() as s:
        s.run("meta_set", key="probe", value="1")
    with engine.open() as s:  # a second open must not try to create the tables again
        assert s.scalar("meta_get", key="probe") == "1"
        assert s.scalar("meta_get", key="schema_version") == "1"


def test_a_file_that_is_not_a_store_is_refused(tmp_path):
    bad = tmp_path / "notes.lbug"
    bad.write_text("just some text\n")
    with pytest.raises(NotAStore, match="not a graftwork store"):
        open_store(bad)
    assert bad.read_text() == "just some text\n"


def test_a_foreign_ladybug_database_is_refused(tmp_path):
    import ladybug

    path = tmp_path / "other.lbug"
    db = ladybug.Database(str(path))
    conn = ladybug.Connection(db)
    conn.execute("CREATE NODE TABLE Person(name STRING, PRIMARY KEY(name))")
    conn.close()
    db.close()
    with pytest.raises(NotAStore, match="no Meta table"):
        open_store(path)


def test_a_folder_is_refused(tmp_path):
    with pytest.raises(NotAStore, match="folder"):
        open_store(tmp_path)


def test_read_only_open_of_a_missing_store_says_so(tmp_path):
    with pytest.raises(NotAStore, match="no graftwork store"):
        open_store(tmp_path / "missing.lbug", read_only=True)
    assert not (tmp_path / "missing.lbug").exists()


def test_a_second_writer_process_gets_store_locked(tmp_path):
    path = tmp_path / "s.lbug"
    with open_store(path):
        code = (
            "import sys\n"
            "from pipeline.store import open_store\n"
            "from pipeline.errors import StoreLocked\n"
            "try:\n"
            f"    open_store({str(path)!r})\n"
            "except StoreLocked as e:\n"
            "    print('LOCKED', e.exit_code)\n"
        )
        out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60)
    assert "LOCKED 3" in out.stdout, out.stderr


def _in_other_process(code: str, timeout: float = 120) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=timeout)


_READ_ONCE = (
    "from pipeline.store import open_store\n"
    "from pipeline.errors import StoreLocked\n"
    "try:\n"
    "    with open_store({path!r}, read_only=True) as s:\n"
    "        print('READ', s.scalar('meta_get', key='k'))\n"
    "except StoreLocked as e:\n"
    "    print('LOCKED', e.exit_code, e)\n"
)


def test_a_reader_is_refused_while_another_process_writes(tmp_path):
    # Regression: LadybugDB let a read-only open run beside a writer in another process, and the reader saw a
    # half-written log ("Checksum verification failed, the WAL file is corrupted", duplicated primary keys).
    path = tmp_path / "s.lbug"
    with open_store(path) as s:
        s.run("meta_set", key="k", value="v")
    holder = subprocess.Popen([sys.executable, "-c", "import time; from pipeline.store import open_store; "
                               f"s = open_store({str(path)!r}); print('ready', flush=True); time.sleep(60)"],
                              stdout=subprocess.PIPE, text=True)
    try:
        assert holder.stdout.readline().strip() == "ready"
        out = _in_other_process(_READ_ONCE.format(path=str(path)))
        assert "LOCKED 3" in out.stdout, out.stdout + out.stderr
        assert f"pid {holder.pid}" in out.stdout  # it names the job that holds the store
    finally:
        holder.kill()
        holder.wait()
    out = _in_other_process(_READ_ONCE.format(path=str(path)))  # the writer is gone (killed): reads work again
    assert "READ v" in out.stdout, out.stdout + out.stderr


def test_readers_share_the_store_and_a_writer_waits_for_them(tmp_path):
    path = tmp_path / "s.lbug"
    with open_store(path) as s:
        s.run("meta_set", key="k", value="v")
    with open_store(path, read_only=True):
        out = _in_other_process(_READ_ONCE.format(path=str(path)))
        assert "READ v" in out.stdout, out.stdout + out.stderr  # two readers at once
        writer = subprocess.Popen([sys.executable, "-c", "from pipeline.store import open_store; "
                                   "print('IMPORTED', flush=True); "
                                   f"s = open_store({str(path)!r}); s.run('meta_set', key='k', value='w'); "
                                   "s.close(); print('WROTE')"], stdout=subprocess.PIPE, text=True)
        assert writer.stdout.readline().strip() == "IMPORTED"  # imports alone take seconds on a busy machine
        time.sleep(2)
        assert writer.poll() is None  # a writer waits while a reader has the store open ...
    assert writer.communicate(timeout=60)[0].strip() == "WROTE"  # ... and writes once it is closed
    with open_store(path, read_only=True) as s:
        assert s.scalar("meta_get", key="k") == "w"


def test_transaction_rolls_back_everything_on_error(engine):
    with engine.open() as s:
        with pytest.raises(RuntimeError, match="boom"), s.transaction():
            s.run("meta_set", key="a", value="1")
            raise RuntimeError("boom")
        assert s.scalar("meta_get", key="a") is None


def test_vectors_round_trip_bit_exact_and_replace_only_their_owners(engine):
    rng = np.random.default_rng(0)
    m = rng.standard_normal((5, 16)).astype(np.float32)
    with engine.open() as s:
        s.put_vectors("Concept", "path", "e1", list("abcde"), ["h"] * 5, m)
        s.put_vectors("Concept", "path", "e2", ["c"], ["h2"], np.ones((1, 16), np.float32))
        got = s.get_vectors("Concept", "path")
        assert got.owners == list("abcde")
        expected = m.copy()
        expected[2] = 1.0
        assert np.array_equal(got.matrix, expected)
        assert got.embedders == ["e1", "e1", "e2", "e1", "e1"]
        assert len(s.get_vectors("Concept", "label")) == 0


def test_mostly_zero_vectors_survive_many_bulk_writes(engine):
    # Regression: ladybug 0.22 stored zeros for sparse vectors in a FLOAT[] column after a few COPYs
    # (found while building the store; vectors are now kept as float32 bytes).
    rng = np.random.default_rng(0)
    with engine.open() as s:
        for i in range(8):
            m = np.zeros((3, 64), np.float32)
            m[np.arange(3), rng.integers(0, 64, 3)] = [1.0, 0.7, 0.5]
            s.put_vectors("Category", f"sig{i}", "e", ["a", "b", "c"], ["h"] * 3, m)
            assert np.array_equal(s.get_vectors("Category", f"sig{i}").matrix, m)


def test_bulk_upsert_is_idempotent(engine):
    rows = pd.DataFrame({"uid": ["s:1"], "source": ["s"], "item_key": ["1"], "title": ["t"], "attributes": ["{}"]})
    with engine.open() as s:
        s.bulk("items_upsert", rows, now="2026-01-01")
        s.bulk("items_upsert", rows.assign(title="t2"), now="2026-01-02")
        nodes = s.frame("count_nodes")
    assert nodes[nodes.kind == "Item"]["n"].tolist() == [1]


def test_nested_transactions_join_the_outer_one(engine):
    with engine.open() as s:
        with pytest.raises(RuntimeError, match="late"), s.transaction():
            with s.transaction():
                s.run("meta_set", key="inner", value="1")
            assert s.scalar("meta_get", key="inner") == "1"  # visible inside the open transaction
            raise RuntimeError("late")
        assert s.scalar("meta_get", key="inner") is None


def test_a_bulk_write_larger_than_one_batch_lands_whole(engine):
    n = 2_500
    rows = pd.DataFrame({"uid": [f"s:{i}" for i in range(n)], "source": "s", "item_key": [str(i) for i in range(n)],
                         "title": [f"t{i}" for i in range(n)], "attributes": "{}"})
    with engine.open() as s:
        if s.engine == "neo4j":
            s.batch_rows = 1_000  # three UNWIND statements in one transaction
        s.bulk("items_upsert", rows, now="2026-01-01")
        nodes = s.frame("count_nodes")
    assert nodes[nodes.kind == "Item"]["n"].tolist() == [n]



def test_releasing_memory_keeps_the_data_the_lock_and_an_open_transaction(engine, monkeypatch):
    from pipeline.store import ladybug_store

    monkeypatch.setattr(ladybug_store, "RELEASE_ABOVE_MB", 0)  # reopen however small this process is
    with engine.open() as s:
        s.run("meta_set", key="a", value="1")
        s.release_memory()
        assert s.scalar("meta_get", key="a") == "1"
        with s.transaction():
            s.run("meta_set", key="b", value="2")
            s.release_memory()  # inside a transaction it must not drop the uncommitted write
        assert s.scalar("meta_get", key="b") == "2"
        if engine.name == "ladybug":
            # the file lock is kept across the reopen: another process still cannot open the store
            out = _in_other_process(_READ_ONCE.format(path=str(s.location)))
            assert "LOCKED 3" in out.stdout, out.stdout + out.stderr
        s.run("meta_set", key="c", value="3")  # and writing after a release works
    with engine.open() as s:
        assert [s.scalar("meta_get", key=k) for k in "abc"] == ["1", "2", "3"]


def test_an_interrupt_inside_the_engines_result_constructor_leaves_no_traceback(tmp_path, monkeypatch):
    # Seen in the kill tests: Ctrl-C landed in LadybugDB's QueryResult.__init__ before it set `is_closed`, and the
    # half-built result's __del__ printed an AttributeError under the clean "interrupted" message.
    import gc

    from ladybug.query_result import QueryResult

    with open_store(tmp_path / "s.lbug"):
        pass  # opening a store installs the guard
    raised = []
    monkeypatch.setattr(sys, "unraisablehook", raised.append)
    half_built = QueryResult.__new__(QueryResult)
    half_built.connection = None  # the constructor's first line ran, the interrupt came before the next
    del half_built
    gc.collect()
    assert raised == []


def test_a_store_made_before_forward_only_edges_is_rebuilt_with_every_edge(tmp_path):
    # Earlier builds stored MAPS_TO both ways; opening such a store must rebuild it forward only, losing nothing.
    import ladybug

    path = tmp_path / "s.lbug"
    with open_store(path):
        pass
    db = ladybug.Database(str(path))
    conn = ladybug.Connection(db)
    conn.execute("DROP TABLE MAPS_TO")
    conn.execute("CREATE REL TABLE MAPS_TO(FROM Category TO Concept, score DOUBLE, rank INT64, match_type STRING, "
                 "status STRING, method STRING, evidence STRING, run_id STRING, decided_by STRING, "
                 "decided_at STRING, note STRING)")  # the earlier build's statement
    conn.execute("CREATE (:Category {uid: 'shop:a', scheme: 'shop'}), (:Category {uid: 'shop:b', scheme: 'shop'}),"
                 " (:Concept {uid: 'ref:1', scheme: 'ref'}), (:Concept {uid: 'ref:2', scheme: 'ref'})")
    conn.execute("MATCH (a:Category), (b:Concept) CREATE (a)-[:MAPS_TO {score: 0.25, rank: 2, match_type: 'closeMatch',"
                 " status: 'proposed', method: 'fused:default', evidence: '{\"text\": 0.5}', run_id: a.uid + b.uid,"
                 " decided_by: '', decided_at: '', note: 'n'}]->(b)")
    edges = ("MATCH (a:Category)-[m:MAPS_TO]->(b:Concept) RETURN a.uid AS cat, b.uid AS con, m.score AS score, "
             "m.rank AS rank, m.match_type AS match_type, m.status AS status, m.method AS method, "
             "m.evidence AS evidence, m.run_id AS run_id, m.note AS note ORDER BY cat, con")
    before = conn.execute(edges).get_as_df()
    conn.close()
    db.close()
    assert len(before) == 4
    with open_store(path) as s:
        after = s._conn.execute(edges).get_as_df()
        direction = s._conn.execute("CALL table_info('MAPS_TO') RETURN DISTINCT storage_direction").get_as_df()
        back = s._conn.execute("MATCH (k:Concept {uid: 'ref:2'})<-[:MAPS_TO]-(c:Category) RETURN c.uid AS cat "
                               "ORDER BY cat").get_as_df()
    pd.testing.assert_frame_equal(after, before)
    assert direction["storage_direction"].tolist() == ["fwd"]
    assert back["cat"].tolist() == ["shop:a", "shop:b"]  # a walk back from a concept still finds its categories
