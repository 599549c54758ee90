"""The embedded engine: a LadybugDB file opened in this process."""

from __future__ import annotations

import contextlib
import logging
import os
import re
import time
from pathlib import Path

import numpy as np
import pandas as pd
import pyarrow as pa
import pyarrow.compute as pc

from pipeline.errors import NotAStore, StoreLocked
from pipeline.store import access_lock
from pipeline.store.base import SCHEMA_VERSION, Store, VectorSet
from pipeline.store.queries import load_query, statements

log = logging.getLogger(__name__)
ENGINE = "ladybug"
RELEASE_ABOVE_MB = 1024  # resident size from which `release_memory` reopens the engine
# Log size at which the engine checkpoints by itself. Each checkpoint rewrites the tables written since the last,
# so the engine's default (16 MB) made every map commit rewrite the growing edge and history tables: at 1M items
# 1 GB took the map stage from 63.8 s to 54.9 s and placing from 34.0 s to 28.5 s, at the same peak RSS.
# Closing (and `release_memory`) checkpoints anyway.
CHECKPOINT_WAL_MB = 1024


class LadybugStore(Store):
    engine = ENGINE

    def __init__(self, path: str | Path, *, read_only: bool = False, create: bool = True,
                 lock_timeout: float = 0.0):
        import ladybug  # imported here so the Neo4j engine never needs it loaded

        _quiet_partial_results()
        self.location = str(path)
        p = Path(path)
        if not p.exists() and (read_only or not create):
            raise NotAStore(f"{path}: no graftwork store here (run an ingest first, or check --store)")
        if p.is_dir():
            raise NotAStore(f"{path}: is a folder, not a graftwork store file")
        fresh = not p.exists()
        had_lock_file = access_lock.access_file(p).exists()
        self._lock = access_lock.acquire(p, exclusive=not read_only, timeout=lock_timeout)
        try:
            self._open_engine(ladybug, p, read_only, lock_timeout)
            self._tx_depth = 0
            self.read_only = read_only
            self._check_or_create_schema(fresh)
        except BaseException as exc:
            self.close()
            if isinstance(exc, NotAStore) and not had_lock_file:
                access_lock.access_file(p).unlink(missing_ok=True)  # leave a foreign file's folder as it was
            raise

    def _open_engine(self, ladybug, p: Path, read_only: bool, lock_timeout: float) -> None:
        deadline = time.monotonic() + max(0.0, lock_timeout)
        recovered = False
        while True:
            try:
                self._db = _database(ladybug, p, read_only)
                self._conn = ladybug.Connection(self._db)
                return
            except RuntimeError as exc:
                if read_only and _needs_recovery(str(exc)) and not recovered:
                    # A job was killed before its log was checkpointed (or while writing it, leaving a torn tail):
                    # a read-write open replays the committed transactions and drops the rest; then the read-only
                    # open works. No writer is alive (this open holds the shared lock), and the replay is a
                    # write, so it takes the lock exclusively for that moment.
                    recovered = True
                    self._release_lock()
                    writer = access_lock.acquire(p, exclusive=True, timeout=max(lock_timeout, 30.0))
                    try:
                        with contextlib.suppress(RuntimeError):
                            ladybug.Database(str(p)).close()
                    finally:
                        writer.release()
                    self._lock = access_lock.acquire(p, exclusive=False, timeout=max(lock_timeout, 30.0))
                    continue
                error = _translate_open_error(p, exc)
                # Another job holds the store: wait for it up to the timeout, then give up with exit code 3.
                if not isinstance(error, StoreLocked) or time.monotonic() >= deadline:
                    if isinstance(error, StoreLocked) and lock_timeout > 0:
                        error = StoreLocked(f"{error} (waited {lock_timeout:g} s)")
                    raise error from None
                time.sleep(0.5)

    def _release_lock(self) -> None:
        lock, self._lock = getattr(self, "_lock", None), None
        if lock is not None:
            lock.release()

    # -- schema -------------------------------------------------------------------------------------------------
    def _check_or_create_schema(self, fresh: bool) -> None:
        tables = set(self._conn.execute(load_query("store_tables", ENGINE)).get_as_df()["name"])
        if tables and "Meta" not in tables:
            raise NotAStore(f"{self.location}: a LadybugDB file, but not a graftwork store (no Meta table)")
        if "Meta" in tables:
            version = self._meta("schema_version")
            if version != SCHEMA_VERSION:
                raise NotAStore(
                    f"{self.location}: graftwork schema version {version!r}, this graftwork needs {SCHEMA_VERSION!r}"
                )
            if self.read_only:
                return
        elif self.read_only:
            raise NotAStore(f"{self.location}: empty store (nothing ingested yet)")
        # Every statement is IF NOT EXISTS: a store made by an earlier build gains the tables added since.
        with self.transaction():
            for stmt in statements(load_query("schema", ENGINE)):
                self._conn.execute(stmt)
            self._conn.execute(load_query("meta_set", ENGINE), {"key": "schema_version", "value": SCHEMA_VERSION})
        if "MAPS_TO" in tables:
            self._maps_to_forward_only()

    def _maps_to_forward_only(self) -> None:
        """A store made before MAPS_TO was stored forward only (schema.cypher says why) has the table rebuilt so,
        in one transaction: the same edges with the same properties. About 2 s at 250k edges."""
        directions = set(self._conn.execute(load_query("maps_to_direction", ENGINE)).get_as_df()["storage_direction"])
        if directions != {"both"}:
            return
        rows = self._conn.execute(load_query("maps_to_all", ENGINE)).get_as_arrow()
        create = next(s for s in statements(load_query("schema", ENGINE)) if "EXISTS MAPS_TO(" in s)
        log.info("%s: storing MAPS_TO forward only (%d edges)", self.location, rows.num_rows)
        with self.transaction():
            self._conn.execute("DROP TABLE MAPS_TO")
            self._conn.execute(create)
            if rows.num_rows:
                self._conn.execute(load_query("maps_to_copy", ENGINE), {"rows": rows})

    def _meta(self, key: str) -> str | None:
        df = self._conn.execute(load_query("meta_get", ENGINE), {"key": key}).get_as_df()
        return None if df.empty else df.iloc[0, 0]

    # -- queries ------------------------------------------------------------------------------------------------
    def _execute(self, text: str, params: dict):
        try:
            return self._conn.execute(text, params)
        except RuntimeError as exc:
            if "lock" in str(exc).lower():
                raise StoreLocked(f"{self.location}: {exc}") from None
            raise

    def frame(self, name: str, **params) -> pd.DataFrame:
        return self._execute(load_query(name, ENGINE), params).get_as_df()

    def run(self, name: str, **params) -> None:
        self._execute(load_query(name, ENGINE), params)

    def bulk(self, name: str, rows: pd.DataFrame, **params) -> None:
        if len(rows) == 0:
            return
        table = rows if isinstance(rows, pa.Table) else pa.Table.from_pandas(rows, preserve_index=False)
        with self.transaction():
            self._execute(load_query(name, ENGINE), {"rows": table, **params})

    @contextlib.contextmanager
    def transaction(self):
        if self._tx_depth:
            self._tx_depth += 1
            try:
                yield
            finally:
                self._tx_depth -= 1
            return
        self._conn.execute("BEGIN TRANSACTION")
        self._tx_depth = 1
        try:
            yield
        except BaseException:
            self._tx_depth = 0
            self._conn.execute("ROLLBACK")
            raise
        self._tx_depth = 0
        self._conn.execute("COMMIT")

    # -- vectors ------------------------------------------------------------------------------------------------
    def put_vectors(self, kind, signal, embedder, owners, input_hashes, vectors) -> None:
        self.put_vector_batches([(kind, signal, embedder, owners, input_hashes, vectors)])

    def put_vector_batches(self, batches) -> None:
        tables = [_vector_table(*b) for b in batches if len(b[3])]
        if not tables:
            return
        table = pa.concat_tables(tables)
        keys = table.column("key").to_pylist()
        if len(set(keys)) != len(keys):  # a key in two batches: the later batch's row replaces the earlier one
            last = {k: i for i, k in enumerate(keys)}
            table = table.take(pa.array(sorted(last.values()), pa.int64()))
            keys = table.column("key").to_pylist()
        # One DELETE and one COPY per transaction, always: LadybugDB 0.22 left its primary-key index pointing at
        # missing rows after rolling back a transaction that had run two COPYs into Vector
        # (tests/test_embed_job_speedpaths.py). The cost here is the commit, not the COPY: the engine rewrites
        # the Vector column chunks it appends to, so callers send many batches at once (embed/vector_sink.py).
        # Writing small batches with LOAD FROM ... CREATE instead was measured (medium benchmark, nightly delta,
        # three runs each: 13.2 s against 13.9 s median): the commit gets cheap but the checkpoint at close pays
        # for the same rewrite, and a job killed mid-write then left a log the engine could not replay (one kill
        # test in seven). So COPY stays.
        with self.transaction():
            self._execute(load_query("vectors_delete_keys", ENGINE), {"keys": keys})
            self._execute(load_query("vectors_copy", ENGINE), {"rows": table})

    def get_vectors(self, kind, signal, owners=None) -> VectorSet:
        if owners is None:
            res = self._execute(load_query("vectors_read", ENGINE), {"kind": kind, "signal": signal})
        else:
            keys = _vector_keys(kind, signal, pa.array(list(owners), pa.string()))
            res = self._execute(load_query("vectors_read_keys", ENGINE), {"keys": keys})
        table = res.get_as_arrow()
        if table.num_rows == 0:
            return VectorSet([], [], [], np.zeros((0, 0), dtype=np.float32))
        dims = pc.unique(table.column("dim")).to_pylist()
        if len(dims) != 1:
            raise RuntimeError(f"vectors of {kind}/{signal} have mixed dimensions {sorted(dims)}; re-run embed")
        return VectorSet(
            table.column("owner").to_pylist(),
            table.column("input_hash").to_pylist(),
            table.column("embedder").to_pylist(),
            _blob_matrix(table.column("vec"), table.num_rows, dims[0]),
        )

    def vector_hashes(self, kind, signal, owners=None) -> dict[str, tuple[str, str]]:
        if owners is None:
            res = self._execute(load_query("vectors_hashes", ENGINE), {"kind": kind, "signal": signal})
        elif len(owners) == 0:
            return {}
        else:
            keys = _vector_keys(kind, signal, pa.array(list(owners), pa.string()))
            res = self._execute(load_query("vectors_hashes_keys", ENGINE), {"keys": keys})
        table = res.get_as_arrow()
        return dict(zip(table.column("owner").to_pylist(),
                        zip(table.column("input_hash").to_pylist(), table.column("embedder").to_pylist())))

    def delete_vectors(self, kind, owners) -> None:
        if owners:
            self._execute(load_query("vectors_delete_owners", ENGINE), {"kind": kind, "owners": list(owners)})

    def release_memory(self) -> None:
        """Close the engine and open it again, keeping the file lock. LadybugDB keeps what its queries and writes
        allocated until the database closes: at 1M items a full `run` held about 2 GB more by the map stage than
        a run that reopened between stages (benchmarks/run.py --scale full). On a store with nothing to
        checkpoint a reopen takes about 50 ms, but closing checkpoints every table written since the last one,
        so below RELEASE_ABOVE_MB resident it is not worth it (a nightly delta at 1M items paid 2.9 s for its
        reopens, 2.6 s of it closing)."""
        if self._tx_depth or self._db is None:
            return  # a transaction's state lives in the engine
        resident = _resident_mb()
        if resident is not None and resident < RELEASE_ABOVE_MB:
            return
        import ladybug

        self._conn.close()
        self._db.close()
        self._conn = self._db = None
        self._db = _database(ladybug, self.location, self.read_only)
        self._conn = ladybug.Connection(self._db)
        _trim_heap()

    def close(self) -> None:
        conn, db = getattr(self, "_conn", None), getattr(self, "_db", None)
        self._conn = self._db = None
        if conn is not None:
            conn.close()
        if db is not None:
            db.close()
        self._release_lock()


