"""Every analyst query cross-checked against plain pandas on the input files of a small generated demo scenario
plus the exported crosswalk (as tests/test_cli_end_to_end.py does for the rollup): a placement, filter or
aggregation bug in the graph queries shows up as a difference."""

import pandas as pd
import pytest
from demo_layer import demo_layer
from rdflib import Graph
from rdflib.namespace import SKOS

from pipeline.cli import main
from pipeline.query.coverage import coverage
from pipeline.query.drilldown import drilldown
from pipeline.query.filters import Filters
from pipeline.query.overlap import overlap
from pipeline.query.rollup import rollup
from pipeline.query.subtree import subtree
from pipeline.store import open_store


@pytest.fixture(scope="module")
def case(tmp_path_factory):
    tmp, store, files = demo_layer(tmp_path_factory)
    out = tmp / "crosswalk.csv"
    assert main(["--store", store, "export", "mappings", "--candidates", "1", str(out)]) == 0
    edges = pd.read_csv(out, dtype=str, keep_default_na=False)
    live = edges[edges.status.isin(["auto", "accepted"])]
    concepts_of: dict[tuple[str, str], set[str]] = {}
    for r in live.itertuples():
        concepts_of.setdefault((r.source_scheme, r.source_code), set()).add(r.concept_code)
    g = Graph().parse(files.reference)
    code = {s: str(o) for s, o in g.subject_objects(SKOS.notation)}
    parent = {c: None for c in code.values()}
    for s, o in g.subject_objects(SKOS.broader):
        parent[code[s]] = code[o]
    rows, keys = [], []
    for src in files.sources:
        items = pd.read_csv(src["items"], dtype=str, keep_default_na=False)
        cols = src["columns"]
        for rec in items.to_dict("records"):
            keys.append((src["key"], rec[cols["key"]]))
            for cat in rec[cols["category"]].split("|"):
                for concept in concepts_of.get((src["key"], cat.strip()), ()):
                    rows.append({"source": src["key"], "key": rec[cols["key"]], "category": cat.strip(),
                                 "concept": concept, "brand_line": rec.get("brand_line", "")})
    placed = pd.DataFrame(rows)
    all_keys = pd.DataFrame(keys, columns=["source", "key"]).drop_duplicates()
    return {"store": store, "placed": placed, "parent": parent, "all_keys": all_keys,
            "sources": [s["key"] for s in files.sources]}


def _chain(parent, code):
    out = [code]
    while parent[out[-1]]:
        out.append(parent[out[-1]])
    return out[::-1]  # top first


def _expected_rollup(case, depth, placed=None):
    placed = case["placed"] if placed is None else placed
    got: dict[tuple[str, str], set[str]] = {}
    for r in placed.itertuples():
        chain = _chain(case["parent"], r.concept)
        for anc in chain[:depth]:  # the concept's ancestors at levels 1..depth (or itself)
            got.setdefault((anc, r.source), set()).add(r.key)
    return {k: len(v) for k, v in got.items()}


def _got_rollup(df, sources):
    return {(r["concept_code"], s): int(r[s]) for r in df.to_dict("records") for s in sources if r.get(s)}


def test_rollup_at_depth_two_matches_pandas(case):
    with open_store(case["store"], read_only=True) as s:
        got = _got_rollup(rollup(s, depth=2), case["sources"])
    assert got == _expected_rollup(case, 2)
    assert sum(v for (c, _), v in got.items() if c.count(".") == 1) > 500  # top level (HG.n): most of 1500


def test_rollup_at_depth_four_and_below_a_concept_matches_pandas(case):
    want = _expected_rollup(case, 4)
    with open_store(case["store"], read_only=True) as s:
        got = _got_rollup(rollup(s, depth=4), case["sources"])
        top = max({c for c, _ in want if c.count(".") == 1}, key=lambda c: sum(v for (k, _), v in want.items()
                                                                                if k == c))
        under = _got_rollup(rollup(s, concept=top, depth=2), case["sources"])
    assert got == want
    assert any(c.count(".") == 4 for c, _ in got)  # level four is reached
    assert under == {(c, src): v for (c, src), v in want.items() if c == top or c.startswith(top + ".")
                     and c.count(".") <= top.count(".") + 2}


def test_rollup_filtered_by_source_and_attribute_matches_pandas(case):
    placed = case["placed"]
    brand = placed.loc[placed.brand_line != "", "brand_line"].value_counts().index[0]
    src = case["sources"][0]
    sub = placed[(placed.brand_line == brand) & (placed.source == src)]
    with open_store(case["store"], read_only=True) as s:
        got = _got_rollup(rollup(s, depth=1, filters=Filters(sources=[src], attributes={"brand_line": brand})),
                          case["sources"])
    assert got == _expected_rollup(case, 1, sub)
    assert got  # the filter keeps something


def test_accepted_only_counts_nothing_before_anyone_decides(case):
    with open_store(case["store"], read_only=True) as s:
        assert rollup(s, depth=1, filters=Filters(statuses=("accepted",))).empty


def test_coverage_matches_pandas(case):
    with open_store(case["store"], read_only=True) as s:
        df = coverage(s).set_index("source")
    placed = case["placed"].groupby("source")["key"].nunique()
    totals = case["all_keys"].groupby("source")["key"].nunique()
    for src in case["sources"]:
        assert df.at[src, "items"] == totals[src]
        assert df.at[src, "placed"] == placed[src]
        assert df.at[src, "accepted"] + df.at[src, "auto"] == placed[src]
    assert df.at["(total)", "items"] == totals.sum()


def test_overlap_matches_pandas(case):
    keys = case["all_keys"]
    shared = keys.groupby("key")["source"].nunique()
    shared = set(shared[shared > 1].index)
    sets: dict[str, dict[str, set[str]]] = {k: {} for k in shared}
    for r in keys[keys.key.isin(shared)].itertuples():
        sets[r.key].setdefault(r.source, set())
    for r in case["placed"][case["placed"].key.isin(shared)].itertuples():
        sets[r.key][r.source].add(r.concept)
    expected_same = {k for k, per in sets.items()
                     if all(per.values()) and len({frozenset(v) for v in per.values()}) == 1}
    with open_store(case["store"], read_only=True) as s:
        df = overlap(s)
    assert set(df.item_key) == shared and len(shared) > 10
    assert set(df.loc[df.same_concept.astype(bool), "item_key"]) == expected_same


def test_drilldown_and_subtree_match_pandas(case):
    placed = case["placed"]
    top = placed.concept.map(lambda c: _chain(case["parent"], c)[0]).value_counts().index[0]
    under = placed[placed.concept.map(lambda c: top in _chain(case["parent"], c))]
    expected = set(zip(under.source, under.key, under.category, under.concept))
    with open_store(case["store"], read_only=True) as s:
        dd = drilldown(s, top)
        tree = subtree(s, top, depth=1)
        roll = rollup(s, concept=top, depth=1)
    assert set(zip(dd.source, dd.item_key, dd.category_code, dd.concept_code)) == expected
    assert tree.loc[tree.relation == "self", "total"].item() == under.groupby("source")["key"].nunique().sum()
    with_items = tree[tree.total > 0]
    assert dict(zip(with_items.code, with_items.total)) == dict(zip(roll.concept_code, roll.total))
