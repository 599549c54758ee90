"""Shared CSV opening: encoding, header checks, line numbers, bad rows."""

import doctest

import pytest

from pipeline.errors import BadInput
from pipeline.ingest import items_reader, reference_tree, rejects, source_taxonomy, text_input
from pipeline.ingest.text_input import read_csv_rows, read_header, render_row


def write(tmp_path, data: bytes, name="t.csv"):
    p = tmp_path / name
    p.write_bytes(data)
    return p


def rows(p, **kw):
    kw.setdefault("required", [])
    return list(read_csv_rows(p, **kw))


def test_plain_utf8(tmp_path):
    p = write(tmp_path, "code,label\na,Ähre\n".encode())
    assert rows(p, required=["code"]) == [(2, {"code": "a", "label": "Ähre"})]


def test_bom_is_dropped_from_first_header_name(tmp_path):
    p = write(tmp_path, b"\xef\xbb\xbfcode,label\na,A\n")
    assert rows(p, required=["code"]) == [(2, {"code": "a", "label": "A"})]


def test_latin1_byte_names_line_offset_and_utf8(tmp_path):
    # b"\xe9" is "é" in Latin-1 and never valid alone in UTF-8 (RFC 3629)
    p = write(tmp_path, b"code,label\na,A\nb,Caf\xe9\n")
    with pytest.raises(BadInput) as e:
        rows(p)
    prob = e.value.problems[0]
    assert prob.line == 3 and prob.file == str(p)
    assert "byte offset 20" in prob.message and "expected UTF-8" in prob.message and "0xe9" in prob.message


def test_latin1_byte_offset_counts_bom(tmp_path):
    p = write(tmp_path, b"\xef\xbb\xbfcode\n\xff\n")
    with pytest.raises(BadInput, match="byte offset 8"):
        rows(p)


def test_empty_file(tmp_path):
    with pytest.raises(BadInput, match="empty file"):
        rows(write(tmp_path, b""))


def test_only_blank_lines_and_bom_is_empty(tmp_path):
    with pytest.raises(BadInput, match="empty file"):
        rows(write(tmp_path, b"\xef\xbb\xbf\n\r\n  \n"))


def test_header_only_gives_no_rows(tmp_path):
    assert rows(write(tmp_path, b"code,label\n"), required=["code"]) == []


def test_missing_columns_named_and_present_listed(tmp_path):
    p = write(tmp_path, b"id,name\n1,x\n")
    with pytest.raises(BadInput) as e:
        rows(p, required=["code", "label", "id"])
    msg = str(e.value)
    assert "'code', 'label'" in msg and "the header has: 'id', 'name'" in msg and ":1" in msg


def test_missing_column_case_hint(tmp_path):
    with pytest.raises(BadInput, match="'code' differs only in case from 'Code'"):
        rows(write(tmp_path, b"Code,label\n"), required=["code"])


def test_duplicated_header_names(tmp_path):
    with pytest.raises(BadInput, match="duplicated column name.*'label'"):
        rows(write(tmp_path, b"code,label,label\na,b,c\n"))


def test_duplicate_after_trim_is_duplicate(tmp_path):
    with pytest.raises(BadInput, match="duplicated"):
        rows(write(tmp_path, b"code, code \n"))


def test_empty_header_name(tmp_path):
    with pytest.raises(BadInput, match="header column 2 has no name"):
        rows(write(tmp_path, b"code,,label\n"))


def test_header_names_trimmed_inner_kept(tmp_path):
    p = write(tmp_path, b' code ,"size {cm}","say ""hi"""\na,3,4\n')
    assert rows(p) == [(2, {"code": "a", "size {cm}": "3", 'say "hi"': "4"})]


def test_mixed_line_endings_and_line_numbers(tmp_path):
    p = write(tmp_path, b"code,label\r\na,A\nb,B\rc,C\r\n")
    assert [(n, r["code"]) for n, r in rows(p)] == [(2, "a"), (3, "b"), (4, "c")]


def test_cr_only_file(tmp_path):
    p = write(tmp_path, b"code,label\ra,A\rb,B")
    assert [(n, r["label"]) for n, r in rows(p)] == [(2, "A"), (3, "B")]


def test_quoted_newline_keeps_start_line_and_next_line_number(tmp_path):
    p = write(tmp_path, b'code,label\na,"two\nlines"\nb,B\n')
    assert rows(p) == [(2, {"code": "a", "label": "two\nlines"}), (4, {"code": "b", "label": "B"})]


def test_blank_and_delimiter_only_lines_skipped(tmp_path):
    p = write(tmp_path, b"code,label\n\n,,\na,A\n")
    assert rows(p) == [(4, {"code": "a", "label": "A"})]


def test_nul_byte_is_binary(tmp_path):
    with pytest.raises(BadInput, match="NUL byte"):
        rows(write(tmp_path, b"code,label\na,A\x00\n"))


