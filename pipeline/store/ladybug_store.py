"""The embedded engine: a LadybugDB file opened in this process."""

from __future__ import annotations

import contextlib
import logging
import re
import time
from pathlib import Path

import numpy as np
import pandas as pd
import pyarrow as pa

from pipeline.errors import NotAStore, StoreLocked
from pipeline.store import access_lock
from pipeline.store.base import SCHEMA_VERSION, Store, VectorSet
from pipeline.store.queries import load_query, statements

log = logging.getLogger(__name__)
ENGINE = "ladybug"


class LadybugStore(Store):
    engine = ENGINE

    def __init__(self, path: str | Path, *, read_only: bool = False, create: bool = True,
                 lock_timeout: float = 0.0):
        import ladybug  # imported here so the Neo4j engine never needs it loaded

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
                self._db = ladybug.Database(str(p), read_only=read_only)
                self._conn = ladybug.Connection(self._db)
                return
            except RuntimeError as exc:
                if read_only and "recovery is pending" in str(exc) and not recovered:
                    # A job was killed before its log was checkpointed: a read-write open replays the committed
                    # transactions (and drops the uncommitted ones); then the read-only open works. The replay is
                    # a write, so it takes the lock exclusively for that moment.
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
        if len(owners) == 0:
            return
        vectors = np.ascontiguousarray(vectors, dtype=np.float32)
        dim = vectors.shape[1]
        keys = [_vector_key(kind, signal, o) for o in owners]
        # One contiguous buffer sliced into fixed-size binary values: no per-row Python objects.
        data = pa.py_buffer(vectors.tobytes())
        offsets = pa.py_buffer(np.arange(0, (len(keys) + 1) * dim * 4, dim * 4, dtype=np.int32).tobytes())
        blobs = pa.Array.from_buffers(pa.binary(), len(keys), [None, offsets, data])
        table = pa.table(
            {
                "key": keys,
                "owner": list(owners),
                "kind": [kind] * len(keys),
                "signal": [signal] * len(keys),
                "embedder": [embedder] * len(keys),
                "input_hash": list(input_hashes),
                "dim": pa.array(np.full(len(keys), dim, dtype=np.int64)),
                "vec": blobs,
            }
        )
        with self.transaction():
            self._execute(load_query("vectors_delete_keys", ENGINE), {"keys": keys})
            self._execute(load_query("vectors_copy", ENGINE), {"rows": table})

    def get_vectors(self, kind, signal, owners=None) -> VectorSet:
        if owners is None:
            res = self._execute(load_query("vectors_read", ENGINE), {"kind": kind, "signal": signal})
        else:
            keys = [_vector_key(kind, signal, o) for o in owners]
            res = self._execute(load_query("vectors_read_keys", ENGINE), {"keys": keys})
        table = res.get_as_arrow()
        if table.num_rows == 0:
            return VectorSet([], [], [], np.zeros((0, 0), dtype=np.float32))
        dims = set(table.column("dim").to_pylist())
        if len(dims) != 1:
            raise RuntimeError(f"vectors of {kind}/{signal} have mixed dimensions {sorted(dims)}; re-run embed")
        blobs = table.column("vec").combine_chunks()
        matrix = np.frombuffer(b"".join(blobs.to_pylist()), dtype=np.float32).reshape(table.num_rows, dims.pop())
        return VectorSet(
            table.column("owner").to_pylist(),
            table.column("input_hash").to_pylist(),
            table.column("embedder").to_pylist(),
            matrix,
        )

    def delete_vectors(self, kind, owners) -> None:
        if owners:
            self._execute(load_query("vectors_delete_owners", ENGINE), {"kind": kind, "owners": list(owners)})

    def close(self) -> None:
        conn, db = getattr(self, "_conn", None), getattr(self, "_db", None)
        self._conn = self._db = None
        if conn is not None:
            conn.close()
        if db is not None:
            db.close()
        self._release_lock()


def _vector_key(kind: str, signal: str, owner: str) -> str:
    return f"{kind}\x1f{signal}\x1f{owner}"


def _translate_open_error(path, exc: RuntimeError) -> Exception:
    text = str(exc)
    if re.search(r"lock", text, re.IGNORECASE):
        return StoreLocked(f"{path}: another process holds this store for writing ({text})")
    if "not a valid" in text.lower() or "corrupt" in text.lower() or "magic" in text.lower():
        return NotAStore(f"{path}: not a graftwork store ({text})")
    return NotAStore(f"{path}: cannot open store ({text})")
