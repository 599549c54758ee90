"""Tests for pipeline.ingest.rdf_reference: SKOS / RDFS reference files in every RDF syntax rdflib reads."""

from __future__ import annotations

import csv
import time
from pathlib import Path

import pytest
import rdflib
from rdflib.namespace import DCTERMS, RDF, SKOS

from pipeline.errors import BadInput
from pipeline.ingest.rdf_reference import ReferenceFile, read_reference_rdf
from pipeline.records import ConceptRecord

EX = "http://example.org/garden/"
PREFIXES = f"""@prefix skos: <http://www.w3.org/2004/02/skos/core#> .
@prefix rdfs: <http://www.w3.org/2000/01/rdf-schema#> .
@prefix owl: <http://www.w3.org/2002/07/owl#> .
@prefix dcterms: <http://purl.org/dc/terms/> .
@prefix xsd: <http://www.w3.org/2001/XMLSchema#> .
@prefix : <{EX}> .
"""

# The tiny hierarchy every syntax must yield: tools > (spades, hoses); hoses is linked by skos:narrower only.
TINY = (
    PREFIXES
    + """
:scheme a skos:ConceptScheme ; dcterms:title "Tiny garden"@en ; owl:versionInfo "1.0" .
:tools a skos:Concept ; skos:inScheme :scheme ; skos:notation "T" ; skos:prefLabel "Tools"@en ;
    skos:altLabel "Implements"@en ; skos:definition "Things to work the soil with."@en ;
    skos:narrower :hoses .
:spades a skos:Concept ; skos:inScheme :scheme ; skos:notation " T1 " ; skos:prefLabel "Spades"@en ;
    skos:broader :tools .
:hoses a skos:Concept ; skos:inScheme :scheme ; skos:notation "T2" ; skos:prefLabel "Hoses"@en ;
    owl:deprecated true .
"""
)

TINY_RECORDS = [
    ConceptRecord(
        code="T",
        pref_label="Tools",
        parent_codes=[],
        iri=EX + "tools",
        alt_labels=["Implements"],
        definition="Things to work the soil with.",
    ),
    ConceptRecord(code="T1", pref_label="Spades", parent_codes=["T"], iri=EX + "spades"),
    ConceptRecord(code="T2", pref_label="Hoses", parent_codes=["T"], iri=EX + "hoses", deprecated=True),
]


def write(tmp_path: Path, text: str, name: str = "ref.ttl") -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def ttl(tmp_path: Path, body: str, name: str = "ref.ttl") -> Path:
    return write(tmp_path, PREFIXES + body, name)


def problems_of(path: Path, **kwargs) -> list[str]:
    with pytest.raises(BadInput) as info:
        read_reference_rdf(path, **kwargs)
    return [str(p) for p in info.value.problems]


def by_code(ref: ReferenceFile) -> dict[str, ConceptRecord]:
    return {c.code: c for c in ref.concepts}


# ---- formats -----------------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    "suffix, rdflib_format",
    [
        (".ttl", "turtle"),
        (".rdf", "xml"),
        (".owl", "xml"),
        (".xml", "pretty-xml"),
        (".nt", "nt"),
        (".jsonld", "json-ld"),
        (".json", "json-ld"),
        (".n3", "n3"),
        (".trig", "trig"),
        (".nq", "nquads"),
    ],
)
@pytest.mark.filterwarnings("ignore::DeprecationWarning")  # rdflib's TriG/N-Quads serializers
def test_every_syntax_gives_the_same_records(tmp_path, suffix, rdflib_format):
    graph = rdflib.Graph().parse(data=TINY, format="turtle")
    if rdflib_format in ("trig", "nquads"):  # put the triples in a named graph: they must still be read
        ds = rdflib.Dataset()
        named = ds.graph(rdflib.URIRef(EX + "g"))
        for t in graph:
            named.add(t)
        text = ds.serialize(format=rdflib_format)
    else:
        text = graph.serialize(format=rdflib_format)
    ref = read_reference_rdf(write(tmp_path, text, "ref" + suffix))
    assert ref.concepts == TINY_RECORDS
    assert (ref.scheme_iri, ref.title, ref.version) == (EX + "scheme", "Tiny garden", "1.0")


@pytest.mark.parametrize("name", ["turtle", "TTL", "text/turtle", "n3"])
def test_rdf_format_overrides_the_extension(tmp_path, name):
    ref = read_reference_rdf(write(tmp_path, TINY, "ref.txt"), rdf_format=name)
    assert [c.code for c in ref.concepts] == ["T", "T1", "T2"]


