"""Item rows validated and merged a batch at a time as Arrow columns, with no Python object per row.

The rules and the batch contract are those written in `items_reader` (which wraps this module into ItemRecords);
this module is the one implementation of them. Profiled on the small benchmark workload (50,000 rows): the
row-by-row reader took 2.2 s and the writer's per-row lists and JSON 1.5 s, against 2.5 s for the engine's own
COPY and commit of the same rows; read this way, the same rows take 0.2-0.4 s (blocks parsed by Arrow, or by the
csv module in one call, then per-batch Arrow kernels).

>>> import pathlib, tempfile
>>> p = pathlib.Path(tempfile.mkdtemp()) / "items.csv"
>>> _ = p.write_text("item_key,title,category,colour\\nk1,Hose,g|w,green\\nk2,,g,\\nk1,Hose,t,\\n")
>>> [b] = read_item_columns(p)
>>> b.keys.to_pylist(), b.attributes.to_pylist(), b.link_item.tolist(), b.link_category.to_pylist()
(['k1'], ['{"colour": "green"}'], [0, 0, 0], ['g', 'w', 't'])
>>> [(r.line, r.field, r.reason) for r in b.rejects]
[(3, 'title', 'empty title')]

Exactness: every vector shortcut is checked against the plain Python rule it replaces (tests/test_item_columns.py
runs both on random rows): Arrow trims exactly Python's `str.strip()` whitespace set; titles are normalised with
`normalise_title` itself, only for the rows a regular expression finds not normal already; JSON attributes are
built by string concatenation only for values `json.dumps` would not escape, and by `json.dumps` otherwise.
"""

from __future__ import annotations

import json
import operator
import re
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from itertools import repeat
from os import PathLike
from pathlib import Path
from typing import Any

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

from pipeline.errors import BadInput, Problem
from pipeline.ingest.text_input import read_csv_chunks, render_row
from pipeline.records import RejectedRow

RAW_LIMIT = 2_000
PARQUET_SUFFIXES = (".parquet", ".pq")
_HASH_MASK = (1 << 64) - 1

# Every character for which Python's str.isspace() is true (what str.strip() and str.split() remove); written out
# because computing it over all code points at import costs 0.1 s. tests/test_item_columns.py checks the list.
PY_WHITESPACE = (
    "\t\n\x0b\x0c\r\x1c\x1d\x1e\x1f \x85\xa0\u1680\u2000\u2001\u2002\u2003\u2004\u2005\u2006\u2007\u2008\u2009"
    "\u200a\u2028\u2029\u202f\u205f\u3000"
)
# Control characters that str.split() does not already treat as whitespace; whitespace ones (tab, CR, LF, VT, FF,
# \x1c-\x1f, \x85) become single spaces through the split/join in `normalise_title`.
_NON_SPACE_CONTROL = re.compile("[\x00-\x08\x0e-\x1b\x7f-\x84\x86-\x9f]")
# A title `normalise_title` would change: an edge space, two spaces, any other whitespace or a control character
# (RE2 syntax, for Arrow). A title matching none of these is returned unchanged by it.
_NOT_NORMAL = (
    r"^ | $|  |[\x{0}-\x{1f}\x{7f}-\x{9f}\x{a0}\x{1680}\x{2000}-\x{200a}\x{2028}\x{2029}\x{202f}\x{205f}"
    r"\x{3000}]"
)
# A value json.dumps(ensure_ascii=False) escapes: a quote, a backslash or a control character below U+0020.
_JSON_ESCAPED = r'["\\\x{0}-\x{1f}]'


def normalise_title(text: str) -> str:
    """Drop control characters and collapse whitespace.

    >>> normalise_title(" Hose\\t 20\\x00m\\n")
    'Hose 20m'
    """
    if _NON_SPACE_CONTROL.search(text):
        text = _NON_SPACE_CONTROL.sub("", text)
    return " ".join(text.split())


