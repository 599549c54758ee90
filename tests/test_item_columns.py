"""The columnar item reader gives exactly what the row-by-row reader gave (kept in tests/items_reader_reference.py
as the oracle), on random messy files; plus the vector shortcuts checked against the Python rules they replace."""

import json
import random
import sys

import items_reader_reference as reference
import pyarrow as pa
import pyarrow.parquet as pq
import pytest

from pipeline.ingest import item_columns, text_input
from pipeline.ingest.item_columns import PY_WHITESPACE, normalise_title, read_item_columns
from pipeline.ingest.items_reader import read_items
from pipeline.ingest.source_taxonomy import path_code

# Pieces chosen to hit every rule: Python-only whitespace (\x1c, \x85, U+3000), control characters, quotes,
# backslashes, separators with spaces around them, empty parts, path categories, long values.
KEYS = ["k1", " k1", "k2 ", "k3", "\u3000k4", "", "  ", "k" * 12]
TITLES = ["Hose", " Hose ", "Hose\t", "Rake", "Ho\x1bse", "Ho\x07se", "a  b", "\x85x\x1c", "Rake\u2028", "", "é ü",
          "tab\there", "x" * 15, 'say "hi"']
CATS = ["g", "w", " g ", "g|w", "g||w", "|", "", "zz", "g|zz", "a > b", "a>b", "a >> b", "w | g | w", "\x1cg"]
VALUES = ["", " ", "red", ' "q" ', "back\\slash", "line\nbreak", "tab\tin", "\x01ctl", "ünï", "\u2028", "a,b"]


def _csv_text(rng: random.Random) -> str:
    lines = ["item_key,title,category,colour,size"]
    for _ in range(rng.randint(0, 25)):
        roll = rng.random()
        if roll < 0.04:
            lines.append("")  # blank line
        elif roll < 0.07:
            lines.append(",,,,")  # delimiters only
        elif roll < 0.10:
            lines.append('k9,"bad"quote,g,,')  # text after a closing quote
        elif roll < 0.13:
            lines.append("k9,T,g,x,y,extra")  # too many fields
        elif roll < 0.16:
            lines.append("k9,Short")  # too few fields: padded
        else:
            fields = [rng.choice(KEYS), rng.choice(TITLES), rng.choice(CATS), rng.choice(VALUES), rng.choice(VALUES)]
            lines.append(",".join(_quote(f) for f in fields))
    end = rng.choice(["\n", "\r\n", "\r"])
    text = end.join(lines) + (end if rng.random() < 0.8 else "")
    if rng.random() < 0.05:
        text += '\nk8,"never closed,g,,\n'
    return text


def _quote(value: str) -> str:
    if any(c in value for c in ',"\r\n') or value != value.strip(" "):
        return '"' + value.replace('"', '""') + '"'
    return value


def _normaliser(text: str) -> str:
    if "zz" in text:
        raise ValueError(f"no zz allowed in {text!r}")
    return text.upper() if text.startswith("a") else text


def _snapshot(batches):
    return [
        (
            [(i.key, i.title, i.category_codes, i.attributes, i.line) for i in b.items],
            [(r.line, r.field, r.reason, r.raw) for r in b.rejects],
        )
        for b in batches
    ]


def _both(path, **kw):
    try:
        want = _snapshot(reference.read_items(path, **kw))
    except Exception as exc:  # noqa: BLE001  (any error: the same one must come out of both)
        with pytest.raises(type(exc)) as got:
            _snapshot(read_items(path, **kw))
        assert str(got.value) == str(exc)
        return None
    assert _snapshot(read_items(path, **kw)) == want
    return want


@pytest.mark.parametrize("seed", range(150))
def test_random_csv_same_as_row_by_row_reader(tmp_path, monkeypatch, seed):
    rng = random.Random(seed)
    # small blocks put block ends inside quoted fields and between the rows of a batch
    monkeypatch.setattr(text_input._Blocks, "BLOCK", rng.choice([8, 30, 100, 1 << 20]))
    p = tmp_path / "items.csv"
    p.write_bytes(_csv_text(rng).encode("utf-8"))
    kw = {"batch_size": rng.randint(1, 8), "max_title_chars": 12, "max_key_chars": 10}
    if rng.random() < 0.5:
        kw["known_categories"] = {"g", "w", "A > B", "a > b", "\x1cg"}.__contains__
    if rng.random() < 0.3:
        kw["category_normaliser"] = _normaliser
    if rng.random() < 0.2:
        kw["category_separator"] = None
    if rng.random() < 0.2:
        kw["attribute_cols"] = ["size"]
    _both(p, **kw)