@pytest.mark.parametrize("name", ["xml", "application/rdf+xml"])
def test_rdf_format_xml_names(tmp_path, name):
    text = rdflib.Graph().parse(data=TINY, format="turtle").serialize(format="xml")
    assert read_reference_rdf(write(tmp_path, text, "ref.data"), rdf_format=name).concepts == TINY_RECORDS


def test_unknown_format_name_lists_the_accepted_ones(tmp_path):
    [msg] = problems_of(write(tmp_path, TINY), rdf_format="yaml")
    assert "unknown RDF format 'yaml'" in msg
    for accepted in ("turtle", "xml", "nt", "json-ld", "trig"):
        assert accepted in msg


def test_unknown_extension_asks_for_rdf_format(tmp_path):
    [msg] = problems_of(write(tmp_path, TINY, "ref.dat"))
    assert "'.dat'" in msg and "rdf_format" in msg


def test_relative_iris_resolve_against_the_file(tmp_path):
    path = write(
        tmp_path,
        "@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n"
        '<#a> a skos:Concept ; skos:prefLabel "A" .\n',
    )
    [c] = read_reference_rdf(path).concepts
    assert (c.code, c.iri) == ("a", path.resolve().as_uri() + "#a")


# ---- SKOS --------------------------------------------------------------------------------------------------


def test_code_is_notation_else_local_name(tmp_path):
    path = write(
        tmp_path,
        PREFIXES
        + """
<http://example.org/v#Beds> a skos:Concept ; skos:prefLabel "Beds" .
<http://example.org/c/01/> a skos:Concept ; skos:prefLabel "Chairs" .
<urn:x:77> a skos:Concept ; skos:prefLabel "Lamps" .
:rugs a skos:Concept ; skos:prefLabel "Rugs" ; skos:notation "  R-9\t" .
""",
    )
    got = {c.code: c.iri for c in read_reference_rdf(path).concepts}
    assert got == {
        "Beds": "http://example.org/v#Beds",
        "01": "http://example.org/c/01/",
        "77": "urn:x:77",
        "R-9": EX + "rugs",
    }


def test_typed_notation_is_used_as_a_plain_code(tmp_path):
    path = ttl(tmp_path, ':a a skos:Concept ; skos:prefLabel "A" ; skos:notation "0111"^^:code .')
    assert read_reference_rdf(path).concepts[0].code == "0111"


def test_narrower_only_file(tmp_path):
    path = ttl(
        tmp_path,
        """
:top skos:prefLabel "Top" ; skos:narrower :mid .
:mid skos:prefLabel "Mid" ; skos:narrower :leaf1, :leaf2 .
:leaf1 skos:prefLabel "Leaf one" . :leaf2 skos:prefLabel "Leaf two" .
""",
    )
    got = [(c.code, c.parent_codes) for c in read_reference_rdf(path).concepts]
    assert got == [("top", []), ("mid", ["top"]), ("leaf1", ["mid"]), ("leaf2", ["mid"])]


def test_broader_and_narrower_are_merged_without_duplicates(tmp_path):
    path = ttl(
        tmp_path,
        """
:a skos:prefLabel "A" ; skos:narrower :c . :b skos:prefLabel "B" .
:c skos:prefLabel "C" ; skos:broader :a, :b .
""",
    )
    assert by_code(read_reference_rdf(path))["c"].parent_codes == ["a", "b"]


def test_broader_transitive_is_ignored(tmp_path):
    path = ttl(
        tmp_path,
        """
:a a skos:Concept ; skos:prefLabel "A" . :b skos:prefLabel "B" ; skos:broader :a .
:c skos:prefLabel "C" ; skos:broader :b ; skos:broaderTransitive :a, :b .
""",
    )
    assert by_code(read_reference_rdf(path))["c"].parent_codes == ["b"]


def test_concept_found_through_in_scheme_and_top_concept(tmp_path):
    path = ttl(
        tmp_path,
        """
:s a skos:ConceptScheme ; skos:hasTopConcept :x .
:x skos:prefLabel "X" . :y skos:prefLabel "Y" ; skos:inScheme :s .
:z skos:prefLabel "Z" ; skos:topConceptOf :s .
""",
    )
    assert [c.code for c in read_reference_rdf(path).concepts] == ["x", "y", "z"]


