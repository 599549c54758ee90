"""Item files: rows, merging repeated keys, rejects, batches, Parquet."""

import pyarrow as pa
import pyarrow.parquet as pq
import pytest

from pipeline.errors import BadInput
from pipeline.ingest.items_reader import RAW_LIMIT, normalise_title, read_items
from pipeline.ingest.source_taxonomy import path_code


def write(tmp_path, text: str, name="items.csv"):
    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return p


def one_batch(p, **kw):
    batches = list(read_items(p, **kw))
    assert len(batches) == 1
    return batches[0]


def items(batch):
    return [(i.key, i.title, i.category_codes, i.attributes, i.line) for i in batch.items]


def rejects(batch):
    return [(r.line, r.field, r.reason) for r in batch.rejects]


def test_basic_row_and_attributes(tmp_path):
    p = write(tmp_path, "item_key,title,category,colour,size\nk1,Hose,g|w,green,\n")
    assert items(one_batch(p)) == [("k1", "Hose", ["g", "w"], {"colour": "green"}, 2)]


def test_category_split_trim_dedupe(tmp_path):
    p = write(tmp_path, "item_key,title,category\nk1,Hose, g || w |g\n")
    assert one_batch(p).items[0].category_codes == ["g", "w"]


def test_no_separator_keeps_whole_cell(tmp_path):
    p = write(tmp_path, "item_key,title,category\nk1,Hose,a|b\n")
    assert one_batch(p, category_separator=None).items[0].category_codes == ["a|b"]


def test_repeated_rows_merge(tmp_path):
    p = write(tmp_path, "item_key,title,category,c\nk1,Hose,g,x\nk2,Rake,t,\nk1,Hose,w,y\nk1, Hose ,g,\n")
    b = one_batch(p)
    assert items(b) == [("k1", "Hose", ["g", "w"], {"c": "x"}, 2), ("k2", "Rake", ["t"], {}, 3)]
    assert b.rejects == []


def test_repeated_key_other_title_rejected_naming_first_line(tmp_path):
    p = write(tmp_path, "item_key,title,category\nk1,Hose,g\nk1,Rake,w\n")
    b = one_batch(p)
    assert items(b) == [("k1", "Hose", ["g"], {}, 2)]
    assert rejects(b) == [(3, "title", "item key 'k1' was first seen on line 2 with a different title")]


def test_rejects_with_lines_and_good_rows_kept(tmp_path):
    p = write(
        tmp_path,
        "item_key,title,category\n"
        ",No key,g\n"
        "k2,,g\n"
        "k3,No cat,\n"
        "k4,Fine,g\n"
        "k5,Unknown,g|zz|yy\n"
        "k6,Sep only, | \n",
    )
    b = one_batch(p, known_categories={"g"}.__contains__)
    assert [i.key for i in b.items] == ["k4"]
    assert rejects(b) == [
        (2, "item_key", "empty item key"),
        (3, "title", "empty title"),
        (4, "category", "no category"),
        (6, "category", "unknown category 'zz', 'yy'"),
        (7, "category", "no category"),
    ]
    assert b.rejects[0].raw == ",No key,g"


def test_rejected_first_row_does_not_claim_the_key(tmp_path):
    p = write(tmp_path, "item_key,title,category\nk1,Hose,zz\nk1,Rake,g\n")
    b = one_batch(p, known_categories={"g"}.__contains__)
    assert items(b) == [("k1", "Rake", ["g"], {}, 3)]


def test_malformed_row_becomes_reject_not_error(tmp_path):
    p = write(tmp_path, "item_key,title,category\nk1,Hose,g,extra\nk2,Rake,g\n")
    b = one_batch(p)
    assert [i.key for i in b.items] == ["k2"]
    assert b.rejects[0].line == 2 and b.rejects[0].field is None and "4 fields" in b.rejects[0].reason


def test_title_control_characters_stripped(tmp_path):
    p = write(tmp_path, 'item_key,title,category\nk1,"Hose\x07 20m\t\x00\nlong",g\n'.replace("\x00", "\x1b"))
    assert one_batch(p).items[0].title == "Hose 20m long"