@pytest.mark.parametrize("seed", range(30))
def test_random_parquet_same_as_row_by_row_reader(tmp_path, seed):
    rng = random.Random(1000 + seed)
    n = rng.randint(1, 20)
    listed = rng.random() < 0.5
    cats = [[rng.choice(CATS) for _ in range(rng.randint(0, 3))] if listed else rng.choice(CATS) for _ in range(n)]
    t = pa.table({
        "item_key": [rng.choice(KEYS + [None]) for _ in range(n)],
        "title": [rng.choice(TITLES + ["Ho\x00se"]) for _ in range(n)],  # NUL: allowed in Parquet only
        "category": cats,
        "price": [rng.choice([None, 1.5, 2.0, 1e20]) for _ in range(n)],
        "colour": [rng.choice(VALUES) for _ in range(n)],
    })
    p = tmp_path / "items.parquet"
    pq.write_table(t, p, row_group_size=7)
    _both(p, batch_size=rng.randint(1, 9), max_title_chars=12)


def test_path_categories_same_as_row_by_row_reader(tmp_path):
    p = tmp_path / "items.csv"
    p.write_text("item_key,title,category\nk1,Hose,Garden>Hoses\nk2,Rake,Garden >> x\nk3,Can, Garden >  Hoses \n")
    assert _both(p, category_normaliser=path_code)[0][0][1][2] == ["Garden > Hoses"]


def test_whitespace_set_is_pythons():
    assert PY_WHITESPACE == "".join(chr(c) for c in range(sys.maxunicode + 1) if chr(c).isspace())


def test_title_shortcut_matches_normalise_title():
    rng = random.Random(7)
    alphabet = ["a", "b", " ", "  ", "\t", "\x00", "\x1f", "\x7f", "\x85", "\x9f", "\xa0", "\u3000", "\u2028", "é"]
    titles = ["".join(rng.choice(alphabet) for _ in range(rng.randint(0, 6))) for _ in range(3000)]
    got = item_columns._Merger._titles(None, titles).to_pylist()
    assert got == [normalise_title(t) for t in titles]


def test_json_shortcut_matches_json_dumps():
    values = ["plain", 'q"uote', "back\\slash", "\x00\x1f\x7f", "\u2028\u2029", "é", "\n\r\t\b\f", ""]
    got = item_columns._json_strings(pa.array(values)).to_pylist()
    assert got == [json.dumps(v, ensure_ascii=False) for v in values]


def test_columns_give_links_grouped_by_item(tmp_path):
    p = tmp_path / "i.csv"
    p.write_text("item_key,title,category\nk1,Hose,a|b\nk2,Rake,c\nk1,Hose,b|d\n")
    [b] = read_item_columns(p)
    assert b.keys.to_pylist() == ["k1", "k2"]
    assert list(zip(b.link_item.tolist(), b.link_category.to_pylist())) == [(0, "a"), (0, "b"), (0, "d"), (1, "c")]
    assert b.continued.tolist() == [False, False]


def test_continued_marks_keys_from_earlier_batches(tmp_path):
    p = tmp_path / "i.csv"
    p.write_text("item_key,title,category,c\nk1,Hose,a,x\nk2,Rake,b,\nk1,Hose,c,y\nk3,Can,d,\n")
    b1, b2 = read_item_columns(p, batch_size=2)
    assert (b1.keys.to_pylist(), b1.continued.tolist()) == (["k1", "k2"], [False, False])
    assert (b2.keys.to_pylist(), b2.continued.tolist()) == (["k1", "k3"], [True, False])
    assert b2.attributes.to_pylist() == ['{"c": "y"}', "{}"]


def test_unparsable_rows_never_close_a_batch(tmp_path):
    p = tmp_path / "i.csv"
    p.write_text("item_key,title,category\nk1,A,g\nk2,B,g,x\nk3,C,g,y\nk4,D,g\nk5,E,g\n")
    sizes = [(len(b), len(b.rejects)) for b in read_item_columns(p, batch_size=2)]
    assert sizes == [(2, 2), (1, 0)]  # k1, the two bad rows ride along until k4 closes the batch; then k5