def _quiet_partial_results() -> None:
    """Ctrl-C or SIGTERM can land inside LadybugDB's `QueryResult.__init__` before it sets `is_closed`; its
    `__del__` then printed an AttributeError traceback under graftwork's clean "interrupted" message (seen once in
    the kill tests). A class-level default makes such a half-built result count as closed; built ones set their
    own value."""
    from ladybug.query_result import QueryResult

    if "is_closed" not in QueryResult.__dict__:
        QueryResult.is_closed = True


def _database(ladybug, path, read_only: bool):
    return ladybug.Database(str(path), read_only=read_only, checkpoint_threshold=CHECKPOINT_WAL_MB * 2**20)


def _resident_mb() -> float | None:
    """This process's resident size in MB (Linux), else None."""
    try:
        with open("/proc/self/statm", encoding="ascii") as f:
            return int(f.read().split()[1]) * os.sysconf("SC_PAGE_SIZE") / 2**20
    except (OSError, ValueError, IndexError, AttributeError):
        return None


def _trim_heap() -> None:
    """Hand the C heap's free pages back to the system (glibc only; elsewhere nothing to do). The engine's freed
    memory otherwise stays in this process's resident size."""
    import ctypes

    try:
        trim = getattr(ctypes.CDLL(None), "malloc_trim", None)  # the symbols already loaded: libc's among them
    except (OSError, TypeError):
        return
    if trim is not None:
        trim(0)