def test_normalise_title():
    assert normalise_title("\x85a\u0090b\x7f  c\r\n") == "ab c"


def test_title_limit(tmp_path):
    p = write(tmp_path, "item_key,title,category\nk1," + "x" * 100_000 + ",g\nk2," + "y" * 10_000 + ",g\n")
    b = one_batch(p)
    assert [i.key for i in b.items] == ["k2"]
    assert rejects(b) == [(2, "title", "title is 100000 characters; the limit is 10000")]
    assert len(b.rejects[0].raw) < RAW_LIMIT + 50


def test_title_limit_configurable(tmp_path):
    p = write(tmp_path, "item_key,title,category\nk1,Garden hose,g\n")
    assert rejects(one_batch(p, max_title_chars=5))[0][2] == "title is 11 characters; the limit is 5"


def test_key_limit(tmp_path):
    p = write(tmp_path, "item_key,title,category\n" + "k" * 1001 + ",Hose,g\n")
    assert rejects(one_batch(p)) == [(2, "item_key", "item key is 1001 characters; the limit is 1000")]


def test_long_attribute_value_kept(tmp_path):
    p = write(tmp_path, "item_key,title,category,notes\nk1,Hose,g," + "n" * 100_000 + "\n")
    assert len(one_batch(p).items[0].attributes["notes"]) == 100_000


def test_attribute_names_verbatim(tmp_path):
    p = write(tmp_path, 'item_key,title,category,"say ""hi""",{x} y\nk1,Hose,g,1,2\n')
    assert one_batch(p).items[0].attributes == {'say "hi"': "1", "{x} y": "2"}


def test_attribute_cols_selects_and_requires(tmp_path):
    p = write(tmp_path, "item_key,title,category,a,b\nk1,Hose,g,1,2\n")
    assert one_batch(p, attribute_cols=["b"]).items[0].attributes == {"b": "2"}
    with pytest.raises(BadInput, match="missing column.*'zz'"):
        list(read_items(p, attribute_cols=["zz"]))


def test_missing_columns_named(tmp_path):
    p = write(tmp_path, "sku,name,category\n")
    with pytest.raises(BadInput, match="missing column.*'item_key', 'title'.*the header has: 'sku', 'name'"):
        list(read_items(p))


def test_custom_column_names(tmp_path):
    p = write(tmp_path, "sku,name,cats\nk1,Hose,g\n")
    b = one_batch(p, key_col="sku", title_col="name", category_col="cats")
    assert items(b) == [("k1", "Hose", ["g"], {}, 2)]


def test_category_normaliser(tmp_path):
    p = write(tmp_path, "item_key,title,category\nk1,Hose,Garden>Hoses\nk2,Rake,Garden >> x\n")
    b = one_batch(p, category_normaliser=path_code)
    assert items(b) == [("k1", "Hose", ["Garden > Hoses"], {}, 2)]
    assert rejects(b)[0][:2] == (3, "category")


def test_empty_file_and_latin1(tmp_path):
    with pytest.raises(BadInput, match="empty file"):
        list(read_items(write(tmp_path, "")))
    p = tmp_path / "l.csv"
    p.write_bytes(b"item_key,title,category\nk1,Caf\xe9,g\n")
    with pytest.raises(BadInput, match="expected UTF-8"):
        list(read_items(p))


def test_header_only_yields_nothing(tmp_path):
    assert list(read_items(write(tmp_path, "item_key,title,category\n"))) == []


# --- batches


def test_batches_split_by_rows(tmp_path):
    p = write(tmp_path, "item_key,title,category\n" + "".join(f"k{i},T{i},g\n" for i in range(5)))
    assert [[i.key for i in b.items] for b in read_items(p, batch_size=2)] == [
        ["k0", "k1"],
        ["k2", "k3"],
        ["k4"],
    ]


def test_rejects_count_toward_batch(tmp_path):
    p = write(tmp_path, "item_key,title,category\n,x,g\n,y,g\nk1,T,g\n")
    assert [(len(b.items), len(b.rejects)) for b in read_items(p, batch_size=2)] == [(0, 2), (1, 0)]


