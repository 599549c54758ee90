"""The rollup's one-walk form (pipeline/query/ancestry.py) against the engine's own variable-length form
(cypher/common/query_rollup.cypher, kept as the reference) and against counts made by hand."""

import numpy as np
import pandas as pd
import pytest
from demo_layer import copy_store, demo_layer

from pipeline.cli import main
from pipeline.query.ancestry import MAX_HOPS, Window, closure, rollup_long, rollup_status_long
from pipeline.query.filters import Filters
from pipeline.query.rollup import rollup
from pipeline.store import open_store


def _pairs(n, links):
    child, parent = (np.array(x, dtype=np.int64) for x in zip(*links)) if links else (np.array([], int),) * 2
    node, anc = closure(n, child, parent)
    assert len(set(zip(node.tolist(), anc.tolist()))) == len(node)  # each pair once
    return {(int(a), int(b)) for a, b in zip(node, anc)}


def test_closure_follows_every_parent_of_a_polyhierarchy():
    # 0 top; 1, 2 under 0; 3 under 1 and 2 (a diamond); 4 under 3 and directly under 0
    got = _pairs(5, [(1, 0), (2, 0), (3, 1), (3, 2), (4, 3), (4, 0)])
    assert {a for n, a in got if n == 3} == {3, 1, 2, 0}
    assert {a for n, a in got if n == 4} == {4, 3, 1, 2, 0}
    assert len(got) == 1 + 2 + 2 + 4 + 5


def test_closure_stops_at_the_hop_bound_and_on_a_cycle():
    n = MAX_HOPS + 3  # a chain 0 <- 1 <- ... <- 32
    got = _pairs(n, [(i, i - 1) for i in range(1, n)])
    assert (n - 1, 2) in got and (n - 1, 1) not in got  # 30 hops reach node 2, not node 1 (BROADER*0..30)
    assert _pairs(2, [(0, 1), (1, 0)]) == {(0, 0), (0, 1), (1, 1), (1, 0)}


def test_window_counts_reference_concepts_in_depth_root_and_uids():
    concepts = pd.DataFrame({"key": [0, 1, 2, 3], "uid": ["r:a", "r:b", "r:c", "o:x"], "scheme": ["r", "r", "r", "o"],
                             "code": ["a", "b", "c", "x"], "label": list("ABCX"), "depth": [1, 2, 3, 1],
                             "parent": [None, 0, 1, None]})
    win = lambda **kw: Window(concepts, reference="r", **kw).counted.tolist()
    assert win(min_depth=1, max_depth=2) == [True, True, False, False]  # x is another scheme's
    assert win(min_depth=0, max_depth=9, root="r:b") == [False, True, True, False]
    assert win(min_depth=0, max_depth=9, uids=["r:c", "o:x"]) == [False, False, True, False]
    starts, flat = Window(concepts, reference="r", min_depth=1, max_depth=2).targets()
    assert sorted(flat[starts[2]:starts[3]].tolist()) == [0, 1]  # c adds to its ancestors b and a


DIAMOND = """@prefix skos: <http://www.w3.org/2004/02/skos/core#> . @prefix : <http://ex.org/> .
:T a skos:Concept ; skos:prefLabel "Top" ; skos:notation "T" .
:L a skos:Concept ; skos:prefLabel "Left" ; skos:notation "L" ; skos:broader :T .
:R a skos:Concept ; skos:prefLabel "Right" ; skos:notation "R" ; skos:broader :T .
:X a skos:Concept ; skos:prefLabel "Both" ; skos:notation "X" ; skos:broader :L , :R .
:U a skos:Concept ; skos:prefLabel "Other" ; skos:notation "U" .
"""


@pytest.fixture(scope="module")
def diamond(tmp_path_factory):
    """X under both L and R (polyhierarchy); item k1 filed under c1 (-> X) and c2 (-> L), k2 under c3 (-> R),
    k3 under c4 (-> U), k4 unplaced (c5 has no edge)."""
    tmp = tmp_path_factory.mktemp("diamond")
    (tmp / "ref.ttl").write_text(DIAMOND, encoding="utf-8")
    (tmp / "shop.csv").write_text("code,label,parent_code\nc1,One,\nc2,Two,\nc3,Three,\nc4,Four,\nc5,Five,\n")
    (tmp / "items.csv").write_text("item_key,title,category\nk1,Alpha,c1|c2\nk2,Beta,c3\nk3,Gamma,c4\n"
                                   "k4,Delta,c5\n")
    (tmp / "cw.csv").write_text("source_scheme,source_code,concept_code,match_type\nshop,c1,X,exactMatch\n"
                                "shop,c2,L,closeMatch\nshop,c3,R,exactMatch\nshop,c4,U,exactMatch\n")
    store = str(tmp / "d.lbug")
    run = lambda *a: main(["--store", store, *a])
    assert run("ingest", "reference", str(tmp / "ref.ttl"), "--scheme", "ref") == 0
    assert run("ingest", "source", "shop", str(tmp / "shop.csv")) == 0
    assert run("ingest", "items", "shop", str(tmp / "items.csv")) == 0
    assert run("import", "mappings", str(tmp / "cw.csv"), "--by", "tester") == 0
    return store