def _vector_table(kind, signal, embedder, owners, input_hashes, vectors) -> pa.Table:
    """The rows of one `put_vectors` batch as the Vector table takes them (COPY from Arrow)."""
    vectors = np.ascontiguousarray(vectors, dtype=np.float32)
    n, dim = vectors.shape
    if len(owners) != n or len(input_hashes) != n:
        raise ValueError(f"{len(owners)} owners, {len(input_hashes)} hashes and {n} vectors for {kind}/{signal}")
    owners = pa.array(list(owners), pa.string())
    # One contiguous buffer sliced into fixed-size binary values: no per-row Python objects.
    data = pa.py_buffer(vectors.tobytes())
    offsets = pa.py_buffer(np.arange(0, (n + 1) * dim * 4, dim * 4, dtype=np.int32).tobytes())
    return pa.table({
        "key": pa.array(_vector_keys(kind, signal, owners), pa.string()),
        "owner": owners,
        "kind": pa.repeat(pa.scalar(kind, pa.string()), n),
        "signal": pa.repeat(pa.scalar(signal, pa.string()), n),
        "embedder": pa.repeat(pa.scalar(embedder, pa.string()), n),
        "input_hash": pa.array(list(input_hashes), pa.string()),
        "dim": pa.array(np.full(n, dim, dtype=np.int64)),
        "vec": pa.Array.from_buffers(pa.binary(), n, [None, offsets, data]),
    })


