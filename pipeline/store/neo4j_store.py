"""The Neo4j engine: a Neo4j 5 database reached over Bolt with the official `neo4j` driver.

Same interface and the same answers as the embedded engine (tests run against both). What differs inside:
- Single statements outside a `transaction()` block run as managed transactions (`execute_read`/`execute_write`),
  which the driver retries on transient errors (deadlocks, leader changes, dropped connections).
- A `transaction()` block is one explicit transaction. Every statement in it is journaled; when one fails with a
  retryable error (or the commit does), the transaction is rolled back and the journal replayed in a new one.
  Reads in the journal are compared with what they returned the first time, so a block whose decisions were
  based on data that changed meanwhile fails instead of writing something stale. Our transactions are idempotent
  as units (MERGE upserts; clear-then-create for edges and vectors), so a replay after an unclear commit is safe.
- Bulk writes pass `$rows` to `UNWIND`, in chunks of `batch_rows` rows inside one transaction.
- Vectors are float32 bytes on `Vector` nodes (fast to read back over Bolt); concept vectors also get a float list
  on the `ConceptVector` label, under a vector index where the server has one (5.23+), for `nearest_concepts`.
"""

from __future__ import annotations

import contextlib
import hashlib
import logging
import math
import time
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import pandas as pd

from pipeline import __version__
from pipeline.errors import GraftworkError, NotAStore
from pipeline.store.base import SCHEMA_VERSION, Store, VectorSet
from pipeline.store.neo4j_connect import (
    Neo4jSettings,
    StoreUnavailable,
    check_server_version,
    supports_vector_index,
    translate_connect_error,
)
from pipeline.store.queries import load_query, statements

log = logging.getLogger(__name__)
ENGINE = "neo4j"
VECTOR_INDEX = "graftwork_concept_vectors"
# Server notifications about labels or properties not created yet (a fresh store) and about IF NOT EXISTS schema
# commands are expected here; deprecations and performance hints still come through the driver's logger.
_DRIVER_OPTIONS = {
    "connection_timeout": 10.0,
    "max_transaction_retry_time": 30.0,
    "user_agent": f"graftwork/{__version__}",
    "notifications_disabled_classifications": ["UNRECOGNIZED", "SCHEMA"],
}


class ReadOnlyStore(GraftworkError):
    exit_code = 1


class ChangedDuringRetry(GraftworkError):
    """A transaction was retried after a transient error, but data it had read changed meanwhile."""

    exit_code = 1


@dataclass
class _Op:
    text: str
    params: dict
    digest: str | None = None  # reads: what they returned the first time; None for writes
    read: bool = False


