"""The row-by-row item reader that `pipeline.ingest.item_columns` replaced, kept as the oracle the columnar
reader is checked against (tests/test_item_columns.py). Its original docstring follows.

Stream item rows (key, title, categories, attributes) from CSV or Parquet in batches, with rejects.

>>> import pathlib, tempfile
>>> p = pathlib.Path(tempfile.mkdtemp()) / "items.csv"
>>> _ = p.write_text("item_key,title,category,colour\\nk1,Hose,g|w,green\\nk2,,g,\\nk1,Hose,t,\\n")
>>> [b] = read_items(p)
>>> [(i.key, i.category_codes, i.attributes, i.line) for i in b.items]
[('k1', ['g', 'w', 't'], {'colour': 'green'}, 2)]
>>> [(r.line, r.field, r.reason) for r in b.rejects]
[(3, 'title', 'empty title')]

Batch contract (writers rely on it):
- Each batch holds at most `batch_size` input rows (items plus rejects); a key appears at most once per batch.
- Rows with the same key are merged (categories appended in order, duplicates dropped). When a key's rows span
  batches, the key is yielded again in the later batch as a continuation: same key and title, only the categories
  of that batch's rows (which may repeat earlier ones), that batch's attributes, and `line` = its first row there.
  Writers must MERGE on the key and add FILED_UNDER edges, never replace an item's categories with a batch's.
- To stay streaming, only `key -> (first line, 64-bit hash of the normalised title)` is kept across batches, packed
  in one int (measured: about 160 bytes per distinct key with the key string). Two different titles of one key
  with equal 64-bit hashes would be merged; the odds are negligible (about n^2 / 2^65 for n keys).
- Parquet is read in record batches of at most 8,192 rows; CSV one 1 MiB block at a time.
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

import re
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from os import PathLike
from pathlib import Path
from typing import Any

from pipeline.errors import BadInput, Problem
from pipeline.ingest.text_input import read_csv_rows, render_row
from pipeline.records import ItemRecord, RejectedRow

RAW_LIMIT = 2_000
PARQUET_SUFFIXES = (".parquet", ".pq")
_HASH_MASK = (1 << 64) - 1

# Control characters that str.split() does not already treat as whitespace; whitespace ones (tab, CR, LF, VT, FF,
# \x1c-\x1f, \x85) become single spaces through the split/join in `normalise_title`.
_NON_SPACE_CONTROL = re.compile("[\x00-\x08\x0e-\x1b\x7f-\x84\x86-\x9f]")


@dataclass
class ItemBatch:
    items: list[ItemRecord]
    rejects: list[RejectedRow] = field(default_factory=list)


def normalise_title(text: str) -> str:
    """Drop control characters and collapse whitespace.

    >>> normalise_title(" Hose\\t 20\\x00m\\n")
    'Hose 20m'
    """
    if _NON_SPACE_CONTROL.search(text):
        text = _NON_SPACE_CONTROL.sub("", text)
    return " ".join(text.split())


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
    """
    if batch_size < 1:
        raise ValueError("batch_size must be at least 1")
    parquet = Path(path).suffix.lower() in PARQUET_SUFFIXES
    merger = _Merger(
        key_col=key_col,
        title_col=title_col,
        category_col=category_col,
        category_separator=category_separator,
        known_categories=known_categories,
        attribute_cols=attribute_cols,
        max_title_chars=max_title_chars,
        max_key_chars=max_key_chars,
        category_normaliser=category_normaliser,
        unit="row" if parquet else "line",
        delimiter=delimiter,
    )
    required = list(dict.fromkeys([key_col, title_col, category_col, *(attribute_cols or [])]))
    if parquet:
        rows = _parquet_rows(path, required, attribute_cols is None, batch_size)
    else:
        rows = read_csv_rows(path, required=required, delimiter=delimiter, on_bad_row=merger.bad_row)
    add = merger.add
    for line, row in rows:
        add(line, row)
        if merger.rows_in_batch >= batch_size:
            yield merger.take()
    if merger.rows_in_batch:
        yield merger.take()