def _vector_keys(kind: str, signal: str, owners: pa.Array) -> list[str]:
    """The Vector primary key `kind<US>signal<US>owner` (US = \\x1f) of every owner, joined by Arrow."""
    return pc.binary_join_element_wise(f"{kind}\x1f{signal}", owners, "\x1f").to_pylist()


def _blob_matrix(blobs: pa.ChunkedArray, rows: int, dim: int) -> np.ndarray:
    """The float32 (rows, dim) matrix held in a column of BLOBs of `dim` floats each: read straight from the
    Arrow buffers (no bytes object per row) when the values lie back to back, else joined value by value."""
    arr = blobs.combine_chunks() if isinstance(blobs, pa.ChunkedArray) else blobs
    width = dim * 4
    if arr.null_count == 0 and (pa.types.is_binary(arr.type) or pa.types.is_large_binary(arr.type)):
        offset_type = np.int64 if pa.types.is_large_binary(arr.type) else np.int32
        offsets = np.frombuffer(arr.buffers()[1], dtype=offset_type, count=len(arr) + 1,
                                offset=arr.offset * np.dtype(offset_type).itemsize)
        if np.all(np.diff(offsets) == width):
            flat = np.frombuffer(arr.buffers()[2], dtype=np.uint8, count=rows * width, offset=int(offsets[0]))
            return flat.view(np.float32).reshape(rows, dim)  # read-only, as np.frombuffer always was
    return np.frombuffer(b"".join(arr.to_pylist()), dtype=np.float32).reshape(rows, dim)


def _needs_recovery(text: str) -> bool:
    return "recovery is pending" in text or "WAL file is corrupted" in text


def _translate_open_error(path, exc: RuntimeError) -> Exception:
    text = str(exc)
    if re.search(r"lock", text, re.IGNORECASE):
        return StoreLocked(f"{path}: another process holds this store for writing ({text})")
    if "WAL file is corrupted" in text:
        return NotAStore(f"{path}: its write-ahead log ({path}.wal) is damaged and could not be replayed ({text}); "
                         f"moving that file away returns the store to its last checkpoint, losing what came after")
    if "not a valid" in text.lower() or "corrupt" in text.lower() or "magic" in text.lower():
        return NotAStore(f"{path}: not a graftwork store ({text})")
    return NotAStore(f"{path}: cannot open store ({text})")
