"""SSSOM TSV and SKOS Turtle exports, and importing a crosswalk back as decisions."""

import pandas as pd
import pytest
import yaml
from demo_layer import copy_store, demo_layer, tiny_layer
from rdflib import Graph, URIRef
from rdflib.namespace import SKOS

from pipeline.errors import BadInput
from pipeline.exchange.exporters import export_mappings
from pipeline.exchange.importer import import_mappings
from pipeline.exchange.iris import BUILTIN_PREFIXES
from pipeline.exchange.sssom import read_sssom
from pipeline.store import open_store

# The SKOS mapping properties (SKOS Reference, W3C 2009, section 10) and the SEMAPV justification terms we use
# (SSSOM "mapping-justifications" guide).
SKOS_MAPPING = {SKOS.exactMatch, SKOS.closeMatch, SKOS.broadMatch, SKOS.narrowMatch, SKOS.relatedMatch}
SEMAPV = {"semapv:LexicalMatching", "semapv:SemanticSimilarityThresholdMatching", "semapv:ManualMappingCuration"}


def _read(path):
    return pd.read_csv(path, sep="\t", comment="#", dtype=str, keep_default_na=False)


def _meta(path):
    return yaml.safe_load("\n".join(ln[1:] for ln in path.read_text().splitlines() if ln.startswith("#")))


def test_sssom_export_has_metadata_block_and_standard_columns(tmp_path_factory):
    tmp, store, _ = demo_layer(tmp_path_factory)
    out = tmp / "m.sssom.tsv"
    with open_store(store, read_only=True) as s:
        export_mappings(s, out, fmt="sssom")
    meta, rows = _meta(out), _read(out)
    assert {"curie_map", "mapping_set_id", "license"} <= set(meta)  # required set slots (SSSOM spec)
    assert not set(meta["curie_map"]) & set(BUILTIN_PREFIXES)  # canonical form: built-ins left out
    assert meta["curie_map"]["market"] == "https://example.org/tumblethorn/reference/"
    assert meta["curie_map"]["fennelgrist"] == "urn:graftwork:fennelgrist:"
    assert list(rows.columns[:3]) == ["subject_id", "subject_label", "predicate_id"]
    assert set(rows.predicate_id) <= {"skos:" + p.split("#")[1] for p in map(str, SKOS_MAPPING)}
    assert set(rows.mapping_justification) <= SEMAPV
    assert rows.confidence.astype(float).between(0, 1).all()
    used = {v.split(":", 1)[0] for v in [*rows.subject_id, *rows.object_id]}
    assert used == set(meta["curie_map"])  # every prefix declared, none unused
    lexical = rows[rows.mapping_justification == "semapv:LexicalMatching"]
    assert (lexical.predicate_id == "skos:exactMatch").all()


def test_turtle_export_parses_and_every_mapping_triple_is_skos(tmp_path_factory):
    tmp, store, _ = demo_layer(tmp_path_factory)
    out = tmp / "m.ttl"
    with open_store(store, read_only=True) as s:
        n = export_mappings(s, out, fmt="turtle", candidates=3)["rows"]
        edges = export_mappings(s, tmp / "m3.csv", candidates=3)["rows"]
    g = Graph().parse(out, format="turtle")
    predicates = {p for _, p, _ in g} - {SKOS.prefLabel}
    assert predicates <= SKOS_MAPPING
    assert len([t for t in g if t[1] in SKOS_MAPPING]) == n == edges  # nothing rejected yet, so all edges
    a_concept = URIRef("https://example.org/tumblethorn/reference/HG.1")
    assert (None, None, a_concept) in g or (a_concept, None, None) in g


def test_sssom_export_reimports_to_the_same_edges(tmp_path_factory, tmp_path):
    _, store, _ = demo_layer(tmp_path_factory)
    store = copy_store(store, tmp_path)
    first, second = tmp_path / "a.sssom.tsv", tmp_path / "b.sssom.tsv"
    key = ["subject_id", "predicate_id", "object_id"]
    with open_store(store) as s:
        export_mappings(s, first, fmt="sssom", statuses=["accepted", "auto"])
        placed_before = s.frame("count_placed", reference="market").iloc[0].tolist()
        summary = import_mappings(s, first, by="tester", run_id="t1")
        export_mappings(s, second, fmt="sssom", statuses=["accepted"])
        placed_after = s.frame("count_placed", reference="market").iloc[0].tolist()
        again = import_mappings(s, second, by="tester", run_id="t2")
    a, b = _read(first), _read(second)
    assert summary["accepted"] == len(a) > 100
    assert set(map(tuple, a[key].values)) == set(map(tuple, b[key].values))
    assert set(b.mapping_justification) == {"semapv:ManualMappingCuration"}
    assert set(b.author_label) == {"tester"}
    assert placed_after == placed_before  # the same live edges place the same items
    assert again["unchanged"] == len(b) and again["accepted"] == 0


def test_rejected_rows_round_trip_as_negated_mappings(tmp_path):
    store = tiny_layer(tmp_path)
    (tmp_path / "no.csv").write_text("source_scheme,source_code,concept_code,status,note\n"
                                     "shop,s3,B1,rejected,wrong shelf\n")
    with open_store(store) as s:
        res = import_mappings(s, tmp_path / "no.csv", by="rowan")
        export_mappings(s, tmp_path / "x.sssom.tsv", fmt="sssom")
        rows = _read(tmp_path / "x.sssom.tsv")
        assert res["rejected"] == 1
        neg = rows[rows.get("predicate_modifier", "") == "Not"]
        assert list(zip(neg.subject_id, neg.object_id, neg.comment)) == [("shop:s3", "ref:B1", "wrong shelf")]
        # the rejected edge no longer places k3 (shop); mart's k3 is still under B
        assert s.frame("count_placed", reference="ref").iloc[0].tolist() == [5, 5]
        again = import_mappings(s, tmp_path / "x.sssom.tsv")
    assert again["unchanged"] == 5 and again["rejected"] == 0