@dataclass
class ItemColumns:
    """One batch: one entry per distinct item key (in the order of its first accepted row), its FILED_UNDER codes
    as (item index, code) pairs grouped by item in first-seen order, and the batch's rejects in line order."""

    keys: pa.Array
    titles: pa.Array
    attributes: pa.Array  # JSON text, keys sorted (json.dumps(..., ensure_ascii=False, sort_keys=True))
    lines: np.ndarray  # first accepted row of each item in this batch
    continued: np.ndarray  # bool: the key's rows began in an earlier batch (the item was written already)
    link_item: np.ndarray  # int64 index into `keys`
    link_category: pa.Array
    rejects: list[RejectedRow] = field(default_factory=list)

    def __len__(self) -> int:
        return len(self.keys)


def read_item_columns(
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
) -> Iterator[ItemColumns]:
    """Yield ItemColumns batches of a CSV or Parquet item file (rules and contract: `items_reader`).

    `known_categories` and `category_normaliser` are called once per distinct value of a batch, so they must
    give the same answer for the same value (a set's `__contains__`, `source_taxonomy.path_code`).
    """
    if batch_size < 1:
        raise ValueError("batch_size must be at least 1")
    parquet = Path(path).suffix.lower() in PARQUET_SUFFIXES
    required = list(dict.fromkeys([key_col, title_col, category_col, *(attribute_cols or [])]))
    chunks = (
        _parquet_chunks(path, required, attribute_cols is None, batch_size)
        if parquet
        else _csv_chunks(path, required, delimiter)
    )
    merger = _Merger(
        key_col=key_col, title_col=title_col, category_col=category_col, category_separator=category_separator,
        known_categories=known_categories, attribute_cols=attribute_cols, max_title_chars=max_title_chars,
        max_key_chars=max_key_chars, category_normaliser=category_normaliser, unit="row" if parquet else "line",
        delimiter=delimiter,
    )
    for names, columns, lines, bad, last in _cut_batches(chunks, batch_size):
        yield merger.batch(names, columns, lines, bad, last=last)


# -- entries: (names, {name: values}, lines, {index: (reason, raw)}) ----------------------------------------------


def _csv_chunks(path, required: list[str], delimiter: str):
    for chunk in read_csv_chunks(path, required=required, delimiter=delimiter):
        yield chunk.names, dict(zip(chunk.names, chunk.columns)), chunk.lines, chunk.bad


def _cut_batches(chunks, batch_size: int):
    """Regroup chunks into batches as the row-by-row reader cut them: a batch closes on the first good row that
    brings it to `batch_size` entries (rows that failed to parse count, but never close one), and the rest of
    the file makes the last batch (flagged, so that nothing is remembered for batches that never come)."""
    names: list[str] | None = None
    parts: list[tuple[dict[str, pa.Array], np.ndarray]] = []
    held = 0
    bad: dict[int, tuple[str, str]] = {}
    for chunk_names, columns, chunk_lines, chunk_bad in chunks:
        names = chunk_names
        bad.update((held + i, v) for i, v in chunk_bad.items())
        parts.append((columns, chunk_lines))
        held += len(chunk_lines)
        while True:
            end = batch_size - 1
            while end in bad:
                end += 1
            if end >= held:
                break
            end += 1
            columns, lines = _joined(names, parts)
            yield (names, {n: c.slice(0, end) for n, c in columns.items()}, lines[:end],
                   {i: v for i, v in bad.items() if i < end}, False)
            parts = [({n: c.slice(end) for n, c in columns.items()}, lines[end:])]
            held -= end
            bad = {i - end: v for i, v in bad.items() if i >= end}
    if held:
        columns, lines = _joined(names, parts)
        yield names, columns, lines, bad, True


def _joined(names, parts):
    if len(parts) == 1:
        return parts[0]
    columns = {n: pa.concat_arrays([p[0][n] for p in parts]) for n in names}
    return columns, np.concatenate([p[1] for p in parts])


