"""read_csv_chunks gives the rows, line numbers and bad rows of read_csv_rows, whichever parser reads a block."""

import random

import pytest

from pipeline.errors import BadInput
from pipeline.ingest import text_input
from pipeline.ingest.text_input import read_csv_chunks, read_csv_rows

PIECES = ["a", "b c", " ", "", "é", '"q,uoted"', '"two\nlines"', '"x""y"', '"bad"z', "\x1c", "tail "]


def _text(rng: random.Random) -> str:
    out = ["k,t,c"]
    for _ in range(rng.randint(0, 40)):
        roll = rng.random()
        if roll < 0.05:
            out.append("")
        elif roll < 0.08:
            out.append(",,")
        elif roll < 0.11:
            out.append("a,b,c,d")
        elif roll < 0.14:
            out.append("a")
        else:
            out.append(",".join(rng.choice(PIECES) if rng.random() < 0.3 else rng.choice("abcxyz") * rng.randint(1, 5)
                                for _ in range(3)))
    end = rng.choice(["\n", "\n", "\r\n", "\r"])
    text = end.join(out) + (end if rng.random() < 0.8 else "")
    return text + ('k9,"never closed,\n' if rng.random() < 0.05 else "")


def _rows_way(p):
    bad = []
    rows = [(line, list(row.values())) for line, row in read_csv_rows(p, required=[], on_bad_row=lambda *b: bad.append(b))]
    return rows, bad


def _chunks_way(p):
    rows, bad = [], []
    for c in read_csv_chunks(p, required=[]):
        cols = [col.to_pylist() for col in c.columns]
        for i, line in enumerate(c.lines.tolist()):
            if i in c.bad:
                bad.append((line, *c.bad[i]))
            else:
                rows.append((line, [col[i] for col in cols]))
    return rows, bad


@pytest.mark.parametrize("seed", range(120))
def test_same_as_read_csv_rows_with_small_blocks(tmp_path, monkeypatch, seed):
    rng = random.Random(seed)
    monkeypatch.setattr(text_input._Blocks, "BLOCK", rng.choice([8, 16, 40, 100, 1 << 20]))
    p = tmp_path / "t.csv"
    p.write_bytes(_text(rng).encode("utf-8"))
    assert _chunks_way(p) == _rows_way(p)


def _tiers(monkeypatch):
    used = []
    for name in ("_arrow_chunk", "_csv_block_chunk", "_row_chunk"):
        real = getattr(text_input, name)

        def spy(*a, _real=real, _name=name):
            out = _real(*a)
            used.append((_name, out is not None))
            return out

        monkeypatch.setattr(text_input, name, spy)
    return used


def test_plain_block_goes_to_arrow(tmp_path, monkeypatch):
    used = _tiers(monkeypatch)
    p = tmp_path / "t.csv"
    p.write_text("k,t\na,b\n,\nc,d\n")
    [c] = read_csv_chunks(p, required=["k"])
    assert used == [("_arrow_chunk", True)]
    assert (c.lines.tolist(), [x.to_pylist() for x in c.columns]) == ([2, 4], [["a", "c"], ["b", "d"]])


def test_crlf_block_goes_to_arrow_and_a_lone_cr_does_not(tmp_path, monkeypatch):
    used = _tiers(monkeypatch)
    p = tmp_path / "t.csv"
    p.write_bytes(b"k,t\r\na,b\r\nc,d\r\n")
    assert _chunks_way(p) == ([(2, ["a", "b"]), (3, ["c", "d"])], [])
    assert used == [("_arrow_chunk", True)]
    used.clear()
    p.write_bytes(b"k,t\ra,b\rc,d\r")
    assert _chunks_way(p) == ([(2, ["a", "b"]), (3, ["c", "d"])], [])
    assert ("_arrow_chunk", True) not in used


def test_quoted_block_goes_to_the_csv_module_in_one_call(tmp_path, monkeypatch):
    used = _tiers(monkeypatch)
    p = tmp_path / "t.csv"
    p.write_text('k,t\na,"b, c"\n\nd,e\n')
    [c] = read_csv_chunks(p, required=["k"])
    assert used == [("_arrow_chunk", False), ("_csv_block_chunk", True)]
    assert (c.lines.tolist(), c.columns[1].to_pylist()) == ([2, 4], ["b, c", "e"])


def test_a_quoted_line_break_is_read_row_by_row(tmp_path, monkeypatch):
    used = _tiers(monkeypatch)
    p = tmp_path / "t.csv"
    p.write_text('k,t\na,"b\nc"\nd,e\n')
    [c] = read_csv_chunks(p, required=["k"])
    assert used[-1] == ("_row_chunk", True)
    assert (c.lines.tolist(), c.columns[1].to_pylist()) == ([2, 4], ["b\nc", "e"])


def test_a_quote_open_across_blocks_reads_on_to_the_end(tmp_path, monkeypatch):
    monkeypatch.setattr(text_input._Blocks, "BLOCK", 8)
    p = tmp_path / "t.csv"
    p.write_text('k,t\na,"b\nc\nd\ne"\nf,g\n')
    assert _chunks_way(p) == ([(2, ["a", "b\nc\nd\ne"]), (6, ["f", "g"])], [])


def test_header_problems_raise_as_before(tmp_path):
    p = tmp_path / "t.csv"
    p.write_text("k,k\n")
    with pytest.raises(BadInput, match="duplicated column"):
        list(read_csv_chunks(p, required=[]))
    p.write_text("")
    with pytest.raises(BadInput, match="empty file"):
        list(read_csv_chunks(p, required=[]))


def test_a_long_unquoted_field_still_hits_the_field_limit(tmp_path, monkeypatch):
    monkeypatch.setattr(text_input, "FIELD_LIMIT", 50)
    p = tmp_path / "t.csv"
    p.write_text("k,t\n" + "x" * 60 + ",y\n")
    old = text_input.csv.field_size_limit(50)  # process-wide: put back below
    try:
        with pytest.raises(BadInput, match="over 50 characters"):
            list(read_csv_chunks(p, required=[]))
    finally:
        text_input.csv.field_size_limit(old)
