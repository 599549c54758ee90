"""Rejects file written from RejectedRow records."""

import csv

import pytest

from pipeline.ingest.items_reader import read_items
from pipeline.ingest.rejects import write_rejects
from pipeline.records import RejectedRow


def test_writes_header_rows_and_count(tmp_path):
    p = tmp_path / "r.csv"
    n = write_rejects(
        p, [RejectedRow(2, "empty title", "title", "k1,,g"), RejectedRow(5, "bad", None, 'a"\nb')]
    )
    assert n == 2
    assert (
        p.read_text(encoding="utf-8")
        == 'line,field,reason,raw\n2,title,empty title,"k1,,g"\n5,,bad,"a""\nb"\n'
    )


def test_empty_still_has_header(tmp_path):
    p = tmp_path / "r.csv"
    assert write_rejects(p, iter([])) == 0
    assert p.read_text() == "line,field,reason,raw\n"


def test_round_trip_from_items_reader(tmp_path):
    src = tmp_path / "items.csv"
    src.write_text('item_key,title,category\n,"multi\nline",g\nk2,Ok,g\nk3,Über,\n', encoding="utf-8")
    out = tmp_path / "rejects.csv"
    count = write_rejects(out, (r for b in read_items(src) for r in b.rejects))
    with open(out, newline="", encoding="utf-8") as fh:
        got = list(csv.DictReader(fh))
    assert count == 2
    assert [(g["line"], g["field"], g["reason"]) for g in got] == [
        ("2", "item_key", "empty item key"),
        ("5", "category", "no category"),
    ]
    assert got[0]["raw"] == ',"multi\nline",g'


def test_failure_leaves_no_file(tmp_path):
    p = tmp_path / "r.csv"

    def broken():
        yield RejectedRow(2, "x", None, "")
        raise RuntimeError("boom")

    with pytest.raises(RuntimeError):
        write_rejects(p, broken())
    assert list(tmp_path.iterdir()) == []