def _parquet_chunks(path, required: list[str], all_columns: bool, batch_size: int):
    """A Parquet file in record batches (never the whole table), values turned into Python strings."""
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
        msg = f"missing column(s) {', '.join(map(repr, missing))}; the file has: {', '.join(map(repr, names))}"
        raise BadInput(Problem(msg, file=file))
    columns = names if all_columns else required
    n = 0
    try:
        for batch in pf.iter_batches(batch_size=min(batch_size, 8_192), columns=columns):
            values = {name: _column_array(batch.column(i)) for i, name in enumerate(columns)}
            yield columns, values, np.arange(n + 1, n + 1 + batch.num_rows, dtype=np.int64), {}
            n += batch.num_rows
    except (pa.ArrowInvalid, OSError) as exc:
        raise BadInput(Problem(f"Parquet read failed after row {n}: {exc}", file=file)) from None


def _text(value: Any) -> str:
    if value is None:
        return ""
    if isinstance(value, str):
        return value
    if isinstance(value, bytes):
        return value.decode("utf-8", errors="replace")
    return str(value)


def _column_array(col: Any) -> pa.Array:
    """A column as strings ("" for null; other types as Python's str() writes them); list columns as lists of
    strings."""
    t = col.type
    if pa.types.is_string(t):
        return pc.fill_null(col, "")
    if pa.types.is_list(t) or pa.types.is_large_list(t):
        values = [[_text(x) for x in v] if v is not None else [] for v in col.to_pylist()]
        return pa.array(values, type=pa.list_(pa.string()))
    return _strings([_text(v) for v in col.to_pylist()])


def _cut(raw: str) -> str:
    return raw if len(raw) <= RAW_LIMIT else raw[:RAW_LIMIT] + f"...[{len(raw) - RAW_LIMIT} more characters]"


def _strings(values) -> pa.Array:
    return values if isinstance(values, pa.Array) else pa.array(values, type=pa.string())


def _trim(arr: pa.Array) -> pa.Array:
    return pc.utf8_trim(arr, characters=PY_WHITESPACE)


