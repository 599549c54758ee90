"""Write vector batches from a background thread, many batches per transaction, while the caller encodes.

Why (profiled on LadybugDB 0.22, benchmarks/README.md): storing vectors cost about as much as encoding them, and
nearly all of it is the commit, which rewrites the part of the Vector table it appends to (tens of us per 1 KB
row, rows already there included). So batches are gathered here and written `max_rows` at a time and at the end
with `Store.put_vector_batches`: few commits, and the engine work, which releases the GIL, runs on this thread
beside the caller's `encode`. (Writing the node vectors early, while the member titles encode, measured slower
on the 2-core benchmark machine: the extra commit rewrote them and took the encoder's core.)

While the sink is open it owns the store: every store call of the job goes through `submit` (reads) or `put`
(vectors); they run on the one store thread in the order given, so the store is never used by two threads.

    >>> with VectorSink(store) as sink:                                        # doctest: +SKIP
    ...     sink.put("Concept", "path", "static:x", ["c:1"], ["h1"], np.ones((1, 4), np.float32))
    ...     schemes = sink.submit(store.frame, "schemes_list").result()
"""

from __future__ import annotations

import queue
import threading
import time
from collections.abc import Callable, Sequence
from concurrent.futures import Future
from typing import Self

import numpy as np

from pipeline.store import Store

MAX_ROWS = 65_536  # rows per transaction: fewer commits rewrite less; about 64 MB of 256-dim vectors held
QUEUED = 8  # vector batches waiting for the store thread before `put` blocks (bounds what is held)

_CLOSE, _ABORT = object(), object()


class VectorSink:
    """Queue `put_vectors` batches and store reads. `close()` (or leaving the `with`) writes what is gathered
    and raises the first store error; `abandon()` (leaving the `with` by an exception) drops it unwritten."""

    def __init__(self, store: Store, *, max_rows: int | None = None):
        self.store = store
        self.max_rows = MAX_ROWS if max_rows is None else max_rows
        self.commits: list[tuple[int, float]] = []  # (rows, seconds) of each written transaction
        self._queue: queue.Queue = queue.Queue()  # reads are small; batches are bounded by _room
        self._room = threading.Semaphore(QUEUED)
        self._lock = threading.Lock()
        self._stopped = False  # set by the store thread as it ends; nothing is queued after that
        self._error: BaseException | None = None
        self._thread = threading.Thread(target=self._run, name="graftwork-store", daemon=True)
        self._thread.start()

    # -- the caller's side ------------------------------------------------------------------------------------
    def submit(self, fn: Callable, *args, **kwargs) -> Future:
        """Run store call `fn(*args, **kwargs)` on the store thread after everything queued before it (batches
        still gathered are not written yet: reads see what the store held before them)."""
        future: Future = Future()
        self._send((future, fn, args, kwargs))
        return future

    def put(self, kind: str, signal: str, embedder: str, owners: Sequence[str], input_hashes: Sequence[str],
            vectors: np.ndarray | Callable[[], np.ndarray]) -> None:
        """Queue one batch as `Store.put_vectors` takes it; it is committed whole, with others, later.
        `vectors` may be a function returning them, called on the store thread (work taken off the caller's)."""
        if len(owners) == 0:
            return
        if not callable(vectors):
            vectors = np.ascontiguousarray(vectors, dtype=np.float32)
        self._send((kind, signal, embedder, list(owners), list(input_hashes), vectors))

    def close(self) -> None:
        """Write what is gathered, stop the thread; raises the first store error."""
        if self._thread.is_alive():
            self._send(_CLOSE, check=False)
            self._thread.join()
        if self._error is not None:
            raise self._error

    def abandon(self) -> None:
        """Drop the batches not yet written (those written stay), stop the thread."""
        if self._thread.is_alive():
            self._send(_ABORT, check=False)
            self._thread.join()

    def __enter__(self) -> Self:
        return self

    def __exit__(self, exc_type, exc, tb) -> None:
        if exc_type is None:
            self.close()
        else:
            self.abandon()

    def _send(self, item, *, check: bool = True) -> None:
        if _is_batch(item):
            while not self._room.acquire(timeout=0.05):  # the store thread is behind: wait for it
                if self._stopped:
                    break
        with self._lock:
            if self._stopped:
                if check:
                    raise self._error or RuntimeError("the vector store thread has stopped")
                return
            self._queue.put(item)

    # -- the store thread -------------------------------------------------------------------------------------
    def _run(self) -> None:
        gathered: list = []
        rows = 0
        try:
            while True:
                item = self._queue.get()
                if item is _ABORT:
                    return
                if item is _CLOSE:
                    if gathered:
                        self._write(gathered, rows)
                    return
                elif _is_batch(item):
                    kind, signal, embedder, owners, hashes, vectors = item
                    if callable(vectors):
                        vectors = np.ascontiguousarray(vectors(), dtype=np.float32)
                    gathered.append((kind, signal, embedder, owners, hashes, vectors))
                    rows += len(owners)
                    self._room.release()
                    if rows >= self.max_rows:
                        self._write(gathered, rows)
                        gathered, rows = [], 0
                else:
                    _answer(item)
        except BaseException as exc:  # noqa: BLE001 - handed to the caller by close() or the next put/submit
            self._error = exc
        finally:
            with self._lock:
                self._stopped = True
            self._fail_waiting()

    def _write(self, batches: list, rows: int) -> None:
        started = time.perf_counter()
        self.store.put_vector_batches(batches)
        self.commits.append((rows, time.perf_counter() - started))

    def _fail_waiting(self) -> None:
        """Reads still queued when the thread stops get an error, so that no caller waits for ever."""
        while True:
            try:
                item = self._queue.get_nowait()
            except queue.Empty:
                return
            if isinstance(item, tuple) and isinstance(item[0], Future):
                item[0].set_exception(self._error or RuntimeError("the vector store thread has stopped"))


def _is_batch(item) -> bool:
    return isinstance(item, tuple) and not isinstance(item[0], Future)


def _answer(item) -> None:
    future, fn, args, kwargs = item
    if not future.set_running_or_notify_cancel():
        return
    try:
        future.set_result(fn(*args, **kwargs))
    except BaseException as exc:  # noqa: BLE001 - re-raised by future.result() on the caller's thread
        future.set_exception(exc)
