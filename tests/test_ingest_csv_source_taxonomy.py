"""Source taxonomies: tree, paths and tags files."""

import pytest

from pipeline.errors import BadInput
from pipeline.ingest.source_taxonomy import path_code, read_source_taxonomy


def write(tmp_path, text: str, name="src.csv"):
    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return p


def cats(tax):
    return [(c.code, c.label, c.parent_code) for c in tax.categories]


# --- tree


def test_tree(tmp_path):
    p = write(tmp_path, "code,label,parent_code\nt,Tools,g\ng,Garden,\n")
    tax = read_source_taxonomy(p, fmt="tree")
    assert cats(tax) == [("t", "Tools", "g"), ("g", "Garden", None)]
    assert tax.hierarchy.depth == {"t": 2, "g": 1}


def test_tree_duplicate_code(tmp_path):
    p = write(tmp_path, "code,label,parent_code\ng,Garden,\ng,Garden again,\n")
    with pytest.raises(BadInput) as e:
        read_source_taxonomy(p, fmt="tree")
    assert e.value.problems[0].line == 3


def test_tree_custom_columns(tmp_path):
    p = write(tmp_path, "id;name;up\ng;Garden;\n", name="t.csv")
    tax = read_source_taxonomy(p, fmt="tree", code_col="id", label_col="name", parent_col="up", delimiter=";")
    assert cats(tax) == [("g", "Garden", None)]


def test_unknown_format(tmp_path):
    with pytest.raises(BadInput, match="unknown taxonomy format 'xml'"):
        read_source_taxonomy(write(tmp_path, "a\n"), fmt="xml")


# --- paths


def test_paths_make_intermediate_nodes(tmp_path):
    p = write(tmp_path, "path\nGarden > Tools > Pruners\n")
    assert cats(read_source_taxonomy(p, fmt="paths")) == [
        ("Garden", "Garden", None),
        ("Garden > Tools", "Tools", "Garden"),
        ("Garden > Tools > Pruners", "Pruners", "Garden > Tools"),
    ]


def test_paths_lines_are_first_mention(tmp_path):
    p = write(tmp_path, "path\nGarden > Tools\nGarden > Hoses\n")
    assert [(c.code, c.line) for c in read_source_taxonomy(p, fmt="paths").categories] == [
        ("Garden", 2),
        ("Garden > Tools", 2),
        ("Garden > Hoses", 3),
    ]


def test_paths_duplicates_and_spacing_are_one_node(tmp_path):
    p = write(tmp_path, "path\nGarden > Tools\n Garden>Tools \nGarden  >   Tools\n")
    assert [c.code for c in read_source_taxonomy(p, fmt="paths").categories] == ["Garden", "Garden > Tools"]


def test_paths_custom_separator_codes_use_standard_joiner(tmp_path):
    p = write(tmp_path, "path\nGarden / Tools\n")
    assert [c.code for c in read_source_taxonomy(p, fmt="paths", separator="/").categories] == [
        "Garden",
        "Garden > Tools",
    ]


def test_paths_empty_segment_problem_with_line(tmp_path):
    p = write(tmp_path, "path\nGarden > Tools\nGarden >  > Tools\n > Hoses\n")
    with pytest.raises(BadInput) as e:
        read_source_taxonomy(p, fmt="paths")
    assert [(pr.line, pr.field) for pr in e.value.problems] == [(3, "path"), (4, "path")]
    assert "empty segment (number 2)" in e.value.problems[0].message


def test_paths_empty_path_problem(tmp_path):
    p = write(tmp_path, "path,note\nGarden,x\n ,y\n")
    with pytest.raises(BadInput, match=r":3 \[path\]: empty path"):
        read_source_taxonomy(p, fmt="paths")


def test_paths_segment_with_joiner_rejected(tmp_path):
    p = write(tmp_path, "path\nA > B/C\n")
    with pytest.raises(BadInput, match="contains ' > '"):
        read_source_taxonomy(p, fmt="paths", separator="/")


