"""Malformed RDF references through the CLI: one message naming the file (line and column where the parser gives
them, else the field), exit code 2, the layer unchanged; or accepted as README documents (several schemes,
several languages with --lang)."""

from __future__ import annotations

import pytest
from graph_snapshot import snapshot_of
from malformed_cases import TTL, build_template, run_on_copy

PREFIXES = """@prefix skos: <http://www.w3.org/2004/02/skos/core#> .
@prefix rdfs: <http://www.w3.org/2000/01/rdf-schema#> .
@prefix ex: <http://example.org/r/> .
"""
REF = ["ingest", "reference", "--scheme", "ref"]


@pytest.fixture(scope="module")
def template(tmp_path_factory):
    return build_template(tmp_path_factory.mktemp("malformed-rdf"))


REFUSED = [
    ("turtle-syntax", "r.ttl", PREFIXES + 'ex:G a skos:Concept ; skos:prefLabel "Garden" .\nex:T a skos:Concept ;; ]\n',
     ["r.ttl:5", "syntax"]),
    ("turtle-truncated", "r.ttl", TTL[: len(TTL) - 30], ["r.ttl:4", "truncated"]),
    ("turtle-unterminated-string", "r.ttl", PREFIXES + 'ex:G a skos:Concept ; skos:prefLabel "Garden .\n',
     ["r.ttl:4"]),
    ("turtle-binary", "r.ttl", b"\x00\x01\x02\x03\xff\xfe", ["r.ttl"]),
    ("turtle-latin-1", "r.ttl", (PREFIXES + 'ex:G a skos:Concept ; skos:prefLabel "Caf\xe9" .\n').encode("latin-1"),
     ["r.ttl:4", "UTF-8"]),
    ("rdfxml-syntax", "r.rdf", ('<?xml version="1.0"?>\n<rdf:RDF xmlns:rdf="http://www.w3.org/1999/02/22-rdf-syntax-ns#">'
                               "\n<rdf:Description>\n</rdf:RDF>\n"), ["r.rdf:4"]),
    ("ntriples-syntax", "r.nt", "<http://x/a> <http://x/b> <http://x/c> .\n<http://x/a> <http://x/b> .\n", ["r.nt:2"]),
    ("jsonld-syntax", "r.jsonld", '{"@context": {}, "@id": "http://x/a",,}\n', ["r.jsonld:1", "JSON"]),
    ("cycle", "r.ttl", PREFIXES + 'ex:A a skos:Concept ; skos:prefLabel "A" ; skos:broader ex:B .\n'
     'ex:B a skos:Concept ; skos:prefLabel "B" ; skos:broader ex:A .\n', ["r.ttl", "cycle"]),
    ("self-loop", "r.ttl", PREFIXES + 'ex:A a skos:Concept ; skos:prefLabel "A" ; skos:broader ex:A .\n',
     ["r.ttl", "own parent"]),
    ("subclass-self-loop", "r.ttl", PREFIXES + 'ex:A a rdfs:Class ; rdfs:label "A" ; rdfs:subClassOf ex:A .\n',
     ["r.ttl", "own parent"]),
    ("dangling-broader", "r.ttl", PREFIXES + 'ex:A a skos:Concept ; skos:prefLabel "A" ; skos:broader ex:Gone .\n',
     ["r.ttl", "Gone"]),
    ("no-label", "r.ttl", PREFIXES + "ex:A a skos:Concept .\n", ["r.ttl", "[skos:prefLabel]", "no label"]),
    ("duplicate-notation", "r.ttl", PREFIXES + 'ex:A a skos:Concept ; skos:prefLabel "A" ; skos:notation "1" .\n'
     'ex:B a skos:Concept ; skos:prefLabel "B" ; skos:notation "1" .\n', ["r.ttl", "[skos:notation]", "'1'"]),
    ("no-concepts", "r.ttl", PREFIXES + "ex:A ex:says ex:B .\n", ["r.ttl"]),
    ("empty-file", "r.ttl", "", ["r.ttl"]),
]


@pytest.mark.parametrize("name, content, words", [c[1:] for c in REFUSED], ids=[c[0] for c in REFUSED])
def test_a_malformed_reference_is_refused_and_the_store_is_unchanged(template, tmp_path, name, content, words):
    r = run_on_copy(template, tmp_path, REF, name, content)
    assert r.code == 2, r.err
    assert r.err.startswith("graftwork: ") and "Traceback" not in r.err
    for word in words:
        assert word in r.err, r.err
    assert not r.changed


def test_an_unknown_root_is_refused(template, tmp_path):
    r = run_on_copy(template, tmp_path, [*REF, "--root", "http://example.org/r/NOPE"], "r.ttl", TTL)
    assert (r.code, r.changed) == (2, False) and "NOPE" in r.err and "[root]" in r.err


def _concepts(store):
    return {row[0]: row[4] for row in snapshot_of(store, vectors=False)["concepts"]}


def test_several_schemes_in_one_file_keep_every_concept(template, tmp_path):
    ttl = TTL + ("@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n@prefix ex: <http://example.org/r/> .\n"
                 "ex:S1 a skos:ConceptScheme . ex:S2 a skos:ConceptScheme .\n"
                 "ex:G skos:inScheme ex:S1 . ex:T skos:inScheme ex:S2 .\n")
    r = run_on_copy(template, tmp_path, ["ingest", "reference", "--scheme", "two"], "r.ttl", ttl)
    assert r.code == 0, r.err
    assert {u: v for u, v in _concepts(r.store).items() if u.startswith("two:")} == {
        "two:G": "Garden", "two:T": "Garden tools"}


@pytest.mark.parametrize("lang, expected", [("de", "Garten"), ("fr", "Garden"), ("en", "Garden")])
def test_several_languages_pick_lang_with_fallback(template, tmp_path, lang, expected):
    ttl = TTL.replace('"Garden"@en', '"Garden"@en, "Garten"@de')
    r = run_on_copy(template, tmp_path, ["ingest", "reference", "--scheme", "langs", "--lang", lang], "r.ttl", ttl)
    assert r.code == 0, r.err
    assert _concepts(r.store)["langs:G"] == expected
