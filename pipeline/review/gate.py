"""Writing decisions into a store that another job may hold: wait for the single-writer lock, else queue.

The embedded store has one writer at a time (a nightly job, say), and no reader while it writes. A decision made
meanwhile is applied as soon as the store is free, waiting up to `wait` seconds; if it stays busy the decision is
appended to a queue file beside the store (`<store>.pending-decisions.jsonl`, flushed to disk) and applied by the
next review write, by the review page's background flush, or by `graftwork review pending --apply`. A decision
naming an unknown category or concept is refused at once when the store can be read; while a job writes, it
cannot be read, so that check happens at replay, and a refused decision is logged to
`<store>.failed-decisions.jsonl` and listed by `graftwork review pending`. Each queued decision carries a `ref`,
so a queue that is replayed twice (say, after a crash between commit and truncate) is still applied once.
"""

from __future__ import annotations

import contextlib
import fcntl
import json
import os
import threading
import time
import uuid
from collections.abc import Callable
from dataclasses import replace
from pathlib import Path

from pipeline.errors import StoreLocked
from pipeline.review.decisions import Decision, apply_decisions, pick_reference, resolve, who
from pipeline.review.events import now_iso
from pipeline.review.tree import ConceptTree
from pipeline.store import Store, open_store

PENDING_SUFFIX = ".pending-decisions.jsonl"
FAILED_SUFFIX = ".failed-decisions.jsonl"
_in_process = threading.Lock()  # LadybugDB refuses a second writer in one process at once instead of waiting


def pending_file(store_path: str | Path) -> Path:
    return Path(str(store_path) + PENDING_SUFFIX)


class DecisionGate:
    """Apply decisions to the store at `store_path`, waiting for or queueing behind another writer."""

    def __init__(self, store_path: str | Path, *, reference: str | None = None,
                 opener: Callable[..., Store] | None = None):
        self.store_path = str(store_path)
        self.reference = reference
        self._open = opener or (lambda read_only=False: open_store(self.store_path, read_only=read_only,
                                                                   create=False))

    def submit(self, decisions: list[Decision], *, wait: float = 30.0, strict: bool = True) -> dict:
        """Apply now (after what is already queued), or queue if the store stays busy for `wait` seconds.
        Returns the apply summary with `status` 'applied', or {'status': 'queued', ...}."""
        stamped = [replace(d, by=who(d.by), at=d.at or now_iso(), ref=d.ref or uuid.uuid4().hex)
                   for d in decisions]
        deadline = time.monotonic() + max(0.0, wait)
        delay = 0.05
        checked = False
        while True:
            try:
                with _in_process, self._open() as store:
                    flushed = self._flush(store)
                    summary = apply_decisions(store, stamped, reference=self.reference, strict=strict)
                    summary.update(status="applied", flushed_from_queue=flushed)
                    return summary
            except StoreLocked:
                if not checked:
                    self._check(stamped, strict=strict)  # refuse bad decisions now, not at replay time
                    checked = True
                if time.monotonic() >= deadline:
                    break
                time.sleep(min(delay, max(0.0, deadline - time.monotonic())))
                delay = min(delay * 2, 1.0)
        self._enqueue(stamped)
        return {"status": "queued", "queued": len(stamped), "pending_file": str(pending_file(self.store_path)),
                "message": "the store is busy (another job is writing); the decisions are queued and will be "
                           "applied when it is free"}

    def flush(self) -> dict:
        """Apply every queued decision now (raises StoreLocked if the store is still busy)."""
        with _in_process, self._open() as store:
            return {"applied": self._flush(store), "pending_file": str(pending_file(self.store_path))}

    def pending(self) -> list[dict]:
        path = pending_file(self.store_path)
        if not path.exists():
            return []
        return [json.loads(line) for line in path.read_text(encoding="utf-8").splitlines() if line.strip()]

    def failed(self) -> list[dict]:
        """Queued decisions refused at replay (unknown category or concept), with the reason, oldest first."""
        path = Path(self.store_path + FAILED_SUFFIX)
        if not path.exists():
            return []
        return [json.loads(line) for line in path.read_text(encoding="utf-8").splitlines() if line.strip()]

    # -- internals --------------------------------------------------------------------------------------------------
    def _check(self, decisions: list[Decision], *, strict: bool) -> None:
        if not strict:
            return
        try:
            store = self._open(read_only=True)
        except StoreLocked:
            return  # a writer excludes readers too: checked at replay instead
        with store:
            reference = pick_reference(store, self.reference)
            tree = ConceptTree.load(store, reference)
            for d in decisions:
                resolve(store, d, reference, tree)

    def _enqueue(self, decisions: list[Decision]) -> None:
        path = pending_file(self.store_path)
        with _locked(path, "a") as fh:
            for d in decisions:
                fh.write(json.dumps({**d.to_dict(), "file": d.file, "line": d.line}, sort_keys=True) + "\n")
            fh.flush()
            os.fsync(fh.fileno())

    def _flush(self, store: Store) -> int:
        path = pending_file(self.store_path)
        if not path.exists() or path.stat().st_size == 0:
            return 0
        with _locked(path, "r+") as fh:
            lines = [json.loads(x) for x in fh.read().splitlines() if x.strip()]
            queued = [Decision(**{k: v for k, v in x.items()}) for x in lines]
            summary = apply_decisions(store, queued, reference=self.reference, strict=False)
            if summary["invalid"]:
                with open(str(self.store_path) + FAILED_SUFFIX, "a", encoding="utf-8") as bad:
                    for problem in summary["invalid"]:
                        bad.write(json.dumps({"at": now_iso(), "problem": problem}) + "\n")
            fh.seek(0)
            fh.truncate()
            fh.flush()
            os.fsync(fh.fileno())
        return summary["applied"]


@contextlib.contextmanager
def _locked(path: Path, mode: str):
    """The queue file under an exclusive advisory lock (several CLI calls and the page may touch it)."""
    path.parent.mkdir(parents=True, exist_ok=True)
    if mode == "r+" and not path.exists():
        path.touch()
    with open(path, mode, encoding="utf-8") as fh:
        fcntl.flock(fh.fileno(), fcntl.LOCK_EX)
        try:
            yield fh
        finally:
            fcntl.flock(fh.fileno(), fcntl.LOCK_UN)