def test_paths_custom_column(tmp_path):
    p = write(tmp_path, "id,full\n1,Garden > Tools\n")
    assert len(read_source_taxonomy(p, fmt="paths", path_col="full").categories) == 2


def test_paths_headerless_one_column(tmp_path):
    p = write(tmp_path, "Garden > Tools\nGarden\n")
    tax = read_source_taxonomy(p, fmt="paths")
    assert [(c.code, c.line) for c in tax.categories] == [("Garden", 1), ("Garden > Tools", 1)]


def test_paths_header_false_forces_headerless(tmp_path):
    p = write(tmp_path, "path\nGarden\n")
    assert [c.code for c in read_source_taxonomy(p, fmt="paths", header=False).categories] == [
        "path",
        "Garden",
    ]


def test_paths_explicit_leaf_codes(tmp_path):
    p = write(tmp_path, "path,code\nGarden > Tools,T1\nGarden,G1\nGarden > Hoses,\n")
    assert cats(read_source_taxonomy(p, fmt="paths")) == [
        ("G1", "Garden", None),
        ("T1", "Tools", "G1"),
        ("Garden > Hoses", "Hoses", "G1"),
    ]


def test_paths_explicit_code_line_is_that_row(tmp_path):
    p = write(tmp_path, "path,code\nGarden > Tools,\nGarden,G1\n")
    assert [(c.code, c.line) for c in read_source_taxonomy(p, fmt="paths").categories] == [
        ("G1", 3),
        ("Garden > Tools", 2),
    ]


def test_paths_conflicting_explicit_codes(tmp_path):
    p = write(tmp_path, "path,code\nGarden,G1\nGarden,G2\n")
    with pytest.raises(BadInput, match="has code 'G2' here but 'G1' on line 2"):
        read_source_taxonomy(p, fmt="paths")


def test_paths_explicit_code_used_twice_is_duplicate(tmp_path):
    p = write(tmp_path, "path,code\nGarden,X\nYard,X\n")
    with pytest.raises(BadInput) as e:
        read_source_taxonomy(p, fmt="paths")
    assert "duplicate code 'X'" in e.value.problems[0].message and e.value.problems[0].line == 3


def test_path_code_helper():
    assert path_code(" Garden >Tools ") == "Garden > Tools"
    with pytest.raises(ValueError):
        path_code("Garden > > Tools")


# --- tags


def test_tags_flat_with_header(tmp_path):
    p = write(tmp_path, "tag\nPatio\n Patio \npatio\n")
    tax = read_source_taxonomy(p, fmt="tags")
    assert [(c.code, c.label, c.parent_code, c.line) for c in tax.categories] == [
        ("Patio", "Patio", None, 2),
        ("patio", "patio", None, 4),
    ]


def test_tags_headerless(tmp_path):
    p = write(tmp_path, "Patio\nGrill\n")
    assert [c.code for c in read_source_taxonomy(p, fmt="tags").categories] == ["Patio", "Grill"]


def test_tags_column_among_others(tmp_path):
    p = write(tmp_path, "item,label_tag\n1,Patio\n2,Grill\n3,Patio\n")
    tax = read_source_taxonomy(p, fmt="tags", tag_col="label_tag")
    assert [c.code for c in tax.categories] == ["Patio", "Grill"]


def test_tags_missing_column_in_multi_column_file(tmp_path):
    with pytest.raises(BadInput, match="missing column.*'tag'.*'a', 'b'"):
        read_source_taxonomy(write(tmp_path, "a,b\n1,2\n"), fmt="tags")


def test_tags_empty_tag_problem(tmp_path):
    p = write(tmp_path, "tag,n\nPatio,1\n,2\n")
    with pytest.raises(BadInput, match=r":3 \[tag\]: empty tag"):
        read_source_taxonomy(p, fmt="tags")


def test_tags_latin1_file_rejected(tmp_path):
    p = tmp_path / "t.csv"
    p.write_bytes(b"tag\nCaf\xe9\n")
    with pytest.raises(BadInput, match="expected UTF-8"):
        read_source_taxonomy(p, fmt="tags")