class _Merger:
    """Turns rows into one batch at a time; remembers only key -> (first line, title hash) between batches.

    Rows reach it with string values (a list for a Parquet list column), already converted by the readers.
    """

    def __init__(
        self,
        *,
        key_col,
        title_col,
        category_col,
        category_separator,
        known_categories,
        attribute_cols,
        max_title_chars,
        max_key_chars,
        category_normaliser,
        unit,
        delimiter,
    ):
        self.key_col, self.title_col, self.category_col = key_col, title_col, category_col
        self.sep = category_separator
        self.known = known_categories
        self.attribute_cols = attribute_cols
        self.max_title, self.max_key = max_title_chars, max_key_chars
        self.normalise = category_normaliser
        self.unit = unit
        self.delimiter = delimiter
        self.seen: dict[str, int] = {}  # key -> first line << 64 | 64-bit title hash
        self.items: dict[str, ItemRecord] = {}
        self.rejects: list[RejectedRow] = []
        self.rows_in_batch = 0

    def take(self) -> ItemBatch:
        batch = ItemBatch(list(self.items.values()), self.rejects)
        self.items, self.rejects, self.rows_in_batch = {}, [], 0
        return batch

    def bad_row(self, line: int, reason: str, raw: str) -> None:
        self.rejects.append(RejectedRow(line, reason, None, _cut(raw)))
        self.rows_in_batch += 1

    def _reject(self, line: int, field: str, reason: str, row: dict[str, Any]) -> None:
        values = ("|".join(v) if isinstance(v, list) else v for v in row.values())
        self.rejects.append(RejectedRow(line, reason, field, _cut(render_row(values, self.delimiter))))

    def add(self, line: int, row: dict[str, Any]) -> None:
        self.rows_in_batch += 1
        key = row[self.key_col].strip()
        if not key:
            return self._reject(line, self.key_col, "empty item key", row)
        if len(key) > self.max_key:
            reason = f"item key is {len(key)} characters; the limit is {self.max_key}"
            return self._reject(line, self.key_col, reason, row)
        title = normalise_title(row[self.title_col])
        if not title:
            return self._reject(line, self.title_col, "empty title", row)
        if len(title) > self.max_title:
            reason = f"title is {len(title)} characters; the limit is {self.max_title}"
            return self._reject(line, self.title_col, reason, row)
        try:
            cats = self._categories(row[self.category_col])
        except ValueError as exc:
            return self._reject(line, self.category_col, f"bad category: {exc}", row)
        if not cats:
            return self._reject(line, self.category_col, "no category", row)
        if self.known is not None and not all(map(self.known, cats)):
            unknown = [c for c in cats if not self.known(c)]
            reason = f"unknown category {', '.join(map(repr, unknown))}"
            return self._reject(line, self.category_col, reason, row)
        # (first line, title hash) packed into one int: a tuple of two ints costs ~90 bytes more per key.
        # hash() of a str is stable within one process, which is all the merge needs.
        h = hash(title) & _HASH_MASK
        first = self.seen.get(key)
        if first is None:
            self.seen[key] = (line << 64) | h
        elif first & _HASH_MASK != h:
            reason = f"item key {key!r} was first seen on {self.unit} {first >> 64} with a different title"
            return self._reject(line, self.title_col, reason, row)
        if self.attribute_cols is None:
            core = (self.key_col, self.title_col, self.category_col)
            self.attribute_cols = [n for n in row if n not in core]  # every row has the same columns
        attrs = {}
        for n in self.attribute_cols:
            v = row[n].strip()
            if v:
                attrs[n] = v
        rec = self.items.get(key)
        if rec is None:
            self.items[key] = ItemRecord(key, title, cats, attrs, line)
            return None
        for c in cats:
            if c not in rec.category_codes:
                rec.category_codes.append(c)
        for k, v in attrs.items():
            rec.attributes.setdefault(k, v)  # the first row's value wins within a batch
        return None

    def _categories(self, value: str | list[str]) -> list[str]:
        if isinstance(value, list):  # Parquet list column
            parts = value
        elif self.sep and self.sep in value:
            parts = value.split(self.sep)
        else:
            value = value.strip()
            if self.normalise is not None and value:
                value = self.normalise(value)
            return [value] if value else []
        stripped = [p.strip() for p in parts]
        if self.normalise is not None:
            stripped = [self.normalise(p) if p else p for p in stripped]
        out = list(dict.fromkeys(stripped))  # drops repeats, keeps order
        if "" in out:
            out.remove("")
        return out


def _cut(raw: str) -> str:
    return raw if len(raw) <= RAW_LIMIT else raw[:RAW_LIMIT] + f"...[{len(raw) - RAW_LIMIT} more characters]"


def _text(value: Any) -> str:
    if value is None:
        return ""
    if isinstance(value, str):
        return value
    if isinstance(value, bytes):
        return value.decode("utf-8", errors="replace")
    return str(value)


def _parquet_rows(
    path, required: list[str], all_columns: bool, batch_size: int
) -> Iterator[tuple[int, dict[str, Any]]]:
    """Rows of a Parquet file read in record batches (never the whole table), values turned into strings."""
    import pyarrow as pa
    import pyarrow.parquet as pq

    file = str(path)
    try:
        pf = pq.ParquetFile(path)
    except (pa.ArrowInvalid, OSError) as exc:
        raise BadInput(Problem(f"not a readable Parquet file: {exc}", file=file)) from None
    names = list(pf.schema_arrow.names)
    dupes = sorted({n for n in names if names.count(n) > 1})
    if dupes:
        raise BadInput(Problem(f"duplicated column name(s): {', '.join(map(repr, dupes))}", file=file))
    missing = [r for r in required if r not in names]
    if missing:
        msg = (
            f"missing column(s) {', '.join(map(repr, missing))}; the file has: {', '.join(map(repr, names))}"
        )
        raise BadInput(Problem(msg, file=file))
    columns = names if all_columns else required
    n = 0
    try:
        for batch in pf.iter_batches(batch_size=min(batch_size, 8_192), columns=columns):
            cols = [_column_values(batch.column(i)) for i in range(batch.num_columns)]
            for values in zip(*cols):
                n += 1
                yield n, dict(zip(columns, values))
    except (pa.ArrowInvalid, OSError) as exc:
        raise BadInput(Problem(f"Parquet read failed after row {n}: {exc}", file=file)) from None


def _column_values(col: Any) -> list:
    """A column as Python strings ("" for null); list columns as lists of strings."""
    import pyarrow as pa

    values = col.to_pylist()
    t = col.type
    if pa.types.is_string(t) or pa.types.is_large_string(t):
        return ["" if v is None else v for v in values]
    if pa.types.is_list(t) or pa.types.is_large_list(t):
        return [[_text(x) for x in v] if v is not None else [] for v in values]
    return [_text(v) for v in values]
