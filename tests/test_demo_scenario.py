"""The invented demo scenario: determinism, sizes, formats the readers expect, ground truth consistency."""

from __future__ import annotations

import csv
import json
import random
import re

import pytest
import rdflib
from rdflib.namespace import DCTERMS, OWL, RDF, SKOS

from pipeline.demo import ScenarioFiles, generate_scenario, scenario_present
from pipeline.demo.items import generate_items, size_fits
from pipeline.demo.reference import build_reference
from pipeline.demo.scenario import main
from pipeline.demo.suppliers import build_suppliers
from pipeline.demo.wording import tag_norm
from pipeline.errors import BadInput
from pipeline.ingest.hierarchy import check_hierarchy

SMALL = 2000


def read_csv(path):
    with open(path, newline="", encoding="utf-8") as f:
        return list(csv.reader(f))


@pytest.fixture(scope="module")
def full(tmp_path_factory) -> ScenarioFiles:
    """The default scenario at its default size (about 1.5 s here)."""
    return generate_scenario(tmp_path_factory.mktemp("demo"))


@pytest.fixture(scope="module")
def graph(full) -> rdflib.Graph:
    g = rdflib.Graph()
    g.parse(full.reference, format="turtle")
    return g


def source(full: ScenarioFiles, key: str) -> dict:
    return next(s for s in full.sources if s["key"] == key)


def taxonomy_codes(src: dict) -> set[str]:
    rows = read_csv(src["taxonomy"])[1:]
    return {r[0] for r in rows}


# ---- determinism and the manifest -------------------------------------------------------------------------


def test_same_seed_gives_same_bytes(tmp_path):
    a = generate_scenario(tmp_path / "a", seed=11, n_items=SMALL)
    b = generate_scenario(tmp_path / "b", seed=11, n_items=SMALL)
    names = sorted(p.name for p in a.directory.iterdir())
    assert names == sorted(p.name for p in b.directory.iterdir())
    for name in names:
        assert (a.directory / name).read_bytes() == (b.directory / name).read_bytes(), name


def test_other_seed_gives_other_items(tmp_path):
    a = generate_scenario(tmp_path / "a", seed=1, n_items=SMALL)
    b = generate_scenario(tmp_path / "b", seed=2, n_items=SMALL)
    assert a.sources[0]["items"].read_bytes() != b.sources[0]["items"].read_bytes()
    assert a.reference.read_bytes() == b.reference.read_bytes()  # the reference is hand-made, seed-free


def test_manifest_names_seed_sizes_and_files(full):
    m = json.loads((full.directory / "manifest.json").read_text())
    assert m["seed"] == 7 and m["n_items"] == 30_000
    assert m["reference"]["file"] == "reference.ttl" and m["answer_key"]["file"] == "answer_key.csv"
    assert [s["key"] for s in m["sources"]] == ["fennelgrist", "wrenmantle", "cobbleweir"]
    assert [s["format"] for s in m["sources"]] == ["tree", "tags", "paths"]
    assert sum(s["item_rows"] for s in m["sources"]) == 30_000
    for s in m["sources"]:
        assert (full.directory / s["taxonomy"]).is_file() and (full.directory / s["items"]).is_file()


def test_scenario_present_true_after_generation(full):
    assert scenario_present(full.directory)


def test_scenario_present_can_require_seed_and_size(full):
    assert scenario_present(full.directory, seed=7, n_items=30_000)
    assert not scenario_present(full.directory, seed=8)
    assert not scenario_present(full.directory, n_items=5_000)


def test_scenario_present_false_for_empty_dir(tmp_path):
    assert not scenario_present(tmp_path)
    assert not scenario_present(tmp_path / "missing")


def test_scenario_present_false_when_a_file_is_gone(tmp_path):
    files = generate_scenario(tmp_path, n_items=SMALL)
    files.sources[1]["items"].unlink()
    assert not scenario_present(tmp_path)


def test_scenario_present_false_for_broken_manifest(tmp_path):
    generate_scenario(tmp_path, n_items=SMALL)
    (tmp_path / "manifest.json").write_text("{not json")
    assert not scenario_present(tmp_path)