def test_alt_and_hidden_labels_definition_and_deprecated(tmp_path):
    path = ttl(
        tmp_path,
        """
:a a skos:Concept ; skos:prefLabel "Watering cans"@en ; skos:altLabel "Sprinkling cans"@en, "Cans" ;
   skos:hiddenLabel "watering-can"@en ; skos:altLabel "Giesskannen"@de ; owl:deprecated "true"^^xsd:boolean ;
   skos:scopeNote "Hand-held only."@en ; rdfs:comment "A comment."@en .
:b a skos:Concept ; skos:prefLabel "Rakes" ; rdfs:comment "Toothed tools." ; owl:deprecated false .
""",
    )
    a, b = read_reference_rdf(path).concepts
    assert a.alt_labels == ["Cans", "Sprinkling cans", "watering-can"]
    assert (a.definition, a.deprecated) == ("Hand-held only.", True)
    assert (b.definition, b.deprecated, b.alt_labels) == ("Toothed tools.", False, [])


def test_skos_concept_with_only_rdfs_label_is_accepted(tmp_path):
    path = ttl(tmp_path, ':a a skos:Concept ; rdfs:label "Shears" .')
    assert read_reference_rdf(path).concepts[0].pref_label == "Shears"


def test_labels_are_trimmed(tmp_path):
    path = ttl(tmp_path, ':a a skos:Concept ; skos:prefLabel "  Pots \\n" ; skos:altLabel "   " .')
    [c] = read_reference_rdf(path).concepts
    assert (c.pref_label, c.alt_labels) == ("Pots", [])


# ---- language ----------------------------------------------------------------------------------------------

LANGS = """
:a a skos:Concept ; skos:prefLabel "Pelle"@fr, "Spade"@en, "Spaten"@de, "spade-plain" .
:b a skos:Concept ; skos:prefLabel "Rastrello"@it, "Rake"@en, "Rateau"@fr .
:c a skos:Concept ; skos:prefLabel "Slang"@sv, "Manguera"@es .
:d a skos:Concept ; skos:prefLabel "Colour"@en-GB, "Color"@en-US .
"""


@pytest.mark.parametrize(
    "lang, expected",
    [
        (
            "fr",
            {"a": "Pelle", "b": "Rateau", "c": "Manguera", "d": "Colour"},
        ),  # c: no fr/plain/en -> any, sorted
        (
            "nl",
            {"a": "spade-plain", "b": "Rake", "c": "Manguera", "d": "Colour"},
        ),  # plain, then en, then en-*
        (
            "en",
            {"a": "Spade", "b": "Rake", "c": "Manguera", "d": "Colour"},
        ),  # d: regional variants of en, sorted
        ("en-US", {"a": "Spade", "b": "Rake", "c": "Manguera", "d": "Color"}),
        (
            "SV",
            {"a": "spade-plain", "b": "Rake", "c": "Slang", "d": "Colour"},
        ),  # tags compare case-insensitively
    ],
)
def test_language_fallback(tmp_path, lang, expected):
    ref = read_reference_rdf(ttl(tmp_path, LANGS), lang=lang)
    assert {c.code: c.pref_label for c in ref.concepts} == expected


def test_alt_labels_keep_chosen_language_and_untagged(tmp_path):
    path = ttl(
        tmp_path,
        """
:a a skos:Concept ; skos:prefLabel "Tuyau"@fr, "Hose"@en ;
   skos:altLabel "Arrosage"@fr, "Garden hose"@en, "Schlauch"@de, "hose-x" ; skos:hiddenLabel "tuyeau"@fr .
""",
    )
    fr = read_reference_rdf(path, lang="fr").concepts[0]
    en = read_reference_rdf(path, lang="en").concepts[0]
    assert (fr.pref_label, fr.alt_labels) == ("Tuyau", ["Arrosage", "hose-x", "tuyeau"])
    assert (en.pref_label, en.alt_labels) == ("Hose", ["Garden hose", "hose-x"])


def test_alt_labels_follow_the_fallback_language(tmp_path):
    # Asked for Italian, none there: the English pref label is chosen, so English alt labels are kept too.
    path = ttl(
        tmp_path,
        ':a a skos:Concept ; skos:prefLabel "Hose"@en ; skos:altLabel "Garden hose"@en, "Tuyau"@fr .',
    )
    assert read_reference_rdf(path, lang="it").concepts[0].alt_labels == ["Garden hose"]


def test_several_pref_labels_in_one_language_become_alt_labels(tmp_path):
    path = ttl(
        tmp_path,
        ':a a skos:Concept ; skos:prefLabel "Trowels"@en, "Hand trowels"@en, "Kellen"@de ; '
        'skos:altLabel "Scoops"@en .',
    )
    [c] = read_reference_rdf(path).concepts
    assert (c.pref_label, c.alt_labels) == ("Hand trowels", ["Trowels", "Scoops"])


