"""Stream item rows (key, title, categories, attributes) from CSV or Parquet in batches, with rejects.

>>> import pathlib, tempfile
>>> p = pathlib.Path(tempfile.mkdtemp()) / "items.csv"
>>> _ = p.write_text("item_key,title,category,colour\\nk1,Hose,g|w,green\\nk2,,g,\\nk1,Hose,t,\\n")
>>> [b] = read_items(p)
>>> [(i.key, i.category_codes, i.attributes, i.line) for i in b.items]
[('k1', ['g', 'w', 't'], {'colour': 'green'}, 2)]
>>> [(r.line, r.field, r.reason) for r in b.rejects]
[(3, 'title', 'empty title')]

Batch contract (writers rely on it):
- Each batch holds `batch_size` input rows (items plus rejects; the last batch fewer, see below); a key appears
  at most once per batch.
- Rows with the same key are merged (categories appended in order, duplicates dropped). When a key's rows span
  batches, the key is yielded again in the later batch as a continuation: same key and title, only the categories
  of that batch's rows (which may repeat earlier ones), that batch's attributes, and `line` = its first row there.
  Writers must MERGE on the key and add FILED_UNDER edges, never replace an item's categories with a batch's,
  and keep the stored value of an attribute an earlier batch gave (the first row's value wins, file-wide).
- To stay streaming, only `key -> (first line, 64-bit hash of the normalised title)` is kept across batches, packed
  in one int (measured: about 160 bytes per distinct key with the key string). Two different titles of one key
  with equal 64-bit hashes would be merged; the odds are negligible (about n^2 / 2^65 for n keys).
- Parquet is read in record batches of at most 8,192 rows; CSV one 1 MiB block at a time.
- A batch closes on the first good row that brings it to `batch_size` entries; rows that cannot be parsed as CSV
  count as entries but never close a batch (so a batch can exceed `batch_size` by such rows).
- `item_columns.read_item_columns` yields the same batches as Arrow columns (the form `items_job` writes); this
  module's `read_items` is that reader with each batch turned into ItemRecords on first use of `batch.items`.
Row rules (one reject per row, first failing rule wins, with the field it concerns):
- empty key; key over `max_key_chars` (default 1,000); empty title; title over `max_title_chars` (default 10,000)
  characters after normalisation; no category; any category for which `known_categories(code)` is False (the whole
  row is rejected so an item is never half-filed); a key seen before with a different title (reason names the line
  of the first occurrence).
Normalisation: key and categories trimmed; titles have control characters removed (tab, CR, LF and other
whitespace become one space; other Unicode Cc characters are dropped) and runs of whitespace collapsed, then
trimmed. Attribute names are kept verbatim (only the CSV header trim applies); attribute values are strings,
trimmed, and empty or null values are left out. For Parquet, `line` is the 1-based row number; non-string values
are turned into strings, and a list-typed category column gives the categories directly. `raw` of a reject is the
row rendered as CSV, cut to `RAW_LIMIT` characters.
"""

from __future__ import annotations

import json
from collections.abc import Callable, Iterator
from os import PathLike

import numpy as np

from pipeline.ingest.item_columns import (
    PARQUET_SUFFIXES,
    RAW_LIMIT,
    ItemColumns,
    normalise_title,
    read_item_columns,
)
from pipeline.records import ItemRecord, RejectedRow


class ItemBatch:
    """One batch: `items` (ItemRecords, built on first use) and `rejects`; `columns` holds the Arrow form."""

    def __init__(self, columns: ItemColumns):
        self.columns = columns
        self.rejects: list[RejectedRow] = columns.rejects
        self._items: list[ItemRecord] | None = None

    @property
    def items(self) -> list[ItemRecord]:
        if self._items is None:
            self._items = to_records(self.columns)
        return self._items


def to_records(cols: ItemColumns) -> list[ItemRecord]:
    """The items of a column batch as ItemRecords (categories in first-seen order)."""
    bounds = np.searchsorted(cols.link_item, np.arange(len(cols) + 1)).tolist()
    codes = cols.link_category.to_pylist()
    return [
        ItemRecord(key, title, codes[bounds[j]:bounds[j + 1]], json.loads(attrs), line)
        for j, (key, title, attrs, line) in enumerate(
            zip(cols.keys.to_pylist(), cols.titles.to_pylist(), cols.attributes.to_pylist(), cols.lines.tolist())
        )
    ]


def read_items(
    path: str | PathLike[str],
    *,
    key_col: str = "item_key",
    title_col: str = "title",
    category_col: str = "category",
    category_separator: str | None = "|",
    known_categories: Callable[[str], bool] | None = None,
    attribute_cols: list[str] | None = None,
    batch_size: int = 50_000,
    max_title_chars: int = 10_000,
    max_key_chars: int = 1_000,
    category_normaliser: Callable[[str], str] | None = None,
    delimiter: str = ",",
) -> Iterator[ItemBatch]:
    """Yield ItemBatch objects; see the module docstring for the batch contract and the row rules.

    `category_normaliser` maps each trimmed category text to a code before the known-check (for example
    `source_taxonomy.path_code` when items name categories by path); if it raises ValueError the row is rejected.
    It and `known_categories` are called once per distinct value of a batch: they must be pure.
    """
    for cols in read_item_columns(
        path, key_col=key_col, title_col=title_col, category_col=category_col,
        category_separator=category_separator, known_categories=known_categories, attribute_cols=attribute_cols,
        batch_size=batch_size, max_title_chars=max_title_chars, max_key_chars=max_key_chars,
        category_normaliser=category_normaliser, delimiter=delimiter,
    ):
        yield ItemBatch(cols)


__all__ = ["PARQUET_SUFFIXES", "RAW_LIMIT", "ItemBatch", "normalise_title", "read_items", "to_records"]