class Neo4jStore(Store):
    engine = ENGINE
    batch_rows = 10_000      # UNWIND rows per statement for nodes and edges
    vector_batch_rows = 2_000  # fewer for vectors: each row carries a few kilobytes
    max_attempts = 6

    def __init__(self, uri: str, *, read_only: bool = False, create: bool = True,
                 settings: Neo4jSettings | None = None):
        import neo4j  # imported here so the embedded engine never needs the driver

        self.settings = settings or Neo4jSettings.from_uri(uri)
        self.location = self.settings.location
        self.read_only = read_only
        self._tx = None
        self._depth = 0
        self._journal: list[_Op] = []
        s = self.settings
        auth = (s.user, s.password) if s.password is not None else None
        self._driver = neo4j.GraphDatabase.driver(s.uri, auth=auth, **_DRIVER_OPTIONS)
        try:
            self._driver.verify_connectivity()
            info = self._driver.get_server_info()
            comp = self._driver.execute_query(load_query("server_components", ENGINE), database_=s.database,
                                              routing_=neo4j.RoutingControl.READ).records
            version = comp[0]["version"] if comp else ""
            edition = comp[0]["edition"] if comp else ""
            self.server_version = check_server_version(self.location, info.agent, version, edition)
            self.server = f"Neo4j {version} {edition}".strip()
            self._session = self._driver.session(
                database=s.database,
                default_access_mode=neo4j.READ_ACCESS if read_only else neo4j.WRITE_ACCESS,
            )
            self.vector_index = supports_vector_index(*self.server_version)
            self._check_or_create_schema(create)
        except GraftworkError:
            self._driver.close()
            raise
        except Exception as exc:  # driver errors while connecting: one clear line, never the password
            self._driver.close()
            raise translate_connect_error(self.settings, exc) from None

    # -- schema -------------------------------------------------------------------------------------------------
    def _check_or_create_schema(self, create: bool) -> None:
        found = self._read_now("schema_probe", {"key": "schema_version"})
        version, nodes = found.iloc[0]["version"], int(found.iloc[0]["nodes"])
        if version is not None and version != SCHEMA_VERSION:
            raise NotAStore(f"{self.location}: graftwork schema version {version!r}, "
                            f"this graftwork needs {SCHEMA_VERSION!r}")
        if version is None and nodes:
            raise NotAStore(f"{self.location}: a Neo4j database with {nodes} nodes, but not a graftwork store "
                            "(no Meta node); use an empty database")
        if self.read_only:
            if version is None:
                raise NotAStore(f"{self.location}: empty store (nothing ingested yet)")
            return
        if version is None and not create:
            raise NotAStore(f"{self.location}: no graftwork store here (run an ingest first, or check --neo4j)")
        # Constraints and indexes are created idempotently (IF NOT EXISTS) on every writable open, so a store
        # made by an older graftwork gains new indexes; schema commands must each run in their own transaction.
        ddl = statements(load_query("schema", ENGINE))
        if self.vector_index:
            ddl += statements(load_query("vector_index", ENGINE))
        for stmt in ddl:
            self._session.run(stmt).consume()
        if version is None:
            self.run("meta_set", key="schema_version", value=SCHEMA_VERSION)
            log.info("created graftwork schema in %s", self.location)

    # -- queries ------------------------------------------------------------------------------------------------
    def frame(self, name: str, **params) -> pd.DataFrame:
        return self._read_now(name, _plain(params))

    def run(self, name: str, **params) -> None:
        self._write_now(load_query(name, ENGINE), _plain(params))

    def bulk(self, name: str, rows: pd.DataFrame, **params) -> None:
        if (rows.num_rows if hasattr(rows, "num_rows") else len(rows)) == 0:
            return
        text = load_query(name, ENGINE)
        records = _records(rows)
        extra = _plain(params)
        with self.transaction():
            for start in range(0, len(records), self.batch_rows):
                self._write_now(text, {**extra, "rows": records[start:start + self.batch_rows]})

    def _read_now(self, name: str, params: dict) -> pd.DataFrame:
        text = load_query(name, ENGINE)
        if self._tx is not None:
            keys, rows = self._in_tx(_Op(text, params, read=True))
        else:
            keys, rows = self._session.execute_read(_fetch, text, params)
        return pd.DataFrame(rows, columns=keys)

    def _write_now(self, text: str, params: dict) -> None:
        self._refuse_if_read_only()
        if self._tx is not None:
            self._in_tx(_Op(text, params))
        else:
            self._session.execute_write(_consume, text, params)

    def _refuse_if_read_only(self) -> None:
        if self.read_only:
            raise ReadOnlyStore(f"{self.location}: opened read-only; this command writes")

    # -- transactions -------------------------------------------------------------------------------------------
    @contextlib.contextmanager
    def transaction(self):
        if self._depth:
            self._depth += 1
            try:
                yield
            finally:
                self._depth -= 1
            return
        self._tx = self._session.begin_transaction()
        self._depth, self._journal = 1, []
        try:
            yield
        except BaseException:
            self._end(commit=False)
            raise
        self._end(commit=True)

    def _end(self, *, commit: bool) -> None:
        try:
            if not commit:
                with contextlib.suppress(Exception):
                    self._tx.rollback()
                return
            for attempt in range(1, self.max_attempts + 1):
                try:
                    self._tx.commit()
                    return
                except Exception as exc:
                    if not _retryable(exc) or attempt == self.max_attempts:
                        raise
                    self._restart(exc, attempt)
        finally:
            with contextlib.suppress(Exception):
                self._tx.close()
            self._tx, self._depth, self._journal = None, 0, []

    def _in_tx(self, op: _Op):
        for attempt in range(1, self.max_attempts + 1):
            try:
                result = _fetch(self._tx, op.text, op.params) if op.read else _consume(self._tx, op.text, op.params)
                break
            except Exception as exc:
                if not _retryable(exc) or attempt == self.max_attempts:
                    raise
                self._restart(exc, attempt)
        if op.read:
            op.digest = _digest(result)
        self._journal.append(op)
        return result

    def _restart(self, exc: Exception, attempt: int) -> None:
        """Roll back, wait, open a new transaction and replay the journal into it (retrying that too)."""
        while True:
            log.warning("transient Neo4j error (%s); retrying the transaction (attempt %d)",
                        getattr(exc, "code", None) or type(exc).__name__, attempt + 1)
            with contextlib.suppress(Exception):
                self._tx.close()
            time.sleep(min(5.0, 0.2 * 2 ** (attempt - 1)))
            try:
                self._tx = self._session.begin_transaction()
                for op in self._journal:
                    if op.read:
                        if _digest(_fetch(self._tx, op.text, op.params)) != op.digest:
                            raise ChangedDuringRetry(
                                f"{self.location}: the data this job had read changed while its transaction was "
                                "retried after a transient error; nothing was written, re-run it")
                    else:
                        _consume(self._tx, op.text, op.params)
                return
            except Exception as again:
                attempt += 1
                if not _retryable(again) or attempt >= self.max_attempts:
                    raise
                exc = again

    # -- vectors ------------------------------------------------------------------------------------------------
    def put_vectors(self, kind, signal, embedder, owners, input_hashes, vectors) -> None:
        if len(owners) == 0:
            return
        self._refuse_if_read_only()
        vectors = np.ascontiguousarray(vectors, dtype=np.float32)
        dim = int(vectors.shape[1])
        keys = [_vector_key(kind, signal, o) for o in owners]
        copy_q, embed_q = load_query("vectors_copy", ENGINE), load_query("vectors_embed", ENGINE)
        index_too = kind == "Concept"
        step = self.vector_batch_rows
        with self.transaction():
            self._write_now(load_query("vectors_delete_keys", ENGINE), {"keys": keys})
            for start in range(0, len(keys), step):
                block = slice(start, start + step)
                rows = [
                    {"key": k, "owner": str(o), "kind": kind, "signal": signal, "embedder": embedder,
                     "input_hash": str(h), "dim": dim, "vec": v.tobytes()}
                    for k, o, h, v in zip(keys[block], owners[block], input_hashes[block], vectors[block])
                ]
                self._write_now(copy_q, {"rows": rows})
                if index_too:
                    self._write_now(embed_q, {"rows": [{"key": k, "embedding": v.tolist()}
                                                       for k, v in zip(keys[block], vectors[block])]})

    def get_vectors(self, kind, signal, owners=None) -> VectorSet:
        if owners is None:
            df = self.frame("vectors_read", kind=kind, signal=signal)
        else:
            df = self.frame("vectors_read_keys", keys=[_vector_key(kind, signal, o) for o in owners])
        if df.empty:
            return VectorSet([], [], [], np.zeros((0, 0), dtype=np.float32))
        dims = set(df["dim"])
        if len(dims) != 1:
            raise RuntimeError(f"vectors of {kind}/{signal} have mixed dimensions {sorted(dims)}; re-run embed")
        matrix = np.frombuffer(b"".join(df["vec"]), dtype=np.float32).reshape(len(df), int(dims.pop()))
        return VectorSet(df["owner"].tolist(), df["input_hash"].tolist(), df["embedder"].tolist(), matrix)

    def delete_vectors(self, kind, owners) -> None:
        if owners:
            self.run("vectors_delete_owners", kind=kind, owners=list(owners))

    def nearest_concepts(self, signal: str, queries: np.ndarray, k: int, *, overfetch: int = 4
                         ) -> list[list[tuple[str, float]]]:
        """Approximate top-`k` concepts per query row by cosine similarity, from the server's vector index.

        For references too large to hold in memory; scores are cosines (-1..1) recomputed from the index's
        (1 + cos) / 2. The index covers every concept signal, so `overfetch * k` neighbours are asked for and
        filtered to `signal`. Raises GraftworkError when the server has no vector index (before 5.23)."""
        if not self.vector_index:
            raise GraftworkError(f"{self.location}: {self.server} has no vector index graftwork can use (5.23+)")
        qs = np.ascontiguousarray(queries, dtype=np.float32)
        df = self.frame("vectors_nearest", index=VECTOR_INDEX, signal=signal, fetch=int(k * overfetch),
                        queries=[{"i": i, "vec": row.tolist()} for i, row in enumerate(qs)])
        out: list[list[tuple[str, float]]] = [[] for _ in range(len(qs))]
        for i, owner, score in zip(df["query"], df["owner"], df["score"]):
            if len(out[i]) < k:
                out[i].append((owner, 2.0 * float(score) - 1.0))
        return out

    def await_indexes(self, seconds: int = 300) -> None:
        """Wait until every index is online (a freshly filled vector index is searchable after this)."""
        self._session.run(load_query("indexes_await", ENGINE), seconds=seconds).consume()

    def close(self) -> None:
        session, driver = getattr(self, "_session", None), getattr(self, "_driver", None)
        self._session = self._driver = None
        if session is not None:
            with contextlib.suppress(Exception):
                session.close()
        if driver is not None:
            driver.close()