def test_definition_by_language_and_fallback_order(tmp_path):
    path = ttl(
        tmp_path,
        """
:a a skos:Concept ; skos:prefLabel "A" ; skos:definition "Def de"@de, "Def en"@en ; skos:scopeNote "Note"@en .
:b a skos:Concept ; skos:prefLabel "B" ; skos:scopeNote "Note fr"@fr ; rdfs:comment "Comment"@en .
""",
    )
    got = {c.code: c.definition for c in read_reference_rdf(path, lang="de").concepts}
    assert got == {"a": "Def de", "b": "Note fr"}


# ---- RDFS / OWL --------------------------------------------------------------------------------------------


def test_rdfs_subclass_hierarchy(tmp_path):
    path = ttl(
        tmp_path,
        """
:Plant a owl:Class ; rdfs:label "Plant"@en ; rdfs:comment "A living green thing."@en ;
    rdfs:subClassOf owl:Thing .
:Tree a rdfs:Class ; rdfs:label "Tree"@en ; rdfs:subClassOf :Plant ;
    rdfs:subClassOf [ a owl:Restriction ; owl:onProperty :height ; owl:someValuesFrom xsd:decimal ] .
:Oak rdfs:label "Oak"@en ; skos:definition "A tree with acorns."@en ; rdfs:subClassOf :Tree .
:Shrub a owl:Class ; skos:prefLabel "Shrub" ; rdfs:subClassOf :Plant .
[] a owl:Class ; owl:unionOf ( :Tree :Shrub ) .
""",
    )
    got = [(c.code, c.pref_label, c.parent_codes, c.definition) for c in read_reference_rdf(path).concepts]
    assert got == [
        ("Plant", "Plant", [], "A living green thing."),
        ("Shrub", "Shrub", ["Plant"], ""),
        ("Tree", "Tree", ["Plant"], ""),
        ("Oak", "Oak", ["Tree"], "A tree with acorns."),
    ]


def test_rdfs_label_is_preferred_over_pref_label_for_classes(tmp_path):
    path = ttl(tmp_path, ':C a owl:Class ; rdfs:label "From rdfs" ; skos:prefLabel "From skos" .')
    assert read_reference_rdf(path).concepts[0].pref_label == "From rdfs"


def test_owl_ontology_gives_title_and_version(tmp_path):
    path = ttl(
        tmp_path,
        """
<http://example.org/onto> a owl:Ontology ; rdfs:label "Plants ontology" ; owl:versionInfo "2.3" .
:Plant a owl:Class ; rdfs:label "Plant" .
""",
    )
    ref = read_reference_rdf(path)
    assert (ref.scheme_iri, ref.title, ref.version) == (None, "Plants ontology", "2.3")


def test_mixed_skos_and_rdfs(tmp_path):
    path = ttl(
        tmp_path,
        """
:Plant a owl:Class ; rdfs:label "Plant" .
:Tree a skos:Concept ; skos:prefLabel "Tree" ; skos:broader :Plant .
:Oak a owl:Class ; rdfs:label "Oak" ; rdfs:subClassOf :Tree .
:Beech skos:prefLabel "Beech" ; skos:broader :Tree ; rdfs:subClassOf :Plant .
""",
    )
    got = [(c.code, c.parent_codes) for c in read_reference_rdf(path).concepts]
    assert got == [("Plant", []), ("Tree", ["Plant"]), ("Beech", ["Plant", "Tree"]), ("Oak", ["Tree"])]


# ---- scheme ------------------------------------------------------------------------------------------------


def test_scheme_title_language_and_schema_version(tmp_path):
    path = ttl(
        tmp_path,
        """
:s a skos:ConceptScheme ; skos:prefLabel "Jardin"@fr, "Garden"@en ; <https://schema.org/version> "2024-1" .
:a skos:inScheme :s ; skos:prefLabel "A" .
""",
    )
    ref = read_reference_rdf(path, lang="fr")
    assert (ref.scheme_iri, ref.title, ref.version) == (EX + "s", "Jardin", "2024-1")


def test_scheme_has_version_and_dcterms_title_first(tmp_path):
    path = ttl(
        tmp_path,
        """
:s a skos:ConceptScheme ; rdfs:label "Label" ; dcterms:title "Title" ; dcterms:hasVersion "v7" .
:a a skos:Concept ; skos:prefLabel "A" .
""",
    )
    ref = read_reference_rdf(path)
    assert (ref.title, ref.version) == ("Title", "v7")