def _totals(df):
    return dict(zip(df.concept_code, df.total))


def test_an_item_under_two_branches_counts_once_at_the_top(diamond):
    with open_store(diamond, read_only=True) as s:
        assert _totals(rollup(s, depth=1)) == {"T": 2, "U": 1}  # k1 twice below T, counted once
        assert _totals(rollup(s, depth=3)) == {"T": 2, "U": 1, "L": 1, "R": 2, "X": 1}  # R: k2 and k1 (via X)
        assert _totals(rollup(s, concept="R", depth=1)) == {"R": 2, "X": 1}


def test_diamond_matches_the_engine_form(diamond):
    with open_store(diamond, read_only=True) as s:
        for lo, hi, root in ((1, 1, ""), (1, 3, ""), (2, 3, "ref:L"), (0, 10_000, "ref:T")):
            _same(s, "ref", lo, hi, root, [], Filters())


def _engine(s, reference, lo, hi, root, uids, f):
    df = s.frame("query_rollup", reference=reference, min_depth=lo, max_depth=hi, root=root, uids=uids,
                 **f.params())
    return df.astype({"items": int, "depth": int}).reset_index(drop=True)


def _same(s, reference, lo, hi, root, uids, f):
    want = _engine(s, reference, lo, hi, root, uids, f)
    got = rollup_long(s, reference=reference, min_depth=lo, max_depth=hi, root=root, uids=uids, params=f.params())
    pd.testing.assert_frame_equal(got, want, check_dtype=False)
    return len(want)


@pytest.fixture(scope="module")
def layer(tmp_path_factory):
    _, store, files = demo_layer(tmp_path_factory)
    return store, [s["key"] for s in files.sources]


def test_demo_layer_matches_the_engine_form_over_windows_roots_and_filters(layer):
    store, sources = layer
    with open_store(store, read_only=True) as s:
        top = rollup(s, depth=1)
        root = s.rows("concept_by_code", uid=f"market:{top.concept_code.iloc[0]}")[0]
        some = list(s.frame("query_concepts", reference="market")["uid"][::7])
        rows = 0
        for lo, hi, r, uids in ((1, 1, "", []), (1, 2, "", []), (1, 4, "", []), (0, 10_000, "", []),
                                (root["depth"], root["depth"] + 2, root["uid"], []), (0, 10_000, "", some)):
            for f in (Filters(), Filters(sources=[sources[1]]), Filters(statuses=("auto",)),
                      Filters(statuses=("accepted",))):
                rows += _same(s, "market", lo, hi, r, uids, f)
        assert rows > 1000  # the cases compare real counts, not empty frames



def _same_status(s, lo, hi, f):
    want = s.frame("query_rollup_status", reference="market", min_depth=lo, max_depth=hi, **f.params())
    want = want.astype({"items": int, "depth": int}).reset_index(drop=True)
    got = rollup_status_long(s, reference="market", min_depth=lo, max_depth=hi, params=f.params())
    pd.testing.assert_frame_equal(got, want, check_dtype=False)
    return want


def test_status_form_matches_the_engine_with_accepted_and_auto_mixed(layer, tmp_path):
    """A copy of the demo layer where one category gets an accepted edge (replacing its auto one) and is
    re-placed: items under both kinds of placement must count as accepted where they meet, as the engine says."""
    store, _ = layer
    copy = copy_store(store, tmp_path / "mixed")
    out = tmp_path / "cw.csv"
    assert main(["--store", copy, "export", "mappings", "--candidates", "1", str(out)]) == 0
    cw = pd.read_csv(out, dtype=str, keep_default_na=False)
    auto = cw[cw.status == "auto"].iloc[:40]
    pd.DataFrame({"source_scheme": auto.source_scheme, "source_code": auto.source_code,
                  "concept_code": auto.concept_code, "match_type": "exactMatch"}).to_csv(tmp_path / "acc.csv",
                                                                                     index=False)
    assert main(["--store", copy, "import", "mappings", str(tmp_path / "acc.csv"), "--by", "tester"]) == 0
    assert main(["--store", copy, "place"]) == 0
    with open_store(copy, read_only=True) as s:
        for lo, hi in ((1, 1), (2, 2), (1, 3)):
            for f in (Filters(), Filters(statuses=("accepted",))):
                _same_status(s, lo, hi, f)
        both = _same_status(s, 1, 1, Filters())
        assert set(both.placed_by) == {"accepted", "auto"}
        _same(s, "market", 1, 2, "", [], Filters(statuses=("accepted",)))
