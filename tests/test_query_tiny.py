"""The analyst queries on a hand-made layer (tests/demo_layer.py: TINY), with answers counted by hand."""

import pytest
from demo_layer import tiny_layer

from pipeline.api import Layer
from pipeline.errors import BadInput, NotFound
from pipeline.query.filters import Filters, parse_attribute_filters


@pytest.fixture(scope="module")
def layer(tmp_path_factory):
    return Layer(tiny_layer(tmp_path_factory.mktemp("tiny")))


def _counts(df, sources=("shop", "mart")):
    return {(r["concept_code"], s): int(r[s]) for r in df.to_dict("records") for s in sources if r.get(s)}


def test_rollup_two_levels_counts_descendants_per_source(layer):
    df = layer.rollup(depth=2)
    assert _counts(df) == {("A", "shop"): 3, ("A", "mart"): 1, ("B", "shop"): 1, ("B", "mart"): 1,
                           ("A1", "shop"): 2, ("A1", "mart"): 1, ("B1", "shop"): 1}
    assert dict(zip(df.concept_code, df.total)) == {"A": 4, "B": 2, "A1": 3, "B1": 1}
    assert list(df.concept_code) == ["A", "B", "A1", "B1"]  # by depth, then code


def test_rollup_filters_by_source_attribute_and_status(layer):
    assert _counts(layer.rollup(sources=["mart"])) == {("A", "mart"): 1, ("B", "mart"): 1}
    assert _counts(layer.rollup(where={"colour": "green"})) == {("A", "shop"): 2, ("A", "mart"): 1}
    assert layer.rollup(statuses=("auto",)).empty  # every edge here is an accepted (imported) one
    assert _counts(layer.rollup(concept="A", depth=1, sources=["shop"]), ("shop",)) == {("A", "shop"): 3,
                                                                                      ("A1", "shop"): 2}


def test_unknown_source_concept_or_status_is_refused(layer):
    with pytest.raises(NotFound):
        layer.rollup(sources=["nope"])
    with pytest.raises(NotFound):
        layer.drilldown("ZZ")
    with pytest.raises(BadInput):
        layer.rollup(statuses=("proposed",))


def test_drilldown_names_category_and_edge(layer):
    df = layer.drilldown("A")
    got = sorted(zip(df.source, df.item_key, df.category_code, df.concept_code, df.status, df.decided_by))
    assert got == [("mart", "k1", "garden-tools", "A1", "accepted", "tester"),
                   ("shop", "k1", "s2", "A1", "accepted", "tester"),
                   ("shop", "k2", "s2", "A1", "accepted", "tester"),
                   ("shop", "k4", "s1", "A", "accepted", "tester")]
    assert set(df.method) == {"imported"}
    direct = layer.drilldown("A", descendants=False, attributes=True)
    assert list(direct.item_key) == ["k4"] and list(direct.attr_colour) == ["green"]


def test_overlap_tells_same_concept_from_same_top(layer):
    df = layer.overlap().set_index("item_key")
    assert sorted(df.index) == ["k1", "k3"]
    assert bool(df.at["k1", "same_concept"]) and bool(df.at["k1", "same_top"])
    assert not bool(df.at["k3", "same_concept"]) and bool(df.at["k3", "same_top"])  # shop B1, mart B
    assert df.at["k3", "concepts"] == "mart=B | shop=B1"
    assert layer.overlap(sources=["shop"]).empty  # one source alone overlaps with nothing


def test_coverage_counts_each_item_once_by_status(layer):
    df = layer.coverage().set_index("source")
    assert df.loc["shop", ["items", "accepted", "auto", "unmapped"]].tolist() == [4, 4, 0, 0]
    assert df.loc["mart", ["items", "accepted", "unmapped"]].tolist() == [3, 2, 1]  # m9 sits in unmapped 'misc'
    assert df.loc["(total)", "placed_share"] == pytest.approx(6 / 7, abs=1e-4)


def test_subtree_shows_path_children_and_empty_concepts(layer):
    df = layer.subtree("A", depth=1)
    assert list(zip(df.relation, df.code, df.total)) == [("self", "A", 4), ("descendant", "A1", 3),
                                                         ("descendant", "A2", 0)]
    up = layer.subtree("A1", depth=1)
    assert list(zip(up.relation, up.code, up.level)) == [("ancestor", "A", -1), ("self", "A1", 0)]
    assert dict(zip(up.code, up.categories)) == {"A": 1, "A1": 2}  # s1 -> A; s2 and garden-tools -> A1


def test_attribute_filter_parsing():
    assert parse_attribute_filters(["colour=green", " size = L "]) == {"colour": "green", "size": "L"}
    with pytest.raises(BadInput):
        parse_attribute_filters(["colour"])
    # exact value match, quotes included: 12 does not match 12.5
    assert Filters(attributes={"price": "12"}).attribute_patterns() == ['"price": "12"']