def wipe_database(uri: str, *, settings: Neo4jSettings | None = None) -> None:
    """Delete every node and relationship in the database at `uri` (TESTS ONLY: Community has one user
    database, so tests isolate by wiping). Works on any content; constraints and indexes stay."""
    import neo4j

    s = settings or Neo4jSettings.from_uri(uri)
    auth = (s.user, s.password) if s.password is not None else None
    with neo4j.GraphDatabase.driver(s.uri, auth=auth, **_DRIVER_OPTIONS) as driver:
        with driver.session(database=s.database) as session:
            session.run(load_query("wipe_all", ENGINE)).consume()


# -- helpers ----------------------------------------------------------------------------------------------------
def _fetch(tx, text: str, params: dict) -> tuple[list[str], list[list]]:
    result = tx.run(text, params)
    keys = list(result.keys())
    return keys, [record.values() for record in result]


def _consume(tx, text: str, params: dict) -> None:
    tx.run(text, params).consume()


def _retryable(exc: Exception) -> bool:
    check: Callable[[], bool] | None = getattr(exc, "is_retryable", None)
    try:
        return bool(check()) if check else False
    except Exception:  # noqa: BLE001 (a driver that cannot tell: do not retry)
        return False


def _digest(result: tuple[list[str], list[list]]) -> str:
    return hashlib.sha256(repr(result).encode("utf-8", "surrogatepass")).hexdigest()