def test_two_schemes_keep_all_concepts_and_no_scheme_iri(tmp_path):
    path = ttl(
        tmp_path,
        """
:s1 a skos:ConceptScheme ; dcterms:title "One" . :s2 a skos:ConceptScheme ; dcterms:title "Two" .
:a skos:inScheme :s1 ; skos:prefLabel "A" . :b skos:inScheme :s2 ; skos:prefLabel "B" .
""",
    )
    ref = read_reference_rdf(path)
    assert ([c.code for c in ref.concepts], ref.scheme_iri, ref.title, ref.version) == (
        ["a", "b"],
        None,
        None,
        None,
    )


def test_no_scheme_at_all(tmp_path):
    ref = read_reference_rdf(ttl(tmp_path, ':a a skos:Concept ; skos:prefLabel "A" .'))
    assert (ref.scheme_iri, ref.title, ref.version) == (None, None, None)


# ---- root branch -------------------------------------------------------------------------------------------

BRANCHES = """
:all skos:prefLabel "All" .
:tools skos:prefLabel "Tools" ; skos:broader :all .
:seeds skos:prefLabel "Seeds" ; skos:broader :all .
:spades skos:prefLabel "Spades" ; skos:broader :tools .
:kits skos:prefLabel "Seed kits" ; skos:broader :seeds, :tools .
:mini skos:prefLabel "Mini kits" ; skos:broader :kits .
"""


def test_root_keeps_the_branch_and_drops_outside_parents(tmp_path):
    ref = read_reference_rdf(ttl(tmp_path, BRANCHES), root=EX + "tools")
    got = [(c.code, c.parent_codes) for c in ref.concepts]
    assert got == [("tools", []), ("kits", ["tools"]), ("spades", ["tools"]), ("mini", ["kits"])]


def test_root_not_in_file_names_iri_and_file(tmp_path):
    path = ttl(tmp_path, BRANCHES)
    [msg] = problems_of(path, root=EX + "pots")
    assert f"<{EX}pots>" in msg and str(path) in msg


def test_root_inside_a_cycle_is_still_a_cycle(tmp_path):
    path = ttl(tmp_path, BRANCHES + ":tools skos:broader :mini .")
    msgs = problems_of(path, root=EX + "tools")
    assert any("cycle" in m and f"<{EX}tools>" in m and f"<{EX}mini>" in m for m in msgs)


def test_problems_outside_the_branch_do_not_matter(tmp_path):
    path = ttl(tmp_path, BRANCHES + ":pots a skos:Concept ; skos:broader :all .")  # pots has no label
    assert len(read_reference_rdf(path, root=EX + "seeds").concepts) == 3
    assert any("no label" in m for m in problems_of(path))


# ---- rejections --------------------------------------------------------------------------------------------


def test_cycle_names_its_iris(tmp_path):
    path = ttl(
        tmp_path,
        """
:a skos:prefLabel "A" ; skos:broader :c . :b skos:prefLabel "B" ; skos:broader :a .
:c skos:prefLabel "C" ; skos:broader :b . :d skos:prefLabel "D" ; skos:broader :a .
""",
    )
    [msg] = problems_of(path)
    assert f"cycle in hierarchy (child -> parent): <{EX}a> -> <{EX}c> -> <{EX}b> -> <{EX}a>" in msg


def test_every_cycle_is_listed(tmp_path):
    path = ttl(
        tmp_path,
        """
:a skos:prefLabel "A" ; skos:broader :b . :b skos:prefLabel "B" ; skos:narrower :a .
:x skos:prefLabel "X" ; skos:broader :y . :y skos:prefLabel "Y" ; skos:broader :x .
""",
    )
    # a broader b and b narrower a state the same link, not a cycle; x <-> y is one.
    msgs = problems_of(path)
    assert len(msgs) == 1 and f"<{EX}x>" in msgs[0]
    path = ttl(
        tmp_path,
        ':a skos:prefLabel "A" ; skos:broader :b . :b skos:prefLabel "B" ; skos:broader :a .'
        ':x skos:prefLabel "X" ; skos:broader :y . :y skos:prefLabel "Y" ; skos:broader :x .',
    )
    assert len([m for m in problems_of(path) if "cycle" in m]) == 2


def test_self_loop(tmp_path):
    [msg] = problems_of(ttl(tmp_path, ':a skos:prefLabel "A" ; skos:broader :a .'))
    assert f"<{EX}a> is its own parent (skos:broader)" in msg


