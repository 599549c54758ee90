"""The whole spine through the CLI on a small generated demo scenario, cross-checked with plain pandas.

The scenario is invented (pipeline/demo); the cross-check recomputes the rollup from the input files and the
exported crosswalk without the graph, so a placement or rollup bug shows up as a difference. Runs on both engines
(`module_engine` in conftest.py; the Neo4j half is marked neo4j).
"""

import json

import pandas as pd
import pytest

from pipeline.cli import main
from pipeline.demo.scenario import generate_scenario


@pytest.fixture(scope="module")
def built(tmp_path_factory, module_engine):
    tmp = tmp_path_factory.mktemp("e2e")
    files = generate_scenario(tmp / "data", seed=11, n_items=3000)
    store = module_engine.cli  # global options naming the store: --store PATH or --neo4j URI
    run = lambda *a: main([*store, *a])
    assert run("ingest", "reference", str(files.reference), "--scheme", "market") == 0
    for src in files.sources:
        cols = src["columns"]
        opts = ["--format", src["format"]]
        if src["format"] == "paths":
            opts += ["--separator", src["separator"]]
        assert run("ingest", "source", src["key"], str(src["taxonomy"]), *opts) == 0
        assert run("ingest", "items", src["key"], str(src["items"]), "--key-column", cols["key"],
                   "--title-column", cols["title"], "--category-column",
                   cols["category"]) == 0
    assert run("embed") == 0
    assert run("map") == 0
    assert run("place") == 0
    return tmp, store, files


def test_rollup_matches_a_pandas_recomputation(built, capsys):
    tmp, store, files = built
    out = tmp / "map.csv"
    assert main([*store, "export", "mappings", "--candidates", "1", str(out)]) == 0
    edges = pd.read_csv(out, dtype=str)
    live = edges[edges.status.isin(["auto", "accepted"])]
    concept_of = {(r.source_scheme, r.source_code): r.concept_code for r in live.itertuples()}

    ref = _reference_tree(files.reference)
    top_of = {}
    for code in ref:
        c = code
        while ref[c]:
            c = ref[c]
        top_of[code] = c
    expected: dict[tuple[str, str], set[str]] = {}
    for src in files.sources:
        items = pd.read_csv(src["items"], dtype=str, keep_default_na=False)
        key_col, cat_col = src["columns"]["key"], src["columns"]["category"]
        for key, cats in zip(items[key_col], items[cat_col]):
            for cat in cats.split("|"):
                concept = concept_of.get((src["key"], cat.strip()))
                if concept:
                    expected.setdefault((top_of[concept], src["key"]), set()).add(key)

    capsys.readouterr()
    assert main([*store, "--json", "query", "rollup", "--depth", "1"]) == 0
    got = pd.DataFrame(json.loads(capsys.readouterr().out))
    sources = [s["key"] for s in files.sources]
    got_pairs = {(r["concept_code"], s): int(r[s]) for r in got.to_dict("records") for s in sources if r.get(s)}
    assert got_pairs == {k: len(v) for k, v in expected.items()}
    assert sum(got_pairs.values()) > 0.5 * 3000  # most items land somewhere (invented data, mostly clean)


def test_rerunning_map_and_place_changes_nothing(built, capsys):
    tmp, store, _ = built
    first, second = tmp / "a.csv", tmp / "b.csv"
    assert main([*store, "export", "mappings", "--candidates", "5", str(first)]) == 0
    assert main([*store, "embed"]) == 0
    assert main([*store, "map"]) == 0
    assert main([*store, "place"]) == 0
    assert main([*store, "export", "mappings", "--candidates", "5", str(second)]) == 0
    assert first.read_text() == second.read_text()


def test_status_reports_counts_and_runs(built, capsys):
    _, store, files = built
    capsys.readouterr()
    assert main([*store, "--json", "status"]) == 0
    status = json.loads(capsys.readouterr().out)
    kinds = {(n["kind"], n["scheme"]) for n in status["nodes"]}
    assert ("Concept", "market") in kinds
    assert all(("Category", s["key"]) in kinds for s in files.sources)
    assert {r["job"] for r in status["runs"]} >= {"map", "place", "embed"}
    assert all(r["status"] == "ok" for r in status["runs"])


def test_demo_answer_key_is_mostly_recovered(built, module_engine):
    from pipeline.match.evaluate import evaluate

    _, store, files = built
    key = pd.read_csv(files.answer_key, dtype=str)
    with module_engine.open(read_only=True) as s:
        for src in files.sources:
            part = key[key.source_key == src["key"]]
            gold: dict[str, set[str]] = {}
            for a, b in zip(part.source_code, part.reference_code):
                gold.setdefault(a, set()).add(b)
            report = evaluate(s, src["key"], gold)
            # invented data, so a sanity floor only (the outside checks are the oracle tests)
            assert report["hit@5"] >= 0.5, report


def _reference_tree(ttl):
    from rdflib import Graph
    from rdflib.namespace import SKOS

    g = Graph().parse(ttl)
    code = {s: str(o) for s, o in g.subject_objects(SKOS.notation)}
    parent = {c: None for c in code.values()}
    for s, o in g.subject_objects(SKOS.broader):
        parent[code[s]] = code[o]
    return parent
