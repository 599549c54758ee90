"""Two writers at once on one embedded store: a second `graftwork run` exits 3 (lock_timeout = 0) or waits and
then finds nothing left to do (lock_timeout > 0) -- never do both write -- and a steward's decision made while a
run holds the store is queued or waits, and is in the graph afterwards.

Jobs are child processes forked by tests/crash_harness.py (so they start at once and really overlap).
"""

from __future__ import annotations

import time

import pytest
from crash_harness import JobStarter, copy_store
from graph_snapshot import decisions, snapshot_of
from test_crash_jobs import STORE, _write_config

from pipeline.demo.scenario import generate_scenario
from pipeline.review.decisions import Decision
from pipeline.review.gate import DecisionGate
from pipeline.store import open_store


@pytest.fixture(scope="module")
def setting(tmp_path_factory):
    root = tmp_path_factory.mktemp("concurrency")
    files = generate_scenario(root / "data", seed=5, n_items=1200)
    with JobStarter() as jobs:
        first = root / "first"
        first.mkdir()
        _write_config(first, files, files.reference.parent)
        out = jobs.run(["--config", "graftwork.toml", "run"], cwd=first)
        assert out.code == 0, out.log
        yield root, files, jobs, first


def _fresh(root, files, name, lock_timeout):
    d = root / name
    d.mkdir()
    _write_config(d, files, files.reference.parent)
    text = (d / "graftwork.toml").read_text().replace("lock_timeout = 30", f"lock_timeout = {lock_timeout}")
    (d / "graftwork.toml").write_text(text)
    return d


def _holding(job, deadline=120.0):
    """Wait until a run has opened the store for writing (it prints its first stage after that)."""
    end = time.monotonic() + deadline
    while "reference" not in job.output():
        assert time.monotonic() < end, job.output()
        time.sleep(0.05)


def test_a_second_run_exits_3_and_a_waiting_one_finds_nothing_to_do(setting):
    root, files, jobs, _ = setting
    d = _fresh(root, files, "two-runs", 0)
    a = jobs.start(["--config", "graftwork.toml", "run", "--full"], cwd=d)
    _holding(a)
    refused = jobs.run(["--config", "graftwork.toml", "run"], cwd=d)
    waiting_cfg = d / "waiting.toml"
    waiting_cfg.write_text((d / "graftwork.toml").read_text().replace("lock_timeout = 0", "lock_timeout = 300"))
    waiter = jobs.start(["--config", "waiting.toml", "--json", "run"], cwd=d)
    first = jobs.wait(a)
    second = jobs.wait(waiter)
    assert refused.code == 3, refused.log
    assert "held for writing by pid" in refused.log
    assert first.code == 0, first.log
    assert second.code == 0, second.log
    assert waiter.started + second.seconds >= a.started + first.seconds  # it ended after the first run ended
    assert '"embedded": 0' in second.log  # and found everything done: only one run wrote
    with open_store(d / STORE, read_only=True) as s:
        runs = s.frame("runs_recent", limit=10)
    assert sorted(runs["status"]) == ["ok", "ok"]  # the refused run never got the store, so left no record


def test_a_decision_made_during_a_run_is_not_lost(setting):
    root, files, jobs, first = setting
    d = root / "decide-during-run"
    copy_store(first / STORE, d / STORE)
    _write_config(d, files, files.reference.parent)
    src = files.sources[0]["key"]
    with open_store(d / STORE, read_only=True) as s:
        edges = s.frame("ranked_edges", source=src, reference="market")
    codes = sorted(set(edges["source_code"]))
    one = edges[(edges.source_code == codes[0]) & (edges["rank"] == 2)].iloc[0]
    two = edges[(edges.source_code == codes[1]) & (edges["rank"] == 1)].iloc[0]
    run = jobs.start(["--config", "graftwork.toml", "run", "--full"], cwd=d)
    _holding(run)
    gate = DecisionGate(d / STORE)
    queued = gate.submit([Decision("accept", src, one.source_code, one.concept_code, by="steward")], wait=0)
    waited = gate.submit([Decision("reject", src, two.source_code, two.concept_code, by="steward")], wait=300)
    done = jobs.wait(run)
    assert done.code == 0, done.log
    assert queued["status"] == "queued"
    assert waited["status"] == "applied"  # it waited for the run, then applied (after the queued one)
    got = decisions(snapshot_of(d / STORE, vectors=False))
    cat = lambda code: f"{src}:{code}"
    assert (cat(one.source_code), f"market:{one.concept_code}", "accepted", "steward", "") in got
    assert (cat(two.source_code), f"market:{two.concept_code}", "rejected", "steward", "") in got
    assert gate.pending() == []