@pytest.mark.parametrize(
    "head, what",
    [
        (b"PAR1\x15\x04", "Parquet"),
        (b"\x1f\x8b\x08\x00", "gzip"),
        (b"\xff\xfec\x00", "UTF-16"),
        (b"PK\x03\x04", "zip"),
    ],
)
def test_binary_magic(tmp_path, head, what):
    # magic numbers from memory: Parquet "PAR1", gzip 1f 8b, zip "PK\3\4", UTF-16 LE BOM ff fe
    with pytest.raises(BadInput, match=what):
        rows(write(tmp_path, head + b"rest\n"))


def test_short_row_padded(tmp_path):
    assert rows(write(tmp_path, b"a,b,c\n1\n")) == [(2, {"a": "1", "b": "", "c": ""})]


def test_long_row_with_empty_extras_is_fine(tmp_path):
    assert rows(write(tmp_path, b"a,b\n1,2,,\n")) == [(2, {"a": "1", "b": "2"})]


def test_long_row_collected_and_raised_at_end(tmp_path):
    p = write(tmp_path, b"a,b\n1,2,3\n4,5\n6,7,8\n")
    got = []
    with pytest.raises(BadInput) as e:
        got.extend(read_csv_rows(p, required=[]))  # rows before the error stay in `got`
    assert got == [(3, {"a": "4", "b": "5"})]
    assert [p.line for p in e.value.problems] == [2, 4]
    assert "3 fields but the header has 2" in e.value.problems[0].message


def test_bad_row_callback_gets_line_reason_raw(tmp_path):
    p = write(tmp_path, b'a,b\n"x"y,2\n3,4\n')
    bad = []
    out = list(read_csv_rows(p, required=[], on_bad_row=lambda *a: bad.append(a)))
    assert out == [(3, {"a": "3", "b": "4"})]
    assert bad[0][0] == 2 and "malformed CSV" in bad[0][1] and bad[0][2] == '"x"y,2'


def test_unclosed_quote_reported_with_start_line(tmp_path):
    p = write(tmp_path, b'a,b\n1,2\n3,"open\n5,6\n')
    with pytest.raises(BadInput) as e:
        rows(p)
    assert e.value.problems[0].line == 3 and "never closed" in e.value.problems[0].message


def test_field_of_200k_chars_is_read(tmp_path):
    big = "x" * 200_000  # over the csv module's default limit of 131072 (Python docs, csv.field_size_limit)
    p = write(tmp_path, f"a,b\n1,{big}\n".encode())
    assert rows(p)[0][1]["b"] == big


def test_tab_delimiter(tmp_path):
    assert rows(write(tmp_path, b"a\tb\n1\t2,3\n"), delimiter="\t") == [(2, {"a": "1", "b": "2,3"})]


def test_fieldnames_means_no_header(tmp_path):
    p = write(tmp_path, b"Garden\nTools\n")
    assert rows(p, fieldnames=["tag"], required=["tag"]) == [(1, {"tag": "Garden"}), (2, {"tag": "Tools"})]


def test_render_row_quotes():
    assert render_row(["1", 'x"y', "a\nb"]) == '1,"x""y","a\nb"'


def test_cr_at_block_edge_is_not_split(tmp_path, monkeypatch):
    monkeypatch.setattr(text_input._Blocks, "BLOCK", 4)
    p = write(tmp_path, b"a,b\r\n1,22\r\n3,4\r5,6\n")
    assert [(n, r["a"]) for n, r in rows(p)] == [(2, "1"), (3, "3"), (4, "5")]


def test_small_blocks_keep_line_numbers_and_quoted_newlines(tmp_path, monkeypatch):
    monkeypatch.setattr(text_input._Blocks, "BLOCK", 3)
    p = write(tmp_path, b'code,label\na,"x\ny"\nbb,B\n')
    assert rows(p) == [(2, {"code": "a", "label": "x\ny"}), (4, {"code": "bb", "label": "B"})]


def test_latin1_byte_in_later_block(tmp_path, monkeypatch):
    monkeypatch.setattr(text_input._Blocks, "BLOCK", 5)
    p = write(tmp_path, b"code\r\na\rb\nc\xe9\n")
    with pytest.raises(BadInput) as e:
        rows(p)
    assert e.value.problems[0].line == 4 and "byte offset 11" in e.value.problems[0].message


def test_values_not_trimmed(tmp_path):
    assert rows(write(tmp_path, b"a\n  x  \n")) == [(2, {"a": "  x  "})]


def test_malformed_header(tmp_path):
    with pytest.raises(BadInput, match=r":1: malformed CSV header"):
        rows(write(tmp_path, b'"code"x,label\n'))


def test_read_header(tmp_path):
    assert read_header(write(tmp_path, b"\xef\xbb\xbf a ,b\n1,2\n")) == ["a", "b"]


@pytest.mark.parametrize("mod", [text_input, reference_tree, source_taxonomy, items_reader, rejects])
def test_docstring_examples_run(mod):
    result = doctest.testmod(mod)
    assert result.attempted > 0 and result.failed == 0
