"""Malformed CSV input through the CLI (taxonomies and items): each case gets one clear message naming the file
and the line or field, exit code 2, and leaves the layer exactly as it was (canonical export compared before and
after) -- or is accepted with the normalisation the README and `pipeline/ingest/text_input.py` document."""

from __future__ import annotations

import logging

import pyarrow as pa
import pyarrow.parquet as pq
import pytest
from graph_snapshot import snapshot_of
from malformed_cases import build_template, run_on_copy

HEADER = "code,label,parent_code\n"


@pytest.fixture(scope="module")
def template(tmp_path_factory):
    return build_template(tmp_path_factory.mktemp("malformed-csv"))


# (id, args, file name, content, words the message must hold)
REFUSED_SOURCE = [
    ("truncated-mid-quote", ["ingest", "source", "shop"], "t.csv", HEADER + '1,Outdoor,\n2,"Prun',
     ["t.csv:3", "never closed"]),
    ("truncated-header", ["ingest", "source", "shop"], "t.csv", "code,label,par", ["t.csv:1", "parent_code"]),
    ("binary-nul", ["ingest", "source", "shop"], "t.csv", b"code,label\x00\x01\x02\xff", ["t.csv:1", "NUL"]),
    ("binary-png", ["ingest", "source", "shop"], "t.csv", b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR", ["t.csv:1", "0x89"]),
    ("gzip", ["ingest", "source", "shop"], "t.csv", b"\x1f\x8b\x08\x00rest", ["t.csv:1", "gzip"]),
    ("xlsx-zip", ["ingest", "source", "shop"], "t.csv", b"PK\x03\x04rest", ["t.csv:1", "zip"]),
    ("latin-1", ["ingest", "source", "shop"], "t.csv", (HEADER + "1,Outdoor,\n2,Caf\xe9,1\n").encode("latin-1"),
     ["t.csv:3", "UTF-8", "0xe9"]),
    ("windows-1252", ["ingest", "source", "shop"], "t.csv", (HEADER + "1,Gr\u00fcn \u2013 gut,\n").encode("cp1252"),
     ["t.csv:2", "UTF-8"]),
    ("utf-16-bom", ["ingest", "source", "shop"], "t.csv", (HEADER + "1,A,\n").encode("utf-16"),
     ["t.csv:1", "UTF-16"]),
    ("missing-label-column", ["ingest", "source", "shop"], "t.csv", "code,name,parent_code\n1,A,\n",
     ["t.csv:1", "'label'"]),
    ("header-case", ["ingest", "source", "shop"], "t.csv", "Code,Label,Parent_Code\n1,A,\n", ["differs only in case"]),
    ("duplicated-header", ["ingest", "source", "shop"], "t.csv", "code,label,label,parent_code\n1,A,B,\n",
     ["t.csv:1", "duplicated column", "'label'"]),
    ("empty-header-name", ["ingest", "source", "shop"], "t.csv", "code,,label,parent_code\n1,x,A,\n",
     ["t.csv:1:2", "no name"]),
    ("empty-file", ["ingest", "source", "shop"], "t.csv", "", ["t.csv", "empty file"]),
    ("only-blank-lines", ["ingest", "source", "shop"], "t.csv", "\n\n,,\n", ["t.csv", "empty file"]),
    ("empty-code", ["ingest", "source", "shop"], "t.csv", HEADER + "1,A,\n,B,1\n", ["t.csv:3", "[code]", "empty code"]),
    ("empty-label", ["ingest", "source", "shop"], "t.csv", HEADER + "1,,\n", ["t.csv:2", "[label]"]),
    ("duplicate-code-other-label", ["ingest", "source", "shop"], "t.csv", HEADER + "1,A,\n1,B,\n",
     ["t.csv:3", "[code]", "duplicate"]),
    ("dangling-parent", ["ingest", "source", "shop"], "t.csv", HEADER + "1,A,\n2,B,9\n", ["t.csv:3", "'9'"]),
    ("cycle", ["ingest", "source", "shop"], "t.csv", HEADER + "1,A,2\n2,B,1\n", ["t.csv", "cycle"]),
    ("self-loop", ["ingest", "source", "shop"], "t.csv", HEADER + "1,A,1\n", ["t.csv:2", "own parent"]),
    ("too-many-fields", ["ingest", "source", "shop"], "t.csv", HEADER + "1,A,,extra\n", ["t.csv:2", "4 fields"]),
    ("text-after-quote", ["ingest", "source", "shop"], "t.csv", HEADER + '1,"A"x,\n', ["t.csv:2", "malformed"]),
    ("paths-empty-segment", ["ingest", "source", "shop", "--format", "paths"], "p.csv", "path\nGarden >  > Tools\n",
     ["p.csv:2", "[path]", "empty segment"]),
    ("paths-missing-column", ["ingest", "source", "shop", "--format", "paths"], "p.csv", "route,x\nA > B,1\n",
     ["p.csv:1", "'path'"]),
    ("tags-blank-tag", ["ingest", "source", "shop", "--format", "tags"], "g.csv", "tag\nA\n \n", ["g.csv:3", "[tag]"]),
    ("reference-tree-cycle", ["ingest", "reference", "--format", "tree", "--scheme", "ref"], "r.csv",
     HEADER + "a,A,b\nb,B,a\n", ["r.csv", "cycle"]),
    ("reference-tree-self-loop", ["ingest", "reference", "--format", "tree", "--scheme", "ref"], "r.csv",
     HEADER + "a,A,a\n", ["r.csv:2", "own parent"]),
]


@pytest.mark.parametrize("args, name, content, words", [c[1:] for c in REFUSED_SOURCE],
                         ids=[c[0] for c in REFUSED_SOURCE])
def test_a_malformed_taxonomy_is_refused_and_the_store_is_unchanged(template, tmp_path, args, name, content, words):
    r = run_on_copy(template, tmp_path, args, name, content)
    assert r.code == 2, r.err
    assert r.err.startswith("graftwork: ") and "Traceback" not in r.err
    for word in words:
        assert word in r.err, r.err
    assert not r.changed


def test_a_missing_file_and_a_folder_are_refused(template, tmp_path):
    r = run_on_copy(template, tmp_path, ["ingest", "source", "shop"], "absent.csv")
    assert (r.code, r.changed) == (2, False) and "absent.csv" in r.err
    (tmp_path / "folder.csv").mkdir()
    r = run_on_copy(template, tmp_path, ["ingest", "source", "shop"], "folder.csv")
    assert (r.code, r.changed) == (2, False) and "folder.csv" in r.err


# -- accepted, with a documented normalisation (text_input.py rules) --------------------------------------------

def _labels(store, scheme="shop"):
    with_cats = snapshot_of(store, vectors=False)["categories"]
    return {row[2]: row[3] for row in with_cats if row[1] == scheme}


def test_a_utf8_bom_is_dropped(template, tmp_path):
    r = run_on_copy(template, tmp_path, ["ingest", "source", "shop"], "t.csv",
                    b"\xef\xbb\xbf" + (HEADER + "1,Outdoor,\n2,Pruners,1\n3,Café,1\n").encode())
    assert r.code == 0, r.err
    assert _labels(r.store) == {"1": "Outdoor", "2": "Pruners", "3": "Café"}


def test_mixed_line_endings_are_all_line_ends(template, tmp_path):
    r = run_on_copy(template, tmp_path, ["ingest", "source", "shop"], "t.csv",
                    "code,label,parent_code\r\n1,Outdoor,\n2,Pruners,1\r3,Loppers,1\r\n")
    assert r.code == 0, r.err
    assert _labels(r.store) == {"1": "Outdoor", "2": "Pruners", "3": "Loppers"}


def test_a_mixed_line_ending_error_names_the_physical_line(template, tmp_path):
    r = run_on_copy(template, tmp_path, ["ingest", "source", "shop"], "t.csv",
                    "code,label,parent_code\r\n1,Outdoor,\r2,Pruners,1\n3,Loppers,9\r\n")
    assert r.code == 2 and "t.csv:4" in r.err and not r.changed


def test_a_100k_character_label_is_kept_whole(template, tmp_path):
    long = "Pruner " * 14_286  # 100,002 characters
    r = run_on_copy(template, tmp_path, ["ingest", "source", "shop"], "t.csv", HEADER + f"1,Outdoor,\n2,{long},1\n")
    assert r.code == 0, r.err
    assert _labels(r.store)["2"] == long.strip()


def test_control_characters_in_a_label_are_kept_verbatim(template, tmp_path):
    # Decision: taxonomy labels are stored as written (the same text comes back); only item titles are cleaned.
    r = run_on_copy(template, tmp_path, ["ingest", "source", "shop"], "t.csv", HEADER + "1,Out\x07door\x1b[0m,\n")
    assert r.code == 0, r.err
    assert _labels(r.store)["1"] == "Out\x07door\x1b[0m"


def test_a_repeated_identical_row_is_still_a_duplicate_code(template, tmp_path):
    r = run_on_copy(template, tmp_path, ["ingest", "source", "shop"], "t.csv", HEADER + "1,A,\n1,A,\n")
    assert (r.code, r.changed) == (2, False) and "t.csv:3" in r.err


# -- items ------------------------------------------------------------------------------------------------------
ITEM_HEADER = "item_key,title,category\n"
REFUSED_ITEMS = [
    ("items-missing-key-column", "i.csv", "sku,title,category\n1,A,2\n", ["i.csv:1", "'item_key'"]),
    ("items-duplicated-header", "i.csv", "item_key,title,title,category\n1,A,B,2\n", ["i.csv:1", "duplicated"]),
    ("items-binary", "i.csv", b"\x00\x01\x02\x03" * 50, ["i.csv:1", "NUL"]),
    ("items-latin-1-first-row", "i.csv", (ITEM_HEADER + "k9,Caf\xe9,2\n").encode("latin-1"), ["i.csv:2", "UTF-8"]),
    ("items-utf-16", "i.csv", (ITEM_HEADER + "k9,A,2\n").encode("utf-16"), ["i.csv:1", "UTF-16"]),
    ("items-empty", "i.csv", "", ["i.csv", "empty file"]),
    ("items-parquet-truncated", "i.parquet", b"PAR1\x15\x04\x15", ["i.parquet", "Parquet"]),
]


@pytest.mark.parametrize("name, content, words", [c[1:] for c in REFUSED_ITEMS], ids=[c[0] for c in REFUSED_ITEMS])
def test_a_malformed_item_file_is_refused_and_the_store_is_unchanged(template, tmp_path, name, content, words):
    r = run_on_copy(template, tmp_path, ["ingest", "items", "shop"], name, content)
    assert r.code == 2, r.err
    for word in words:
        assert word in r.err, r.err
    assert not r.changed


def test_a_bad_byte_deep_in_an_item_file_writes_none_of_its_rows(template, tmp_path, monkeypatch):
    # The file is decoded a block at a time (1 MiB; 256 bytes here, to keep the test small) and written batch by
    # batch; it is checked whole before the first batch, so none of its rows is committed.
    monkeypatch.setattr("pipeline.ingest.text_input._Blocks.BLOCK", 256)
    good = "".join(f"n{i},Hand trowel {i},2\n" for i in range(500))
    content = (ITEM_HEADER + good).encode() + b"n-bad,Caf\xe9,2\n"
    r = run_on_copy(template, tmp_path, ["ingest", "items", "shop", "--batch-size", "50"], "i.csv", content)
    assert r.code == 2 and "i.csv:502" in r.err, r.err
    assert not r.changed


def test_a_parquet_file_missing_a_column_is_refused(template, tmp_path):
    pq.write_table(pa.table({"item_key": ["k"], "title": ["A"]}), tmp_path / "i.parquet")
    r = run_on_copy(template, tmp_path, ["ingest", "items", "shop"], "i.parquet")
    assert (r.code, r.changed) == (2, False) and "'category'" in r.err


def test_items_of_an_unknown_source_are_refused(template, tmp_path):
    r = run_on_copy(template, tmp_path, ["ingest", "items", "nosuch"], "i.csv", ITEM_HEADER + "k,A,2\n")
    assert (r.code, r.changed) == (2, False) and "nosuch" in r.err


def _rejects(template, tmp_path, content, caplog):
    rej = tmp_path / "rejects.csv"
    with caplog.at_level(logging.WARNING):
        r = run_on_copy(template, tmp_path, ["ingest", "items", "shop", "--rejects", str(rej)], "i.csv", content)
    return r, rej.read_text() if rej.exists() else ""


ROW_REJECTS = [
    ("unknown-category", ITEM_HEADER + "k2,Loppers,2\nk3,Hose,99\n", "3", "unknown category '99'"),
    ("empty-key", ITEM_HEADER + "k2,Loppers,2\n,Hose,2\n", "3", "empty item key"),
    ("empty-title", ITEM_HEADER + "k2,Loppers,2\nk3,,2\n", "3", "empty title"),
    ("duplicate-key-other-title", ITEM_HEADER + "k2,Loppers,2\nk2,Hose,2\n", "3", "first seen on line 2"),
    ("title-100k-chars", ITEM_HEADER + "k2,Loppers,2\nk3," + "x" * 100_000 + ",2\n", "3", "the limit is 10000"),
    ("no-category", ITEM_HEADER + "k2,Loppers,2\nk3,Hose,\n", "3", "no category"),
    ("category-half-unknown", ITEM_HEADER + "k2,Loppers,2\nk3,Hose,2|77\n", "3", "unknown category '77'"),
]


@pytest.mark.parametrize("content, line, reason", [c[1:] for c in ROW_REJECTS], ids=[c[0] for c in ROW_REJECTS])
def test_a_bad_item_row_goes_to_the_reject_file_and_is_logged(template, tmp_path, caplog, content, line, reason):
    r, text = _rejects(template, tmp_path, content, caplog)
    assert r.code == 0, r.err
    assert f"\n{line}," in text and reason in text, text
    assert any("rejected" in m for m in caplog.messages)
    items = {row[2] for row in snapshot_of(r.store, vectors=False)["items"]}
    assert items == {"k1", "k2"}  # the good row is kept, the bad one is not half-written


def test_a_nul_byte_in_an_item_file_is_binary_data(template, tmp_path, caplog):
    r, _ = _rejects(template, tmp_path, ITEM_HEADER + "k2,Lop\x00pers,2\n", caplog)
    assert (r.code, r.changed) == (2, False) and "i.csv:2" in r.err and "NUL" in r.err


def test_control_characters_in_titles_are_removed(template, tmp_path, caplog):
    r, _ = _rejects(template, tmp_path, ITEM_HEADER + "k2,Lop\x07pers\tset\x1b,2\r\n", caplog)
    assert r.code == 0, r.err
    titles = {row[2]: row[3] for row in snapshot_of(r.store, vectors=False)["items"]}
    assert titles["k2"] == "Loppers set"  # documented in pipeline/ingest/items_reader.py