def test_subclass_self_loop(tmp_path):
    [msg] = problems_of(ttl(tmp_path, ':A a owl:Class ; rdfs:label "A" ; rdfs:subClassOf :A .'))
    assert "is its own parent (rdfs:subClassOf)" in msg


def test_duplicate_codes_name_both_iris(tmp_path):
    path = ttl(
        tmp_path,
        """
:a a skos:Concept ; skos:prefLabel "A" ; skos:notation "01" .
:b a skos:Concept ; skos:prefLabel "B" ; skos:notation "01 " .
<http://example.org/other/01> a skos:Concept ; skos:prefLabel "C" .
""",
    )
    [msg] = problems_of(path)
    assert f"duplicate code '01' used by <{EX}a>, <{EX}b>, <http://example.org/other/01>" in msg


def test_concept_without_label(tmp_path):
    [msg] = problems_of(ttl(tmp_path, ':a a skos:Concept ; skos:notation "1" ; skos:prefLabel "" .'))
    assert f"concept <{EX}a> has no label" in msg


def test_dangling_broader_parent_is_an_error(tmp_path):
    [msg] = problems_of(ttl(tmp_path, ':a a skos:Concept ; skos:prefLabel "A" ; skos:broader :ghost .'))
    assert f"<{EX}ghost> is referenced (skos:broader of <{EX}a>) but has no data" in msg


def test_dangling_narrower_child_and_subclass_parent(tmp_path):
    path = ttl(
        tmp_path,
        """
:a a skos:Concept ; skos:prefLabel "A" ; skos:narrower :ghost1 .
:C a owl:Class ; rdfs:label "C" ; rdfs:subClassOf :Ghost2 .
""",
    )
    msgs = problems_of(path)
    assert any(f"<{EX}ghost1> is referenced (skos:narrower of <{EX}a>)" in m for m in msgs)
    assert any(f"<{EX}Ghost2> is referenced (rdfs:subClassOf of <{EX}C>)" in m for m in msgs)


def test_child_with_only_a_broader_link_lacks_a_label_not_data(tmp_path):
    [msg] = problems_of(ttl(tmp_path, ':a a skos:Concept ; skos:prefLabel "A" . :b skos:broader :a .'))
    assert f"concept <{EX}b> has no label" in msg


def test_broader_to_a_literal_or_blank_node_is_reported(tmp_path):
    path = ttl(
        tmp_path, ':a a skos:Concept ; skos:prefLabel "A" ; skos:broader "top", [ skos:prefLabel "B" ] .'
    )
    msgs = problems_of(path)
    assert len(msgs) == 2 and all("is not between two concept IRIs" in m for m in msgs)
    assert any('"top"' in m for m in msgs)


def test_file_without_concepts(tmp_path):
    [msg] = problems_of(ttl(tmp_path, ':s a skos:ConceptScheme ; dcterms:title "Empty" .'))
    assert "no concepts found" in msg


def test_blank_node_concept_is_reported(tmp_path):
    [msg] = problems_of(
        ttl(tmp_path, '[] a skos:Concept ; skos:prefLabel "Anon" . :a a skos:Concept ; skos:prefLabel "A" .')
    )
    assert "without an IRI" in msg


def test_all_problems_of_a_file_are_listed_together(tmp_path):
    path = ttl(
        tmp_path,
        """
:a a skos:Concept ; skos:prefLabel "A" ; skos:broader :ghost .
:b a skos:Concept .
:c a skos:Concept ; skos:prefLabel "C" ; skos:notation "a" .
:d skos:prefLabel "D" ; skos:broader :d .
""",
    )
    msgs = problems_of(path)
    assert len(msgs) == 4
    assert all(str(path) in m for m in msgs)
    joined = "\n".join(msgs)
    for fragment in (
        f"<{EX}ghost>",
        f"<{EX}b> has no label",
        "duplicate code 'a'",
        f"<{EX}d> is its own parent",
    ):
        assert fragment in joined


# ---- syntax and reading errors -----------------------------------------------------------------------------


def test_turtle_syntax_error_reports_line_and_column(tmp_path):
    path = write(tmp_path, PREFIXES + ':a a skos:Concept ;\n  skos:prefLabel "A" "B" .\n')
    [msg] = problems_of(path)
    assert msg.startswith(f"{path}:8:22:")  # PREFIXES is 6 lines; the stray "B" is at line 8, column 22
    assert "syntax error" in msg


def test_ntriples_syntax_error_reports_line(tmp_path):
    good = f'<{EX}a> <{SKOS.prefLabel}> "A" .\n'
    path = write(tmp_path, good * 3 + f"<{EX}b> <{SKOS.prefLabel}> oops .\n" + good, "ref.nt")
    [msg] = problems_of(path)
    assert msg.startswith(f"{path}:4:")