def test_generation_leaves_other_files_alone(tmp_path):
    (tmp_path / "README.md").write_text("keep me")
    generate_scenario(tmp_path, n_items=SMALL)
    assert (tmp_path / "README.md").read_text() == "keep me"
    assert not list(tmp_path.glob("*.tmp"))


@pytest.mark.parametrize("bad", [0, 99, -5, 2.5, "300", True])
def test_bad_item_count_is_rejected_before_writing(tmp_path, bad):
    with pytest.raises(BadInput) as err:
        generate_scenario(tmp_path / "out", n_items=bad)
    assert err.value.problems[0].field == "n_items"
    assert not (tmp_path / "out").exists()


def test_module_command_writes_a_scenario(tmp_path, capsys):
    assert main([str(tmp_path / "d"), "--seed", "3", "--items", "500"]) == 0
    assert scenario_present(tmp_path / "d")
    assert "answer_key.csv" in capsys.readouterr().out


# ---- the reference in SKOS Turtle -------------------------------------------------------------------------


def concepts(graph):
    return set(graph.subjects(RDF.type, SKOS.Concept))


def test_reference_size_within_range(graph):
    assert 300 <= len(concepts(graph)) <= 400


def test_every_concept_has_one_notation_and_an_english_pref_label(graph):
    for c in concepts(graph):
        notations = list(graph.objects(c, SKOS.notation))
        assert len(notations) == 1, c
        assert re.fullmatch(r"HG(\.\d+)+", str(notations[0])), notations
        labels = [lab for lab in graph.objects(c, SKOS.prefLabel) if lab.language == "en"]
        assert len(labels) == 1, c
        assert len(list(graph.objects(c, SKOS.definition))) == 1, c


def test_one_scheme_with_title_and_version(graph):
    schemes = list(graph.subjects(RDF.type, SKOS.ConceptScheme))
    assert len(schemes) == 1
    assert graph.value(schemes[0], DCTERMS.title) is not None
    assert graph.value(schemes[0], OWL.versionInfo) is not None


def test_reference_depth_is_four_to_five(graph):
    depths = [str(graph.value(c, SKOS.notation)).count(".") for c in concepts(graph)]
    assert 4 <= max(depths) <= 5
    assert depths.count(4) + depths.count(5) >= 50  # not one stray deep branch


def test_broader_links_follow_notation(graph):
    for c in concepts(graph):
        code = str(graph.value(c, SKOS.notation))
        parent = graph.value(c, SKOS.broader)
        if code.count(".") == 1:
            assert parent is None
        else:
            assert str(graph.value(parent, SKOS.notation)) == code.rsplit(".", 1)[0]


def test_many_concepts_have_alt_labels(graph):
    with_alt = [c for c in concepts(graph) if list(graph.objects(c, SKOS.altLabel))]
    assert len(with_alt) >= 150


def test_labels_repeat_at_two_levels(graph):
    # a child title containing its parent's ("Lighting" > "Outdoor lighting"), and one title used twice
    pairs = []
    for c in concepts(graph):
        parent = graph.value(c, SKOS.broader)
        if parent is not None:
            pairs.append((str(graph.value(parent, SKOS.prefLabel)), str(graph.value(c, SKOS.prefLabel))))
    assert ("Lighting", "Outdoor lighting") in pairs
    labels = [str(graph.value(c, SKOS.prefLabel)) for c in concepts(graph)]
    assert labels.count("Accessories") >= 2


def test_a_deprecated_concept_is_marked(graph):
    deprecated = [c for c in concepts(graph) if graph.value(c, OWL.deprecated) is not None]
    assert len(deprecated) >= 1
    assert all(graph.value(c, OWL.deprecated).toPython() is True for c in deprecated)


# ---- supplier taxonomies ----------------------------------------------------------------------------------


@pytest.mark.parametrize("seed", [7, 1, 2, 123])
def test_supplier_sizes_within_range(seed):
    for s in build_suppliers(build_reference(), random.Random(seed)):
        assert 80 <= len(s.categories) <= 250, (seed, s.key, len(s.categories))


