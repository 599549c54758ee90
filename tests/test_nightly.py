"""The nightly job (`graftwork run`): config validation, only-what-changed, reference upgrades, crash recovery.

All data is the invented demo scenario, copied into tmp_path so tests can change it.
"""

import shutil
import signal
import subprocess
import sys
import time

import pandas as pd
import pytest

from pipeline.cli import main
from pipeline.demo.scenario import generate_scenario
from pipeline.errors import BadInput
from pipeline.jobs.config import load_config
from pipeline.jobs.demo import demo_config
from pipeline.jobs.nightly import run_pipeline
from pipeline.place.place_job import place
from pipeline.review.decisions import Decision, decide
from pipeline.store import open_store


@pytest.fixture(scope="module")
def scenario(tmp_path_factory):
    return generate_scenario(tmp_path_factory.mktemp("scn") / "data", seed=5, n_items=1500)


@pytest.fixture()
def setup(tmp_path, scenario):
    data = tmp_path / "data"
    shutil.copytree(scenario.directory, data)
    from pipeline.demo.scenario import load_scenario

    files = load_scenario(data)
    cfg_path = tmp_path / "graftwork.toml"
    cfg_path.write_text(demo_config(files, tmp_path / "s.lbug", "static", tmp_path))
    return tmp_path, files, cfg_path


def _export(store_path, out):
    assert main(["--store", str(store_path), "export", "mappings", "--candidates", "5", str(out)]) == 0
    return out.read_text()


def test_a_second_run_with_no_new_input_changes_nothing(setup):
    tmp, _, cfg_path = setup
    first = run_pipeline(load_config(cfg_path))
    before = _export(tmp / "s.lbug", tmp / "a.csv")
    second = run_pipeline(load_config(cfg_path))
    assert _export(tmp / "s.lbug", tmp / "b.csv") == before
    assert second["stages"]["embed"]["embedded"] == 0
    assert all(c["categories"] == 0 for c in second["stages"]["map"].get("sources", {}).values())
    assert second["stages"]["place"]["categories"] == 0
    assert first["stages"]["place"]["items_placed"] == second["stages"]["place"]["items_placed"]


def test_reopening_the_engine_between_stages_and_plans_changes_no_result(setup, monkeypatch):
    # A run reopens the embedded engine to give its memory back (only once the process is big); forced here at
    # every point it may happen, the run must reach the same crosswalk as a run that never reopens.
    from pipeline.store import ladybug_store

    tmp, _, cfg_path = setup
    ref_cfg = tmp / "ref.toml"
    ref_cfg.write_text(cfg_path.read_text().replace('path = "s.lbug"', 'path = "ref.lbug"'))
    monkeypatch.setattr(ladybug_store, "RELEASE_ABOVE_MB", float("inf"))
    run_pipeline(load_config(ref_cfg))
    reopened = []
    original = ladybug_store._trim_heap
    monkeypatch.setattr(ladybug_store, "_trim_heap", lambda: reopened.append(1) or original())
    monkeypatch.setattr(ladybug_store, "RELEASE_ABOVE_MB", 0)
    summary = run_pipeline(load_config(cfg_path))
    assert len(reopened) >= 3 + 3  # at least between the stages and after each source's map plan
    assert "reopen" in summary["seconds"]
    assert _export(tmp / "s.lbug", tmp / "a.csv") == _export(tmp / "ref.lbug", tmp / "b.csv")


def test_new_items_are_placed_through_existing_edges_without_remapping(setup):
    tmp, files, cfg_path = setup
    run_pipeline(load_config(cfg_path))
    before = _export(tmp / "s.lbug", tmp / "a.csv")
    src = files.sources[0]
    items = pd.read_csv(src["items"], dtype=str, keep_default_na=False)
    drop = items.head(20).copy()
    drop[src["columns"]["key"]] = [f"new-{n}" for n in range(len(drop))]
    drop_path = src["items"].with_name("drop-2.csv")
    drop.to_csv(drop_path, index=False)
    text = cfg_path.read_text().replace(f'items = ["data/{src["items"].name}"]',
                                         f'items = ["data/{src["items"].name}", "data/drop-*.csv"]')
    cfg_path.write_text(text)
    summary = run_pipeline(load_config(cfg_path))
    assert all(c["categories"] == 0 for c in summary["stages"]["map"].get("sources", {}).values())
    assert _export(tmp / "s.lbug", tmp / "b.csv") == before  # no edge changed
    assert summary["stages"]["place"]["categories_replaced"] == 0  # only the new members were placed
    assert summary["stages"]["place"]["categories_with_arrivals"] >= 1
    with open_store(tmp / "s.lbug") as s:
        nightly = _placements(s)
        place(s)  # every item afresh through the same edges
        afresh = _placements(s)
    assert nightly == afresh
    assert any(item.startswith(f"{src['key']}:new-") for item, *_ in nightly)
    ingested = [r for r in summary["stages"][f"items {src['key']}"] if not r.get("skipped")]
    assert [r["rows_items"] for r in ingested] == [20]