def test_nquads_syntax_error_reports_line(tmp_path):
    good = f'<{EX}a> <{SKOS.prefLabel}> "A" <{EX}g> .\n'
    path = write(
        tmp_path, good + "\n# comment\n" + good + f'<{EX}b> <{SKOS.prefLabel}> "B" oops .\n', "ref.nq"
    )
    [msg] = problems_of(path)
    assert msg.startswith(f"{path}:5:")


def test_rdfxml_syntax_error_reports_line_and_column(tmp_path):
    path = write(
        tmp_path,
        '<?xml version="1.0"?>\n<rdf:RDF xmlns:rdf="http://www.w3.org/1999/02/22-rdf-syntax-ns#">\n'
        '<rdf:Description rdf:about="http://example.org/a">\n</rdf:RDF>\n',
        "ref.rdf",
    )
    [msg] = problems_of(path)
    assert msg.startswith(f"{path}:4:2: RDF/XML syntax error: mismatched tag")


def test_jsonld_syntax_error_reports_line(tmp_path):
    [msg] = problems_of(write(tmp_path, '{\n  "@id": "http://example.org/a",\n  "x": \n}\n', "ref.jsonld"))
    assert ":4:1: JSON syntax error" in msg


def test_missing_file(tmp_path):
    path = tmp_path / "nope.ttl"
    [msg] = problems_of(path)
    assert msg.startswith(f"{path}: cannot read file")


def test_directory_is_unreadable(tmp_path):
    (tmp_path / "dir.ttl").mkdir()
    assert "cannot read file" in problems_of(tmp_path / "dir.ttl")[0]


def test_non_utf8_turtle(tmp_path):
    path = tmp_path / "ref.ttl"
    path.write_bytes((PREFIXES + ':a a skos:Concept ;\n skos:prefLabel "Caf\xe9" .\n').encode("latin-1"))
    [msg] = problems_of(path)
    assert msg == f"{path}:8:21: not valid UTF-8 (byte 0xe9)"


def test_rdfxml_in_latin1_with_declaration_is_fine(tmp_path):
    path = tmp_path / "ref.rdf"
    path.write_bytes(
        (
            '<?xml version="1.0" encoding="ISO-8859-1"?>\n'
            '<rdf:RDF xmlns:rdf="http://www.w3.org/1999/02/22-rdf-syntax-ns#" '
            'xmlns:skos="http://www.w3.org/2004/02/skos/core#">\n'
            '<skos:Concept rdf:about="http://example.org/cafe"><skos:prefLabel>Caf\xe9</skos:prefLabel>'
            "</skos:Concept></rdf:RDF>\n"
        ).encode("latin-1")
    )
    assert read_reference_rdf(path).concepts[0].pref_label == "Caf\xe9"


def test_utf8_bom_is_accepted(tmp_path):
    path = tmp_path / "ref.ttl"
    path.write_bytes(b"\xef\xbb\xbf" + TINY.encode("utf-8"))
    assert read_reference_rdf(path).concepts == TINY_RECORDS


# ---- order -------------------------------------------------------------------------------------------------


def test_order_is_top_down_then_by_code(tmp_path):
    path = ttl(
        tmp_path,
        """
:z skos:prefLabel "Z" . :b skos:prefLabel "B" .
:y skos:prefLabel "Y" ; skos:broader :z . :a skos:prefLabel "A" ; skos:broader :b .
:m skos:prefLabel "M" ; skos:broader :a, :z .
""",
    )
    # depth is the shortest distance to a top node (m: 2, through z), and m waits for both its parents
    assert [c.code for c in read_reference_rdf(path).concepts] == ["b", "z", "a", "m", "y"]


# ---- CSV trees converted to SKOS (as the oracle tests do) --------------------------------------------------


def csv_tree_to_skos(csv_path: Path, ttl_path: Path, base: str) -> None:
    """Turn a `code,label,parent_code,level` CSV into a SKOS Turtle file with one scheme."""
    g = rdflib.Graph()
    scheme = rdflib.URIRef(base + "scheme")
    g.add((scheme, RDF.type, SKOS.ConceptScheme))
    g.add((scheme, DCTERMS.title, rdflib.Literal("Converted tree", lang="en")))
    with csv_path.open(newline="", encoding="utf-8") as f:
        for row in csv.DictReader(f):
            node = rdflib.URIRef(base + "c" + row["code"].replace(".", "_"))
            g.add((node, RDF.type, SKOS.Concept))
            g.add((node, SKOS.inScheme, scheme))
            g.add((node, SKOS.notation, rdflib.Literal(row["code"])))
            g.add((node, SKOS.prefLabel, rdflib.Literal(row["label"], lang="en")))
            if row["parent_code"]:
                g.add((node, SKOS.broader, rdflib.URIRef(base + "c" + row["parent_code"].replace(".", "_"))))
    g.serialize(ttl_path, format="turtle")