def test_key_spanning_batches_yields_continuation(tmp_path):
    p = write(tmp_path, "item_key,title,category\nk1,Hose,a\nk2,Rake,b\nk1,Hose,c\nk1,Hose,a\nk1,Other,d\n")
    batches = list(read_items(p, batch_size=2))
    assert [items(b) for b in batches] == [
        [("k1", "Hose", ["a"], {}, 2), ("k2", "Rake", ["b"], {}, 3)],
        [("k1", "Hose", ["c", "a"], {}, 4)],
        [],
    ]
    assert rejects(batches[2]) == [
        (6, "title", "item key 'k1' was first seen on line 2 with a different title")
    ]


def test_key_once_per_batch(tmp_path):
    p = write(tmp_path, "item_key,title,category\n" + "".join(f"k{i % 3},T{i % 3},c{i}\n" for i in range(30)))
    for b in read_items(p, batch_size=7):
        keys = [i.key for i in b.items]
        assert len(keys) == len(set(keys))


def test_bad_batch_size(tmp_path):
    with pytest.raises(ValueError):
        list(read_items(write(tmp_path, "item_key,title,category\n"), batch_size=0))


# --- Parquet


def write_parquet(tmp_path, table, name="items.parquet"):
    p = tmp_path / name
    pq.write_table(table, p)
    return p


def test_parquet_rows_merge_and_reject(tmp_path):
    t = pa.table(
        {
            "item_key": ["k1", "k2", "k1", None],
            "title": ["Hose", "Rake", "Hose", "x"],
            "category": ["g|w", "t", "z", "g"],
            "price": [3.5, None, 3.5, 1.0],
            "qty": [1, 2, 3, 4],
        }
    )
    b = one_batch(write_parquet(tmp_path, t))
    assert items(b) == [
        ("k1", "Hose", ["g", "w", "z"], {"price": "3.5", "qty": "1"}, 1),
        ("k2", "Rake", ["t"], {"qty": "2"}, 2),
    ]
    assert rejects(b) == [(4, "item_key", "empty item key")]
    assert b.rejects[0].raw == ",x,g,1.0,4"


def test_parquet_list_category_column(tmp_path):
    t = pa.table({"item_key": ["k1"], "title": ["Hose"], "category": [["g", " w ", "g"]]})
    assert one_batch(write_parquet(tmp_path, t, "i.pq")).items[0].category_codes == ["g", "w"]


def test_parquet_key_conflict_names_row(tmp_path):
    t = pa.table({"item_key": ["k1", "k1"], "title": ["Hose", "Rake"], "category": ["g", "g"]})
    assert rejects(one_batch(write_parquet(tmp_path, t)))[0][2] == (
        "item key 'k1' was first seen on row 1 with a different title"
    )


def test_parquet_read_in_batches(tmp_path):
    n = 1000
    t = pa.table({"item_key": [f"k{i}" for i in range(n)], "title": ["T"] * n, "category": ["g"] * n})
    p = tmp_path / "big.parquet"
    pq.write_table(t, p, row_group_size=100)
    sizes = [len(b.items) for b in read_items(p, batch_size=300)]
    assert sizes == [300, 300, 300, 100]


def test_parquet_missing_columns(tmp_path):
    t = pa.table({"sku": ["k1"], "title": ["Hose"]})
    with pytest.raises(BadInput, match="missing column.*'item_key', 'category'.*'sku', 'title'"):
        list(read_items(write_parquet(tmp_path, t)))


def test_parquet_corrupt_file(tmp_path):
    p = tmp_path / "bad.parquet"
    p.write_bytes(b"not parquet at all")
    with pytest.raises(BadInput, match="not a readable Parquet file"):
        list(read_items(p))


def test_parquet_attribute_cols(tmp_path):
    t = pa.table({"item_key": ["k1"], "title": ["Hose"], "category": ["g"], "a": ["1"], "b": ["2"]})
    assert one_batch(write_parquet(tmp_path, t), attribute_cols=["a"]).items[0].attributes == {"a": "1"}