def test_tree_reference_ids_are_minted_and_prefix_overrides_apply(tmp_path):
    store = tiny_layer(tmp_path)
    out = tmp_path / "p.sssom.tsv"
    with open_store(store, read_only=True) as s:
        export_mappings(s, out, fmt="sssom", prefixes={"shop": "https://data.example.org/shop/"})
    meta, rows = _meta(out), _read(out)
    assert meta["curie_map"] == {"mart": "urn:graftwork:mart:", "ref": "urn:graftwork:ref:",
                                 "shop": "https://data.example.org/shop/"}
    assert "shop:s2" in set(rows.subject_id) and "mart:garden-tools" in set(rows.subject_id)


def test_import_reports_every_bad_row_and_writes_nothing(tmp_path):
    store = tiny_layer(tmp_path, with_crosswalk=False)
    bad = tmp_path / "bad.sssom.tsv"
    bad.write_text(
        "#curie_map:\n#  shop: 'urn:graftwork:shop:'\n#  ref: 'urn:graftwork:ref:'\n#mapping_set_id: urn:x\n"
        "#license: https://w3id.org/sssom/license/unspecified\n"
        "subject_id\tpredicate_id\tobject_id\tmapping_justification\tconfidence\n"
        "shop:s1\tskos:closeMatch\tref:A\tsemapv:ManualMappingCuration\t0.9\n"
        "shop:nope\tskos:closeMatch\tref:A\tsemapv:ManualMappingCuration\t0.9\n"
        "shop:s2\towl:equivalentClass\tref:A1\tsemapv:ManualMappingCuration\t0.9\n"
        "shop:s3\tskos:closeMatch\tref:ZZ\tsemapv:ManualMappingCuration\t1.5\n"
        "other:s3\tskos:closeMatch\tref:B1\tsemapv:ManualMappingCuration\t\n"
        "shop:s1\tskos:exactMatch\tref:A\tsemapv:ManualMappingCuration\t\n")
    with open_store(store) as s:
        with pytest.raises(BadInput) as err:
            import_mappings(s, bad)
        assert "MAPS_TO" not in set(s.frame("count_edges")["kind"])
        assert s.frame("count_placed", reference="ref").iloc[0].tolist() == [0, 0]
    by_line = {(p.line, p.field) for p in err.value.problems}
    assert by_line == {(8, "subject_id"), (9, "predicate_id"), (10, "object_id"), (10, "confidence"),
                       (11, "subject_id"), (12, "subject_id")}
    text = str(err.value)
    assert "bad.sssom.tsv:8" in text and "'nope'" in text and "already given on line 7" in text


def test_csv_import_dry_run_checks_without_writing(tmp_path):
    store = tiny_layer(tmp_path, with_crosswalk=False)
    with open_store(store) as s:
        res = import_mappings(s, tmp_path / "crosswalk.csv", dry_run=True, by="x")
        assert res["accepted"] == 5 and res["dry_run"]
        assert s.frame("count_placed", reference="ref").iloc[0].tolist() == [0, 0]
        res = import_mappings(s, tmp_path / "crosswalk.csv", by="x", note="from the old sheet")
        edges = s.frame("mappings_export", max_rank=5, sources=[])
    assert res["items_placed"] == 6
    assert set(edges.status) == {"accepted"} and set(edges.method) == {"imported"}
    assert set(edges.note) == {"from the old sheet"} and set(edges.decided_by) == {"x"}
    assert edges.decided_at.str.match(r"\d{4}-\d\d-\d\dT").all()


def test_read_sssom_gives_file_line_numbers_and_propagates_set_slots(tmp_path):
    p = tmp_path / "s.sssom.tsv"
    p.write_text("# curie_map:\n#   a: http://a/\n# mapping_justification: semapv:ManualMappingCuration\n"
                 "subject_id\tpredicate_id\tobject_id\na:1\tskos:exactMatch\ta:2\n\na:3\tskos:closeMatch\ta:4\n")
    t = read_sssom(p)
    assert t.curie_map == {"a": "http://a/"}
    assert [line for line, _ in t.rows] == [5, 7]
    assert t.rows[0][1]["mapping_justification"] == "semapv:ManualMappingCuration"


def test_an_import_leaves_its_decisions_in_the_edge_history(tmp_path):
    store = tiny_layer(tmp_path)
    (tmp_path / "no.csv").write_text("source_scheme,source_code,concept_code,status,note\n"
                                     "shop,s3,B1,rejected,wrong shelf\n")
    with open_store(store) as s:
        res = import_mappings(s, tmp_path / "no.csv", by="rowan")
        hist = s.frame("review_events_category", category="shop:s3")
        again = import_mappings(s, tmp_path / "no.csv", by="rowan")
        after = s.frame("review_events_category", category="shop:s3")
    assert res["history"] >= 1
    mine = hist[hist["actor"] == "rowan"]
    assert list(zip(mine["action"], mine["concept"], mine["note"])) == [("rejected", "ref:B1", "wrong shelf")]
    assert again["history"] == 0 and len(after) == len(hist)  # an unchanged re-import is not news