def test_tree_csv_is_a_valid_hierarchy_deeper_than_the_reference(full):
    rows = read_csv(source(full, "fennelgrist")["taxonomy"])
    assert rows[0] == ["code", "label", "parent_code"]
    nodes = [(code, label, [parent] if parent else []) for code, label, parent in rows[1:]]
    h = check_hierarchy(nodes, file="fennelgrist_taxonomy.csv")
    assert max(h.depth.values()) >= 6  # reference goes to 5


def test_paths_csv_lists_every_prefix_and_stays_mid_depth(full):
    src = source(full, "cobbleweir")
    rows = read_csv(src["taxonomy"])
    assert rows[0] == ["path"] and src["separator"] == " > "
    paths = {r[0] for r in rows[1:]}
    assert len(paths) == len(rows) - 1
    for p in paths:
        parts = p.split(" > ")
        assert all(part and part == part.strip() for part in parts)
        assert " > ".join(parts[:-1]) in paths or len(parts) == 1
    assert max(p.count(" > ") + 1 for p in paths) == 3


def test_tags_are_flat_unique_and_messy(full):
    rows = read_csv(source(full, "wrenmantle")["taxonomy"])
    assert rows[0] == ["tag"]
    tags = [r[0] for r in rows[1:]]
    assert len({tag_norm(t) for t in tags}) == len(tags)
    assert all(t == t.strip() and "|" not in t and " > " not in t for t in tags)
    assert any(t.islower() for t in tags) and any(t.isupper() for t in tags)
    assert any("&" in t for t in tags) and any(" and " in t.lower() for t in tags)
    assert any("  " in t for t in tags)  # an inner double space


def test_supplier_wording_differs_from_reference(full, graph):
    ref_labels = {str(o).lower() for o in graph.objects(None, SKOS.prefLabel)}
    for key in ("fennelgrist", "cobbleweir"):
        src = source(full, key)
        rows = read_csv(src["taxonomy"])[1:]
        labels = [r[1] if key == "fennelgrist" else r[0].split(" > ")[-1] for r in rows]
        differ = [lab for lab in labels if lab.lower() not in ref_labels]
        assert len(differ) >= 0.3 * len(labels), key


def test_us_supplier_uses_us_spelling(full):
    text = source(full, "cobbleweir")["items"].read_text()
    assert "Gray" in text and "Grey" not in text
    assert "Aluminum" in text and "Aluminium" not in text


# ---- items ------------------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    "key,extra",
    [
        ("fennelgrist", ["brand_line", "price"]),
        ("wrenmantle", ["price"]),
        ("cobbleweir", ["brand_line", "price"]),
    ],
)
def test_items_header(full, key, extra):
    src = source(full, key)
    assert read_csv(src["items"])[0] == ["item_key", "title", "category"] + extra
    assert src["columns"]["attributes"] == extra


def test_every_item_category_exists_in_its_taxonomy(full):
    for src in full.sources:
        codes = taxonomy_codes(src)
        for row in read_csv(src["items"])[1:]:
            for cat in row[2].split("|"):
                assert cat in codes, (src["key"], cat)


def test_item_total_and_some_rows_with_two_categories(full):
    total = two = 0
    for src in full.sources:
        rows = read_csv(src["items"])[1:]
        total += len(rows)
        two += sum(1 for r in rows if "|" in r[2])
    assert total == 30_000
    assert 0.005 * total <= two <= 0.05 * total


def test_about_ten_percent_of_product_keys_are_shared(full):
    seen: dict[str, list[str]] = {}
    for src in full.sources:
        for row in read_csv(src["items"])[1:]:
            seen.setdefault(row[0], []).append(row[1])
    shared = {k: v for k, v in seen.items() if len(v) == 2}
    assert all(len(v) <= 2 for v in seen.values())
    assert 0.08 <= len(shared) / len(seen) <= 0.12
    reworded = sum(1 for a, b in shared.values() if a != b)
    assert reworded >= 0.8 * len(shared)