def _placements(store) -> list[tuple]:
    return sorted(store.frame("audit_placed_in").itertuples(index=False, name=None))


def test_a_changed_category_is_mapped_alone(setup):
    tmp, files, cfg_path = setup
    run_pipeline(load_config(cfg_path))
    tree = next(s for s in files.sources if s["format"] == "tree")
    df = pd.read_csv(tree["taxonomy"], dtype=str, keep_default_na=False)
    leaf = df[~df.code.isin(df.parent_code)].iloc[0]
    df.loc[df.code == leaf.code, "label"] = leaf.label + " and accessories"
    df.to_csv(tree["taxonomy"], index=False)
    summary = run_pipeline(load_config(cfg_path))
    mapped = summary["stages"]["map"]["sources"]
    assert mapped[tree["key"]]["categories"] == 1
    assert summary["stages"][f"source {tree['key']}"]["changed"] == 1


def test_a_reference_upgrade_is_reported_and_decisions_on_removed_concepts_go_stale(setup):
    tmp, files, cfg_path = setup
    run_pipeline(load_config(cfg_path))
    with open_store(tmp / "s.lbug") as s:
        edges = s.frame("ranked_edges", source=files.sources[0]["key"], reference="market")
        top = edges[edges["rank"] == 1].iloc[0]
        decide(s, Decision("accept", files.sources[0]["key"], top.source_code, top.concept_code, by="test"))
    # Remove the accepted concept from the reference file, with every statement block that names it (its
    # children's too, so no parent dangles).
    blocks = files.reference.read_text().split("\n\n")
    marker = f'skos:notation "{top.concept_code}"'
    removed_iri = next(b for b in blocks if marker in b).split()[0]
    files.reference.write_text("\n\n".join(b for b in blocks if removed_iri not in b) + "\n")
    summary = run_pipeline(load_config(cfg_path))
    upgrade = summary["stages"]["reference"]["upgrade"]
    assert upgrade["removed"] >= 1
    with open_store(tmp / "s.lbug", read_only=True) as s:
        edges = s.frame("ranked_edges", source=files.sources[0]["key"], reference="market")
    row = edges[(edges.source_code == top.source_code) & (edges.concept_code == top.concept_code)]
    assert row["status"].tolist() == ["stale"]


def test_a_run_killed_half_way_then_rerun_matches_an_uninterrupted_run(setup, tmp_path_factory):
    tmp, files, cfg_path = setup
    # Reference result: an uninterrupted run in a second store.
    ref_cfg = tmp / "ref.toml"
    ref_cfg.write_text(cfg_path.read_text().replace('path = "s.lbug"', 'path = "ref.lbug"'))
    run_pipeline(load_config(ref_cfg))
    expected = _export(tmp / "ref.lbug", tmp / "ref.csv")
    proc = subprocess.Popen([sys.executable, "-m", "pipeline.cli", "--config", str(cfg_path), "run"],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    # Kill once the job is writing (the store file exists), not while Python is still importing.
    deadline = time.monotonic() + 120
    while not (tmp / "s.lbug").exists() and proc.poll() is None and time.monotonic() < deadline:
        time.sleep(0.05)
    time.sleep(1.0)
    proc.send_signal(signal.SIGKILL)
    proc.wait()
    assert proc.returncode == -signal.SIGKILL, "the run finished before the kill: the test proved nothing"
    assert main(["--config", str(cfg_path), "run"]) == 0
    assert _export(tmp / "s.lbug", tmp / "after.csv") == expected


def test_bad_config_names_the_key(tmp_path):
    cfg = tmp_path / "graftwork.toml"
    cfg.write_text('[reference]\nformat = "owl"\n[map]\ncandidates = "five"\n[[sources]]\nkey = "a"\n')
    with pytest.raises(BadInput) as err:
        load_config(cfg)
    text = str(err.value)
    assert "reference.file" in text and "reference.format" in text
    assert "map.candidates" in text and "sources[1].taxonomy" in text


def test_run_waits_for_the_lock_then_gives_up_with_exit_3(setup):
    tmp, _, cfg_path = setup
    cfg_path.write_text(cfg_path.read_text().replace("lock_timeout = 60", "lock_timeout = 1"))
    code = (f"from pipeline.store import open_store\nimport time\ns = open_store({str(tmp / 's.lbug')!r})\n"
            "print('held', flush=True)\ntime.sleep(20)\n")
    holder = subprocess.Popen([sys.executable, "-c", code], stdout=subprocess.PIPE, text=True)
    try:
        assert holder.stdout.readline().strip() == "held"
        started = time.monotonic()
        out = subprocess.run([sys.executable, "-m", "pipeline.cli", "--config", str(cfg_path), "run"],
                             capture_output=True, text=True, timeout=120)
        assert out.returncode == 3, out.stderr
        assert "waited 1 s" in out.stderr
        assert time.monotonic() - started >= 1.0
    finally:
        holder.kill()
        holder.wait()