class _Merger:
    """Validates and merges one batch at a time; remembers only key -> (first line, title hash) between batches.

    (first line, title hash) is packed into one int: a tuple of two ints costs ~90 bytes more per key. hash() of
    a str is stable within one process, which is all the merge needs.
    """

    def __init__(self, *, key_col, title_col, category_col, category_separator, known_categories, attribute_cols,
                 max_title_chars, max_key_chars, category_normaliser, unit, delimiter):
        self.key_col, self.title_col, self.category_col = key_col, title_col, category_col
        self.sep = category_separator
        self.known = known_categories
        self.attribute_cols = list(dict.fromkeys(attribute_cols)) if attribute_cols is not None else None
        self.max_title, self.max_key = max_title_chars, max_key_chars
        self.normalise = category_normaliser
        self.unit = unit
        self.delimiter = delimiter
        self.seen: dict[str, int] = {}

    def batch(self, names: list[str], columns: dict[str, pa.Array], lines: np.ndarray,
              bad: dict[int, tuple[str, str]], *, last: bool = False) -> ItemColumns:
        n = len(lines)
        line_of = np.asarray(lines, dtype=np.int64)
        rejected: dict[int, tuple[str | None, str]] = {}  # entry -> (field, reason)
        alive = np.ones(n, dtype=bool)
        if bad:
            alive[list(bad)] = False

        def reject(mask: np.ndarray, fld: str, reason: Callable[[int], str]) -> None:
            for i in np.flatnonzero(mask & alive).tolist():
                rejected[i] = (fld, reason(i))
            alive[mask] = False

        keys = _trim(_strings(columns[self.key_col]))
        key_len = pc.utf8_length(keys).to_numpy(zero_copy_only=False)
        reject(key_len == 0, self.key_col, lambda i: "empty item key")
        reject(key_len > self.max_key, self.key_col,
               lambda i: f"item key is {key_len[i]} characters; the limit is {self.max_key}")
        titles = self._titles(columns[self.title_col])
        title_len = pc.utf8_length(titles).to_numpy(zero_copy_only=False)
        reject(title_len == 0, self.title_col, lambda i: "empty title")
        reject(title_len > self.max_title, self.title_col,
               lambda i: f"title is {title_len[i]} characters; the limit is {self.max_title}")
        parent, codes = self._category_parts(columns[self.category_col], alive, reject)
        has_code = np.bincount(parent, minlength=n) > 0
        reject(~has_code, self.category_col, lambda i: "no category")
        if self.known is not None and len(codes):
            self._reject_unknown(parent, codes, alive, reject)
        accepted, continued_rows = self._claim_keys(keys, titles, line_of, alive, reject, remember=not last)
        out = self._merge(keys, titles, line_of, columns, names, accepted, continued_rows, parent, codes)
        out.rejects = [self._reject_row(i, int(lines[i]), names, columns, rejected, bad)
                       for i in sorted([*rejected, *bad])]
        return out

    # -- rules ------------------------------------------------------------------------------------------------
    def _titles(self, values) -> pa.Array:
        arr = _strings(values)
        fix = np.flatnonzero(pc.match_substring_regex(arr, pattern=_NOT_NORMAL).to_numpy(zero_copy_only=False))
        if len(fix) == 0:
            return arr
        values = arr.to_pylist()
        for i in fix.tolist():
            values[i] = normalise_title(values[i])
        return _strings(values)

    def _category_parts(self, values: pa.Array, alive: np.ndarray, reject) -> tuple[np.ndarray, pa.Array]:
        """(row index, code) of every category of the rows still alive, trimmed, normalised, without repeats
        within a row or empty codes, in row and then cell order."""
        idx = np.flatnonzero(alive)
        if pa.types.is_list(values.type):  # Parquet list column
            lists = values.take(pa.array(idx))
        else:
            cells = _strings(values).take(pa.array(idx))
            if self.sep:
                lists = pc.split_pattern(cells, self.sep)
            else:
                lists = pa.ListArray.from_arrays(pa.array(np.arange(len(cells) + 1, dtype=np.int32)), cells)
        parent = idx[pc.list_parent_indices(lists).to_numpy(zero_copy_only=False)]
        parts = _trim(pc.list_flatten(lists))
        if self.normalise is not None and len(parts):
            parts, errors = self._normalised(parts)
            if errors is not None:
                bad_at = np.flatnonzero(pc.is_valid(errors).to_numpy(zero_copy_only=False))
                rows, first = np.unique(parent[bad_at], return_index=True)
                message = dict(zip(rows.tolist(), errors.take(pa.array(bad_at[first])).to_pylist()))
                mask = np.zeros(len(alive), dtype=bool)
                mask[rows] = True
                reject(mask, self.category_col, lambda i: f"bad category: {message[i]}")
                keep = alive[parent]
                parent, parts = parent[keep], parts.filter(pa.array(keep))
        # drop empty codes and repeats within a row, keeping the first of each
        enc = pc.dictionary_encode(parts)
        ids = enc.indices.to_numpy(zero_copy_only=False).astype(np.int64)
        width = max(len(enc.dictionary), 1)
        _, first = np.unique(parent * width + ids, return_index=True)
        first.sort()
        empty = pc.index(enc.dictionary, "").as_py()
        if empty >= 0:
            first = first[ids[first] != empty]
        return parent[first], parts.take(pa.array(first))

    def _normalised(self, parts: pa.Array) -> tuple[pa.Array, pa.Array | None]:
        uniq = pc.unique(parts)
        mapped: list[str] = []
        errors: list[str | None] = []
        for value in uniq.to_pylist():
            try:
                mapped.append(self.normalise(value) if value else value)
                errors.append(None)
            except ValueError as exc:
                mapped.append("")
                errors.append(str(exc))
        at = pc.index_in(parts, value_set=uniq)
        err = _strings(errors).take(at) if any(e is not None for e in errors) else None
        return _strings(mapped).take(at), err

    def _reject_unknown(self, parent: np.ndarray, codes: pa.Array, alive: np.ndarray, reject) -> None:
        uniq = pc.unique(codes)
        unknown_set = pa.array([c for c in uniq.to_pylist() if not self.known(c)], type=pa.string())
        if len(unknown_set) == 0:
            return
        unknown_at = pc.is_in(codes, value_set=unknown_set).to_numpy(zero_copy_only=False)
        names: dict[int, list[str]] = {}
        for row, code in zip(parent[unknown_at].tolist(), codes.filter(pa.array(unknown_at)).to_pylist()):
            names.setdefault(row, []).append(code)
        mask = np.zeros(len(alive), dtype=bool)
        mask[list(names)] = True
        reject(mask, self.category_col, lambda i: f"unknown category {', '.join(map(repr, names[i]))}")

    def _claim_keys(self, keys, titles, line_of, alive, reject, *, remember: bool) -> tuple[np.ndarray, np.ndarray]:
        """The first accepted row of a key fixes its title for the whole file; a later row with another title
        is rejected naming that first line. Returns the accepted rows and whether each one's key is a
        continuation from an earlier batch. `remember=False` (the file's last batch): new keys are not kept."""
        cand = np.flatnonzero(alive)
        if len(cand) == 0:
            return cand, np.zeros(0, dtype=bool)
        take = pa.array(cand)
        enc = pc.dictionary_encode(keys.take(take))
        ids = enc.indices.to_numpy(zero_copy_only=False)
        _, first = np.unique(ids, return_index=True)  # ids are numbered in first-occurrence order
        cand_titles = titles.take(take)
        if self.seen or remember:
            uniq_keys = enc.dictionary.to_pylist()
            prev = list(map(self.seen.get, uniq_keys))
            old = np.fromiter(map(operator.is_not, prev, repeat(None)), dtype=bool, count=len(prev))
        else:  # a one-batch file: nothing earlier to compare with, nothing later to remember for
            uniq_keys = _Lazy(enc.dictionary)
            old = np.zeros(len(enc.dictionary), dtype=bool)
        conflict_line: dict[int, int] = {}
        # keys new in this batch: compare with the title of the key's first row here
        differs = pc.not_equal(cand_titles, cand_titles.take(pa.array(first[ids]))).to_numpy(zero_copy_only=False)
        for j in np.flatnonzero(differs & ~old[ids]).tolist():
            conflict_line[int(cand[j])] = int(line_of[cand[first[ids[j]]]])
        # keys from earlier batches: compare with the remembered title hash
        if old.any():
            at = np.flatnonzero(old[ids])
            for j, title in zip(at.tolist(), cand_titles.take(pa.array(at)).to_pylist()):
                packed = prev[ids[j]]
                if packed & _HASH_MASK != hash(title) & _HASH_MASK:
                    conflict_line[int(cand[j])] = packed >> 64
        if remember:
            new_ids = np.flatnonzero(~old)
            new_first = first[new_ids]
            first_titles = cand_titles.take(pa.array(new_first)).to_pylist()
            first_lines = line_of[cand[new_first]].tolist()
            # (line << 64) | (hash & mask), with C-level maps: a Python loop here was a third of this method
            packed = map(operator.or_, map(operator.lshift, first_lines, repeat(64)),
                         map(operator.and_, map(hash, first_titles), repeat(_HASH_MASK)))
            self.seen.update(zip(map(uniq_keys.__getitem__, new_ids.tolist()), packed))
        continued = old[ids]
        if conflict_line:
            mask = np.zeros(len(alive), dtype=bool)
            mask[list(conflict_line)] = True
            key_at = dict(zip(cand.tolist(), ids.tolist()))
            reject(mask, self.title_col,
                   lambda i: f"item key {uniq_keys[key_at[i]]!r} was first seen on {self.unit} {conflict_line[i]} "
                             "with a different title")
            keep = alive[cand]
            cand, continued = cand[keep], continued[keep]
        return cand, continued

    # -- merge ------------------------------------------------------------------------------------------------
    def _merge(self, keys, titles, line_of, columns, names, accepted, continued_rows, parent, codes) -> ItemColumns:
        take = pa.array(accepted)
        enc = pc.dictionary_encode(keys.take(take))
        item_of = enc.indices.to_numpy(zero_copy_only=False).astype(np.int64)
        _, first = np.unique(item_of, return_index=True)
        single = len(first) == len(accepted)  # no key repeats within the batch (the common case)
        row_item = np.full(len(line_of), -1, dtype=np.int64)
        row_item[accepted] = item_of
        link_item = row_item[parent]
        keep = link_item >= 0
        link_item, link_codes = link_item[keep], codes.filter(pa.array(keep))
        if not single and len(link_item):
            enc_codes = pc.dictionary_encode(link_codes)
            cid = enc_codes.indices.to_numpy(zero_copy_only=False).astype(np.int64)
            _, once = np.unique(link_item * max(len(enc_codes.dictionary), 1) + cid, return_index=True)
            once.sort()
            order = once[np.argsort(link_item[once], kind="stable")]
            link_item, link_codes = link_item[order], link_codes.take(pa.array(order))
        if self.attribute_cols is None:
            core = (self.key_col, self.title_col, self.category_col)
            self.attribute_cols = [c for c in names if c not in core]
        attributes = self._attributes(columns, accepted, item_of, first, single)
        first_rows = pa.array(accepted[first])
        return ItemColumns(
            keys=enc.dictionary,
            titles=titles.take(first_rows),
            attributes=attributes,
            lines=line_of[accepted[first]],
            continued=continued_rows[first],
            link_item=link_item,
            link_category=link_codes,
        )

    def _attributes(self, columns, accepted, item_of, first, single) -> pa.Array:
        """Per item, JSON of its non-empty trimmed attribute values; within a batch the first row's value of an
        attribute wins."""
        m = len(first)
        parts = []
        take = pa.array(accepted)
        for name in sorted(self.attribute_cols):
            values = _trim(_strings(columns[name]).take(take))
            filled = (pc.utf8_length(values).to_numpy(zero_copy_only=False) > 0)
            if single:
                per_item = values
                present = filled
            else:
                items_with, at = np.unique(item_of[filled], return_index=True)
                rows = np.flatnonzero(filled)[at]
                pick = np.zeros(m, dtype=np.int64)
                pick[items_with] = rows
                present = np.zeros(m, dtype=bool)
                present[items_with] = True
                per_item = values.take(pa.array(pick))
            if not present.any():
                continue
            encoded = _json_strings(per_item)
            head = ", " + json.dumps(name, ensure_ascii=False) + ": "
            piece = pc.binary_join_element_wise(head, encoded, "")
            parts.append(pc.if_else(pa.array(present), piece, ""))
        if not parts:
            return _strings(["{}"] * m)
        body = pc.binary_join_element_wise(*parts, "") if len(parts) > 1 else parts[0]
        return pc.binary_join_element_wise("{", pc.utf8_slice_codeunits(body, 2), "}", "")

    def _reject_row(self, i, line, names, columns, rejected, bad) -> RejectedRow:
        if i in bad:
            reason, raw = bad[i]
            return RejectedRow(line, reason, None, _cut(raw))
        fld, reason = rejected[i]
        values = ("|".join(v) if isinstance(v, list) else v for v in (columns[n][i].as_py() for n in names))
        return RejectedRow(line, reason, fld, _cut(render_row(values, self.delimiter)))


class _Lazy:
    """Index access to an Arrow string array as Python strings, one at a time (for the few keys a message needs)."""

    def __init__(self, arr: pa.Array):
        self.arr = arr

    def __getitem__(self, i: int) -> str:
        return self.arr[i].as_py()


def _json_strings(values: pa.Array) -> pa.Array:
    """Each value as a JSON string literal, as json.dumps(value, ensure_ascii=False) writes it."""
    special = pc.match_substring_regex(values, pattern=_JSON_ESCAPED).to_numpy(zero_copy_only=False)
    quoted = pc.binary_join_element_wise('"', values, '"', "")
    if not special.any():
        return quoted
    py = quoted.to_pylist()
    for i in np.flatnonzero(special).tolist():
        py[i] = json.dumps(values[i].as_py(), ensure_ascii=False)
    return _strings(py)
