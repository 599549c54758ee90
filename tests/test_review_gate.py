"""A decision made while another process holds the store for writing waits, or is queued, and is never lost."""

import subprocess
import sys
import time

import pytest

from pipeline.errors import NotFound
from pipeline.review.decisions import Decision
from pipeline.review.gate import DecisionGate, pending_file
from pipeline.store import open_store
from review_graphs import build, edges_of


def hold(path, seconds):
    """Another process that opens the store for writing (as a nightly job would) and keeps it."""
    p = subprocess.Popen([sys.executable, "-c", "import sys, time; from pipeline.store import open_store; "
                          f"s = open_store({path!r}); print('ready', flush=True); time.sleep({seconds})"],
                         stdout=subprocess.PIPE, text=True)
    assert p.stdout.readline().strip() == "ready"
    return p


def test_free_store_applies_at_once(tmp_path):
    path = build(tmp_path)
    out = DecisionGate(path).submit([Decision("accept", "shop", "3", "LM")], wait=0)
    assert out["status"] == "applied"


def test_busy_store_queues_then_applies_once(tmp_path):
    path = build(tmp_path)
    holder = hold(path, 30)
    try:
        gate = DecisionGate(path)
        out = gate.submit([Decision("accept", "shop", "3", "LM", by="ana")], wait=0.3)
        assert out["status"] == "queued"
        assert [d["concept"] for d in gate.pending()] == ["LM"]
        # while a job writes, the store cannot be read either, so an unknown category is queued unchecked ...
        assert gate.submit([Decision("accept", "shop", "99", "LM")], wait=0.1)["status"] == "queued"
    finally:
        holder.kill()
        holder.wait()
    assert gate.flush()["applied"] == 1
    assert pending_file(path).read_text() == ""
    # ... and refused at replay, kept where a steward can see it, not applied
    refused = gate.failed()
    assert len(refused) == 1 and "99" in refused[0]["problem"]
    with pytest.raises(NotFound):  # with the store free, the same bad decision is refused at once
        gate.submit([Decision("accept", "shop", "99", "LM")], wait=0.1)
    with open_store(path, read_only=True) as store:
        assert edges_of(store, "shop:3") == {"LM": "accepted"}
        hist = store.frame("review_events_category", category="shop:3")
        assert list(hist["actor"])[-2:] == ["ana", "ana"]  # accepted + superseded, by who decided, not who flushed


def test_a_replayed_queue_is_applied_once(tmp_path):
    path = build(tmp_path)
    gate = DecisionGate(path)
    holder = hold(path, 30)
    try:
        gate.submit([Decision("reject", "shop", "5", "KC")], wait=0)
    finally:
        holder.kill()
        holder.wait()
    saved = pending_file(path).read_text()
    assert gate.flush()["applied"] == 1
    pending_file(path).write_text(saved)  # as if the process died between commit and truncate
    assert gate.flush()["applied"] == 0


def test_waits_for_a_short_job_to_finish(tmp_path):
    path = build(tmp_path)
    holder = hold(path, 1.0)
    t0 = time.monotonic()
    out = DecisionGate(path).submit([Decision("accept", "shop", "3", "LM")], wait=20)
    holder.wait()
    assert out["status"] == "applied"
    assert time.monotonic() - t0 < 15