def csv_tree(path: Path) -> list[dict[str, str]]:
    with path.open(newline="", encoding="utf-8") as f:
        return list(csv.DictReader(f))


def test_thirty_line_csv_tree_round_trips_through_skos(tmp_path):
    rows = ["code,label,parent_code,level"]
    for i in range(1, 4):
        rows.append(f'{i},"Section {i}, tools and seeds",,1')
        for j in range(1, 4):
            rows.append(f"{i}.{j},Group {i}.{j},{i},2")
            for k in range(1, 3):
                rows.append(f"{i}.{j}.{k},Class {i}.{j}.{k},{i}.{j},3")
    assert len(rows) == 31  # header + 30 nodes
    (tmp_path / "tree.csv").write_text("\n".join(rows) + "\n", encoding="utf-8")
    csv_tree_to_skos(tmp_path / "tree.csv", tmp_path / "tree.ttl", "http://example.org/tree/")
    ref = read_reference_rdf(tmp_path / "tree.ttl")
    expected = {
        r["code"]: (r["label"], [r["parent_code"]] if r["parent_code"] else [])
        for r in csv_tree(tmp_path / "tree.csv")
    }
    assert {c.code: (c.pref_label, c.parent_codes) for c in ref.concepts} == expected
    assert [c.code for c in ref.concepts[:4]] == ["1", "2", "3", "1.1"]
    assert (ref.scheme_iri, ref.title) == ("http://example.org/tree/scheme", "Converted tree")


ORACLE = Path(__file__).resolve().parents[2] / "shared" / "oracles" / "nace2-to-isic4"


@pytest.mark.skipif(
    not (ORACLE / "reference_tree.csv").exists(), reason="oracle folder ../shared/oracles absent"
)
def test_isic_rev4_reference_tree_reads_back(tmp_path):
    # ISIC Rev.4 structure, publisher UNSD (as given in shared/oracles/nace2-to-isic4/SOURCE.md):
    # 766 nodes, depth 4, 21/88/238/419 nodes per level.
    rows = csv_tree(ORACLE / "reference_tree.csv")
    csv_tree_to_skos(ORACLE / "reference_tree.csv", tmp_path / "isic4.ttl", "http://example.org/isic4/")
    ref = read_reference_rdf(tmp_path / "isic4.ttl")
    assert len(ref.concepts) == 766
    got = {c.code: (c.pref_label, c.parent_codes) for c in ref.concepts}
    assert got == {
        r["code"]: (r["label"].strip(), [r["parent_code"]] if r["parent_code"] else []) for r in rows
    }
    level = {r["code"]: int(r["level"]) for r in rows}
    counts = [sum(1 for c in ref.concepts if level[c.code] == d) for d in (1, 2, 3, 4)]
    assert counts == [21, 88, 238, 419]
    levels_in_order = [level[c.code] for c in ref.concepts]
    assert levels_in_order == sorted(levels_in_order)  # top-down: every level-1 node before any level-2 node


# ---- speed -------------------------------------------------------------------------------------------------


@pytest.mark.slow  # about 4-5 s on 2 cores, most of it in rdflib's Turtle parser
def test_ten_thousand_concepts_read_in_a_few_seconds(tmp_path):
    lines = [PREFIXES, ':s a skos:ConceptScheme ; dcterms:title "Big" .']
    for i in range(10_000):
        parent = f" ; skos:broader :c{(i - 1) // 10}" if i else ""
        lines.append(
            f':c{i} a skos:Concept ; skos:inScheme :s ; skos:notation "{i}" ; skos:prefLabel "Concept {i}"@en'
            f' ; skos:altLabel "Alt {i}"@en ; skos:definition "Definition of concept {i}."@en{parent} .'
        )
    path = write(tmp_path, "\n".join(lines))
    start = time.perf_counter()
    ref = read_reference_rdf(path)
    elapsed = time.perf_counter() - start
    assert len(ref.concepts) == 10_000
    assert by_code(ref)["9999"].parent_codes == ["999"]
    assert elapsed < 20, f"10k concepts took {elapsed:.1f} s"