def test_item_keys_unique_within_a_supplier(full):
    for src in full.sources:
        keys = [r[0] for r in read_csv(src["items"])[1:]]
        assert len(keys) == len(set(keys))


def test_prices_are_positive_money(full):
    for row in read_csv(source(full, "wrenmantle")["items"])[1:200]:
        assert re.fullmatch(r"\d+\.\d\d", row[3]) and float(row[3]) > 0


def test_items_are_filed_under_their_true_concept():
    ref = build_reference()
    rng = random.Random(5)
    suppliers = build_suppliers(ref, rng)
    rows = generate_items(ref, suppliers, rng, 3000)
    for s in suppliers:
        for row in rows[s.key]:
            truth = s.categories[row.categories[0]].truth
            assert any(t == row.leaf or t in ref.ancestors(row.leaf) for t in truth), (s.key, row)


def test_sizes_fit_their_nouns():
    assert not size_fits("polycarbonate greenhouse", "seater")
    assert not size_fits("wild bird seed mix", "cm")
    assert size_fits("garden dining set", "seater")
    assert size_fits("suet balls", "kg") and not size_fits("suet feeder", "kg")


# ---- answer key -------------------------------------------------------------------------------------------


def test_answer_key_codes_exist_on_both_sides(full, graph):
    rows = read_csv(full.answer_key)
    assert rows[0] == ["source_key", "source_code", "reference_code"]
    notations = {str(o) for o in graph.objects(None, SKOS.notation)}
    codes = {s["key"]: taxonomy_codes(s) for s in full.sources}
    for key, code, ref_code in rows[1:]:
        assert code in codes[key], (key, code)
        assert ref_code in notations, ref_code


def test_answer_key_has_a_few_dozen_categories_per_supplier(full):
    rows = read_csv(full.answer_key)[1:]
    for s in full.sources:
        cats = {code for key, code, _ in rows if key == s["key"]}
        assert 24 <= len(cats) <= 60, (s["key"], len(cats))


def test_answer_key_includes_categories_mapping_to_two_concepts(full):
    rows = read_csv(full.answer_key)[1:]
    per_cat: dict[tuple[str, str], int] = {}
    for key, code, _ in rows:
        per_cat[(key, code)] = per_cat.get((key, code), 0) + 1
    assert any(n >= 2 for n in per_cat.values())


def test_answer_key_never_points_at_a_deprecated_concept(full, graph):
    deprecated = {str(graph.value(c, SKOS.notation)) for c in graph.subjects(OWL.deprecated, None)}
    assert deprecated
    assert not {r[2] for r in read_csv(full.answer_key)[1:]} & deprecated


# ---- contract with the ingest readers ---------------------------------------------------------------------


def test_ingest_readers_accept_every_file_with_no_rejects(full):
    from pipeline.ingest.items_reader import read_items
    from pipeline.ingest.rdf_reference import read_reference_rdf
    from pipeline.ingest.source_taxonomy import path_code, read_source_taxonomy

    ref = read_reference_rdf(full.reference)
    assert len(ref.concepts) == 347 and ref.version == "2024.2"
    answer = read_csv(full.answer_key)[1:]
    for s in full.sources:
        kw = {"separator": s["separator"]} if s["separator"] else {}
        codes = {c.code for c in read_source_taxonomy(s["taxonomy"], fmt=s["format"], **kw).categories}
        assert codes == taxonomy_codes(s)  # the reader's codes are our raw codes, so the answer key matches
        assert all(code in codes for key, code, _ in answer if key == s["key"])
        norm = (lambda x, sep=s["separator"]: path_code(x, sep)) if s["format"] == "paths" else None
        batches = list(
            read_items(
                s["items"],
                known_categories=codes.__contains__,
                attribute_cols=s["columns"]["attributes"],
                category_separator=s["category_separator"],
                category_normaliser=norm,
            )
        )
        assert sum(len(b.items) for b in batches) == s["item_rows"]
        assert not [r for b in batches for r in b.rejects]
