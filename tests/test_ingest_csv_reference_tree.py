"""Reference hierarchies from tree CSVs."""

import pytest

from pipeline.errors import BadInput
from pipeline.ingest.reference_tree import read_reference_tree


def write(tmp_path, text: str, name="ref.csv"):
    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return p


def test_basic_tree(tmp_path):
    p = write(tmp_path, "code,label,parent_code\ng,Garden,\nt,Tools,g\n")
    got = [(c.code, c.pref_label, c.parent_codes, c.line) for c in read_reference_tree(p)]
    assert got == [("g", "Garden", [], 2), ("t", "Tools", ["g"], 3)]


def test_children_before_parents(tmp_path):
    p = write(tmp_path, "code,label,parent_code\np,Pruners,t\nt,Tools,g\ng,Garden,\n")
    assert [c.code for c in read_reference_tree(p)] == ["p", "t", "g"]


def test_whitespace_trimmed(tmp_path):
    p = write(tmp_path, "code,label,parent_code\n g , Garden ,\n t ,Tools, g \n")
    [g, t] = read_reference_tree(p)
    assert (g.code, g.pref_label, t.parent_codes) == ("g", "Garden", ["g"])


def test_empty_code_and_label_all_reported(tmp_path):
    p = write(tmp_path, "code,label,parent_code\n,Garden,\nt,,\nu, ,\n")
    with pytest.raises(BadInput) as e:
        read_reference_tree(p)
    got = [(pr.line, pr.field) for pr in e.value.problems]
    assert got == [(2, "code"), (3, "label"), (4, "label")]


def test_duplicate_code_reported_at_repeat_line(tmp_path):
    p = write(tmp_path, "code,label,parent_code\ng,Garden,\nt,Tools,g\ng,Yard,\n")
    with pytest.raises(BadInput) as e:
        read_reference_tree(p)
    [pr] = e.value.problems
    assert "duplicate code 'g'" in pr.message and pr.line == 4


def test_unknown_parent_and_row_problem_together(tmp_path):
    p = write(tmp_path, "code,label,parent_code\ng,,\nt,Tools,zz\n")
    with pytest.raises(BadInput) as e:
        read_reference_tree(p)
    msgs = [(pr.line, pr.message) for pr in e.value.problems]
    assert msgs[0] == (2, "empty label for code 'g'")
    assert msgs[1][0] == 3 and "unknown parent 'zz'" in msgs[1][1]


def test_cycle(tmp_path):
    p = write(tmp_path, "code,label,parent_code\na,A,b\nb,B,a\n")
    with pytest.raises(BadInput, match="cycle"):
        read_reference_tree(p)


def test_custom_columns_alt_labels_definition_iri(tmp_path):
    p = write(
        tmp_path,
        "id,name,up,alts,def,uri\ng,Garden,,Yard| Outdoor ||Yard,Outside things, http://example.org/g \n",
    )
    [c] = read_reference_tree(
        p,
        code_col="id",
        label_col="name",
        parent_col="up",
        alt_labels_col="alts",
        definition_col="def",
        iri_col="uri",
    )
    assert (c.alt_labels, c.definition, c.iri) == (
        ["Yard", "Outdoor"],
        "Outside things",
        "http://example.org/g",
    )


def test_missing_optional_column_named(tmp_path):
    p = write(tmp_path, "code,label,parent_code\ng,Garden,\n")
    with pytest.raises(BadInput, match="missing column.*'alts'"):
        read_reference_tree(p, alt_labels_col="alts")


def test_several_parents_with_separator(tmp_path):
    p = write(tmp_path, "code,label,parent_code\na,A,\nb,B,\nc,C,a|b\n")
    assert read_reference_tree(p, parent_separator="|")[2].parent_codes == ["a", "b"]


def test_header_only_is_bad(tmp_path):
    with pytest.raises(BadInput, match="no rows"):
        read_reference_tree(write(tmp_path, "code,label,parent_code\n"))


def test_malformed_row_reported_with_the_rest(tmp_path):
    p = write(tmp_path, "code,label,parent_code\na,A,,extra\nb,,\n")
    with pytest.raises(BadInput) as e:
        read_reference_tree(p)
    assert [pr.line for pr in e.value.problems] == [2, 3]
