"""The run ledger: one `Run` node per job execution, with parameters, counts, status and timing."""

from __future__ import annotations

import contextlib
import json
import secrets
from datetime import datetime, timezone

from pipeline.store import Store


def new_run_id(job: str) -> str:
    stamp = datetime.now(timezone.utc).strftime("%Y%m%dT%H%M%S")
    return f"{job}-{stamp}-{secrets.token_hex(3)}"


def _now() -> str:
    return datetime.now(timezone.utc).isoformat(timespec="milliseconds")


@contextlib.contextmanager
def ledger(store: Store, job: str, parameters: dict):
    """Record a run around a block: yields a dict the job fills with counts (and `run_id`).
    A failure is recorded with its message and re-raised."""
    record = {"run_id": new_run_id(job), "counts": {}}
    started = _now()

    def write(status: str, message: str = "") -> None:
        store.run(
            "run_record", id=record["run_id"], job=job, started_at=started, finished_at=_now(), status=status,
            parameters=json.dumps(parameters, default=str, sort_keys=True),
            counts=json.dumps(record["counts"], default=str, sort_keys=True), message=message[:2000],
        )

    try:
        yield record
    except BaseException as exc:
        with contextlib.suppress(Exception):
            write("failed", f"{type(exc).__name__}: {exc}")
        raise
    write("ok")