def _vector_key(kind: str, signal: str, owner: str) -> str:
    return f"{kind}\x1f{signal}\x1f{owner}"


def _plain(value):
    """Parameters as the driver's plain types: numpy and pandas scalars unboxed, NaN and NA to null."""
    if value is None or isinstance(value, str | bool | int | bytes):
        return value
    if isinstance(value, float):
        return None if math.isnan(value) else value
    if isinstance(value, dict):
        return {k: _plain(v) for k, v in value.items()}
    if isinstance(value, list | tuple | np.ndarray | pd.Series):
        return [_plain(v) for v in value]
    if isinstance(value, np.generic):
        return _plain(value.item())
    if value is pd.NA or value is pd.NaT:
        return None
    return value


def _records(df) -> list[dict]:
    """Rows of a DataFrame (or, as the embedded engine also takes, a pyarrow Table) as plain dicts."""
    if not isinstance(df, pd.DataFrame):  # pyarrow.Table
        return [_plain(row) for row in df.to_pylist()]
    columns = [str(c) for c in df.columns]
    data = [[_plain(v) for v in df[c].tolist()] for c in df.columns]
    return [dict(zip(columns, row)) for row in zip(*data)]


__all__ = ["ChangedDuringRetry", "Neo4jStore", "ReadOnlyStore", "StoreUnavailable", "wipe_database"]
