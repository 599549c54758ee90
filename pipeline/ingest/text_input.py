"""Open CSV files the same way everywhere: strict UTF-8, a checked header, line numbers for every row.

>>> import pathlib, tempfile
>>> p = pathlib.Path(tempfile.mkdtemp()) / "t.csv"
>>> _ = p.write_bytes(b"\\xef\\xbb\\xbfcode,label\\r\\na,Alpha\\n")
>>> list(read_csv_rows(p, required=["code"]))
[(2, {'code': 'a', 'label': 'Alpha'})]

Rules (each one is a decision, so it is written down):
- Encoding is UTF-8, with or without a byte-order mark. Any other bytes stop the read with the line and the byte
  offset of the first bad byte; we never guess a legacy encoding, because a wrong guess corrupts labels silently.
- NUL bytes, a UTF-16 byte-order mark, or the magic bytes of Parquet/gzip/zip mean "not a text CSV": BadInput.
- Line endings may be LF, CRLF or CR, mixed within one file. Line numbers are physical lines (1 = header).
- Header names are trimmed of surrounding whitespace (spreadsheets add it); inner characters are kept verbatim.
  An empty or duplicated header name is BadInput, since a value under it could not be addressed.
- Blank lines and lines of only delimiters (",,,", as spreadsheets export) are skipped.
- A row shorter than the header is padded with "". A row longer than the header is a bad row unless the extra
  fields are all empty. Malformed quoting (text after a closing quote) is a bad row. A quote never closed is a bad
  row at the line where it opened and ends the read (it swallowed the rest of the file); a field over `FIELD_LIMIT`
  characters raises BadInput at once.
- Values are returned as read (not trimmed): each reader decides what to trim.
- Memory: the file is decoded one block (1 MiB, or one line if longer) at a time; nothing else is kept.
Bad rows go to `on_bad_row(line, reason, raw)` when given; otherwise they are collected and raised together as one
BadInput when the iteration ends (so a consumer that writes only after a full read never writes a partial result).
"""

from __future__ import annotations

import csv
import io
from collections.abc import Callable, Iterable, Iterator
from dataclasses import dataclass, field
from itertools import chain, compress
from os import PathLike
from typing import TYPE_CHECKING, Any, BinaryIO, NoReturn

from pipeline.errors import BadInput, Problem

if TYPE_CHECKING:  # the chunk reader's imports are loaded on first use: the other readers never need them
    import numpy as np
    import pyarrow as pa

# Generous, because one 100k-character title must not stop a file; still bounded, so an unclosed quote at the top
# of a 1 GB file fails at 64 MB instead of reading the whole file into one field.
FIELD_LIMIT = 64 * 1024 * 1024

_MAGIC = {
    b"PAR1": "a Parquet file",
    b"\x1f\x8b": "a gzip file",
    b"PK\x03\x04": "a zip file (an .xlsx workbook?)",
    b"\xff\xfe": "UTF-16 text",
    b"\xfe\xff": "UTF-16 text",
}
_BOM = b"\xef\xbb\xbf"

BadRowHandler = Callable[[int, str, str], None]


def read_csv_rows(
    path: str | PathLike[str],
    *,
    required: list[str],
    delimiter: str = ",",
    fieldnames: list[str] | None = None,
    on_bad_row: BadRowHandler | None = None,
) -> Iterator[tuple[int, dict[str, str]]]:
    """Yield (line number, row) for each data row; the header must contain every name in `required`.

    `fieldnames` given means the file has no header row: these names are used and line 1 is data.
    `on_bad_row(line, reason, raw)` receives rows that cannot be parsed; `raw` is the row's text.
    """
    file = str(path)
    problems: list[Problem] = []
    if on_bad_row is None:

        def on_bad_row(line: int, reason: str, raw: str) -> None:
            problems.append(Problem(reason, file=file, line=line))

    rows = _field_rows(path, required, delimiter, fieldnames, on_bad_row)
    names = next(rows)
    for line, fields in rows:
        yield line, dict(zip(names, fields))
    if problems:
        raise BadInput(problems)


@dataclass
class CsvChunk:
    """Consecutive entries of a CSV file as columns: `columns[j][i]` is field `names[j]` of the row read on
    physical line `lines[i]`. A row that could not be parsed is an entry too (its fields empty), so that counts
    and order stay those of the file: `bad[i] = (reason, raw)`."""

    names: list[str]
    lines: np.ndarray
    columns: list[pa.Array]
    bad: dict[int, tuple[str, str]] = field(default_factory=dict)

    def __len__(self) -> int:
        return len(self.lines)


def read_csv_chunks(
    path: str | PathLike[str], *, required: list[str], delimiter: str = ","
) -> Iterator[CsvChunk]:
    """The rows of `read_csv_rows` (same rules, same line numbers, same bad rows) as column chunks, about one per
    1 MiB block: the form a columnar reader takes without a Python object per row.

    >>> import pathlib, tempfile
    >>> p = pathlib.Path(tempfile.mkdtemp()) / "t.csv"
    >>> _ = p.write_text("code,label\\na,Alpha\\n\\nb,x,y\\nc\\n")
    >>> [(c.lines.tolist(), [col.to_pylist() for col in c.columns], c.bad) for c in read_csv_chunks(p, required=[])]
    [([2, 4, 5], [['a', '', 'c'], ['Alpha', '', '']], {1: ('row has 3 fields but the header has 2', 'b,x,y')})]

    Each block is read the cheapest way that is exact for it (profiled: the row-by-row loop cost ~3 us a row):
    Arrow's CSV parser when the block has no quote, blank line, CR outside CRLF or leading BOM character (then
    both parsers can only split lines at the delimiter); else the csv module over the whole block when every physical line is
    one row of the header's width; else row by row as `read_csv_rows` reads, and from a quoted field that runs
    past the block's end, row by row for the rest of the file.
    """
    file = str(path)
    _raise_field_limit()
    with open(path, "rb") as fh:
        blocks = _Blocks(fh, file)
        parts = iter(blocks)
        first = next(parts, None)
        reader = csv.reader(chain.from_iterable(chain([first] if first else [], parts)), delimiter=delimiter,
                            strict=True)
        names = _check_header(_first_row(reader, file), required, file, reader.line_num)
        if blocks.first_line != 1:  # a header longer than a block: read on row by row
            yield from _chained_chunks(reader, blocks, names, delimiter, file, base=0)
            return
        text, first_line = first.read(), reader.line_num + 1
        while True:
            if text:
                chunk = _arrow_chunk(text, first_line, names, delimiter)
                if chunk is None:
                    chunk = _csv_block_chunk(text, first_line, names, delimiter)
                if chunk is None:
                    chunk = _row_chunk(text, first_line, names, delimiter, blocks, file)
                if chunk is None:
                    rest = chain.from_iterable(chain([io.StringIO(text, newline="")], parts))
                    reader = csv.reader(rest, delimiter=delimiter, strict=True)
                    yield from _chained_chunks(reader, blocks, names, delimiter, file, base=first_line - 1)
                    return
                if len(chunk):
                    yield chunk
            if next(parts, None) is None:
                return
            text, first_line = blocks.text, blocks.first_line


def _arrow_chunk(text: str, first_line: int, names: list[str], delimiter: str) -> CsvChunk | None:
    """The block parsed by Arrow, or None where Arrow and the csv module might not agree."""
    import numpy as np
    import pyarrow as pa
    import pyarrow.compute as pc
    import pyarrow.csv as pacsv

    if ('"' in text or text.count("\r") != text.count("\r\n") or "\n\n" in text or "\n\r\n" in text
            or text[0] in "\r\n\ufeff" or delimiter in '"\r\n' or len(text) >= FIELD_LIMIT):
        return None  # (CR only as part of CRLF, which both parsers take as one line end)
    data = text.encode("utf-8")
    try:
        table = pacsv.read_csv(
            io.BytesIO(data),
            read_options=pacsv.ReadOptions(column_names=names, use_threads=False, block_size=len(data) + 1),
            parse_options=pacsv.ParseOptions(delimiter=delimiter, quote_char=False, double_quote=False,
                                             escape_char=False, newlines_in_values=False, ignore_empty_lines=False),
            convert_options=pacsv.ConvertOptions(column_types=dict.fromkeys(names, pa.string()),
                                                 strings_can_be_null=False, quoted_strings_can_be_null=False),
        )
    except pa.ArrowInvalid:  # a row of another width: the csv module's rules decide
        return None
    if table.num_rows != text.count("\n") + (not text.endswith("\n")):
        return None
    columns = [table.column(j).combine_chunks() for j in range(table.num_columns)]
    lines = np.arange(first_line, first_line + table.num_rows, dtype=np.int64)
    filled = np.zeros(table.num_rows, dtype=bool)
    for col in columns:
        filled |= pc.utf8_length(col).to_numpy(zero_copy_only=False) > 0
    if not filled.all():  # lines of delimiters only are skipped
        keep = pa.array(filled)
        columns, lines = [c.filter(keep) for c in columns], lines[filled]
    return CsvChunk(names, lines, columns)


def _csv_block_chunk(text: str, first_line: int, names: list[str], delimiter: str) -> CsvChunk | None:
    """The block parsed by the csv module in one call, or None unless each physical line is one row of the
    header's width (or blank)."""
    import numpy as np

    try:
        rows = list(csv.reader(io.StringIO(text, newline=""), delimiter=delimiter, strict=True))
    except csv.Error:
        return None
    if len(rows) != _count_lines(text) + (not text.endswith(("\n", "\r"))):
        return None  # a quoted line break: line numbers are not sequential
    if set(map(len, rows)) - {0, len(names)}:
        return None
    filled = list(map(any, rows))
    lines = np.arange(first_line, first_line + len(rows), dtype=np.int64)
    if not all(filled):
        rows, lines = list(compress(rows, filled)), lines[np.array(filled, dtype=bool)]
    return CsvChunk(names, lines, _columns(rows, len(names)))


def _row_chunk(text, first_line, names, delimiter, blocks, file) -> CsvChunk | None:
    """The block read row by row, or None when a quoted field runs on past its end."""
    import numpy as np

    reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter, strict=True)
    try:
        chunks = list(_chained_chunks(reader, blocks, names, delimiter, file, base=first_line - 1,
                                      open_quote=_QuoteRunsOn, chunk_rows=len(text) + 1))
    except _QuoteRunsOn:
        return None
    return chunks[0] if chunks else CsvChunk(names, np.zeros(0, dtype=np.int64), _columns([], len(names)))


class _QuoteRunsOn(Exception):
    """A quoted field is still open at the end of a block (it may close in the next one)."""


def _chained_chunks(reader, blocks, names, delimiter, file, *, base: int, open_quote=None,
                    chunk_rows: int = 8_192) -> Iterator[CsvChunk]:
    import numpy as np

    lines: list[int] = []
    rows: list[list[str]] = []
    bad: dict[int, tuple[str, str]] = {}
    width = len(names)

    def on_bad_row(line: int, reason: str, raw: str) -> None:
        bad[len(rows)] = (reason, raw)
        lines.append(line)
        rows.append([""] * width)

    for line, fields in _exact_rows(reader, blocks, width, delimiter, on_bad_row, file, base=base,
                                    open_quote=open_quote):
        lines.append(line)
        rows.append(fields)
        if len(rows) >= chunk_rows:
            yield CsvChunk(names, np.array(lines, dtype=np.int64), _columns(rows, width), bad)
            lines, rows, bad = [], [], {}
    if rows:
        yield CsvChunk(names, np.array(lines, dtype=np.int64), _columns(rows, width), bad)


def _columns(rows: list[list[str]], width: int) -> list[pa.Array]:
    import pyarrow as pa

    if not rows:
        return [pa.array([], type=pa.string()) for _ in range(width)]
    return [pa.array(c, type=pa.string()) for c in zip(*rows)]


def _field_rows(
    path: str | PathLike[str],
    required: list[str],
    delimiter: str,
    fieldnames: list[str] | None,
    on_bad_row: BadRowHandler,
) -> Iterator[Any]:
    """Yields the checked header names first, then (line, fields) with exactly as many fields as names; bad rows
    go to `on_bad_row` as they are met."""
    file = str(path)
    _raise_field_limit()
    with open(path, "rb") as fh:
        blocks = _Blocks(fh, file)
        reader = csv.reader(chain.from_iterable(blocks), delimiter=delimiter, strict=True)
        if fieldnames is None:
            header = _first_row(reader, file)
            header_line = reader.line_num
        else:
            header, header_line = list(fieldnames), 0
        names = _check_header(header, required, file, header_line)
        yield names
        yield from _exact_rows(reader, blocks, len(names), delimiter, on_bad_row, file, base=0)


def _exact_rows(reader, blocks, width: int, delimiter: str, on_bad_row: BadRowHandler, file: str, *, base: int,
                open_quote: type[Exception] | None = None) -> Iterator[tuple[int, list[str]]]:
    """The one row loop: (line, fields) of each data row of `reader`, whose line 1 is physical line base + 1.
    `open_quote` given: raise it where a quote is still open at the end of the input, instead of a bad row."""
    prev = reader.line_num
    while True:
        try:
            fields = next(reader)
        except StopIteration:
            break
        except csv.Error as exc:
            line = base + prev + 1
            if "field larger than field limit" in str(exc):
                raise BadInput(
                    Problem(f"a field is over {FIELD_LIMIT} characters (an unclosed quote?)", file=file, line=line)
                ) from None
            if "unexpected end of data" in str(exc):
                if open_quote is not None:
                    raise open_quote() from None
                on_bad_row(line, "quote opened on this line is never closed", blocks.lines(line, line))
                break
            on_bad_row(line, f"malformed CSV: {exc}", blocks.lines(line, base + reader.line_num))
            prev = reader.line_num
            continue
        line = base + prev + 1
        prev = reader.line_num
        if not fields or not any(fields):
            continue
        if len(fields) != width:
            if len(fields) < width:
                fields = fields + [""] * (width - len(fields))
            elif any(f.strip() for f in fields[width:]):
                reason = f"row has {len(fields)} fields but the header has {width}"
                on_bad_row(line, reason, render_row(fields, delimiter))
                continue
            else:
                fields = fields[:width]
        yield line, fields


def render_row(values: Iterable[str], delimiter: str = ",") -> str:
    """One row as CSV text (quoted as needed), for reject files.

    >>> render_row(["k1", "a,b", ""])
    'k1,"a,b",'
    """
    buf = io.StringIO()
    # the default "\r\n" terminator makes the writer quote fields holding CR or LF; it is cut off again
    csv.writer(buf, delimiter=delimiter).writerow(values)
    return buf.getvalue()[:-2]


def read_header(path: str | PathLike[str], *, delimiter: str = ",") -> list[str]:
    """The trimmed header names of a CSV file (same encoding checks as `read_csv_rows`)."""
    file = str(path)
    _raise_field_limit()
    with open(path, "rb") as fh:
        reader = csv.reader(chain.from_iterable(_Blocks(fh, file)), delimiter=delimiter, strict=True)
        return [h.strip() for h in _first_row(reader, file)]


def _raise_field_limit() -> None:
    # csv.field_size_limit is process-wide; we only ever raise it, never lower a limit someone else set.
    if csv.field_size_limit() < FIELD_LIMIT:
        csv.field_size_limit(FIELD_LIMIT)


def _first_row(reader: Any, file: str) -> list[str]:
    try:
        for fields in reader:
            if fields and any(f.strip() for f in fields):
                return fields
    except csv.Error as exc:
        raise BadInput(Problem(f"malformed CSV header: {exc}", file=file, line=reader.line_num)) from None
    raise BadInput(Problem("empty file: expected a header row", file=file))


def _check_header(header: list[str], required: list[str], file: str, line: int) -> list[str]:
    names = [h.strip() for h in header]
    problems: list[Problem] = []
    for i, name in enumerate(names, start=1):
        if not name:
            problems.append(Problem(f"header column {i} has no name", file=file, line=line or None, column=i))
    dupes = sorted({n for n in names if n and names.count(n) > 1})
    if dupes:
        problems.append(
            Problem(
                f"duplicated column name(s) in header: {', '.join(map(repr, dupes))}",
                file=file,
                line=line or None,
            )
        )
    missing = [r for r in required if r not in names]
    if missing:
        hints = []
        lowered = {n.lower(): n for n in names}
        for m in missing:
            if m.lower() in lowered:
                hints.append(f"{m!r} differs only in case from {lowered[m.lower()]!r}")
        msg = f"missing column(s) {', '.join(map(repr, missing))}; the header has: {', '.join(map(repr, names))}"
        if hints:
            msg += " (" + "; ".join(hints) + ")"
        problems.append(Problem(msg, file=file, line=line or None))
    if problems:
        raise BadInput(problems)
    return names


def _count_lines(data: str | bytes) -> int:
    nl, cr, crlf = ("\n", "\r", "\r\n") if isinstance(data, str) else (b"\n", b"\r", b"\r\n")
    return data.count(nl) + data.count(cr) - data.count(crlf)


class _Blocks:
    """Iterate the file as text blocks of whole lines, strictly decoded, each as a line iterator for csv.

    Decoding a megabyte at a time and letting StringIO split lines keeps the per-line work in C; per-line Python
    code made the reader several times slower than the csv module itself.
    """

    BLOCK = 1 << 20

    def __init__(self, fh: BinaryIO, file: str):
        self.fh, self.file = fh, file
        self.text = ""  # the current block, kept for `lines` (error path only)
        self.first_line = 1  # physical line number of the block's first line
        self._split: list[str] | None = None

    def __iter__(self) -> Iterator[io.StringIO]:
        fh, file = self.fh, self.file
        offset = 0  # byte offset of the start of `carry`, counting a BOM
        next_line = 1
        carry = bytearray()
        head = fh.read(self.BLOCK)
        for magic, what in _MAGIC.items():
            if head.startswith(magic):
                raise BadInput(Problem(f"this looks like {what}, not a UTF-8 CSV text file", file=file, line=1))
        if head.startswith(_BOM):
            head, offset = head[len(_BOM):], len(_BOM)
        chunk = head
        while True:
            eof = not chunk
            carry += chunk
            if eof:
                data = bytes(carry)
                carry.clear()
            else:
                # cut after the last line end; a CR counts only if a byte follows it (it may be half of a CRLF)
                cut = max(carry.rfind(b"\n"), carry.rfind(b"\r", 0, len(carry) - 1)) + 1
                if cut == 0:  # a line longer than a block: keep reading
                    chunk = fh.read(self.BLOCK)
                    continue
                data = bytes(carry[:cut])
                del carry[:cut]
            if data:
                try:
                    if b"\x00" in data:
                        raise ValueError
                    text = data.decode("utf-8")
                except ValueError:  # UnicodeDecodeError is a ValueError too
                    self._fail(data, offset, next_line)
                self.text, self.first_line, self._split = text, next_line, None
                yield io.StringIO(text, newline="")  # newline="": split on LF, CRLF and CR, keep the endings
                offset += len(data)
                next_line += _count_lines(text)
            if eof:
                return
            chunk = fh.read(self.BLOCK)

    def _fail(self, data: bytes, offset: int, first_line: int) -> NoReturn:
        """Raise BadInput at the first NUL or invalid UTF-8 byte of a bad block, naming its line and byte offset."""
        nul = data.find(b"\x00")
        try:
            data.decode("utf-8") if nul < 0 else data[:nul].decode("utf-8")
        except UnicodeDecodeError as exc:
            at = exc.start
            raise BadInput(
                Problem(
                    f"byte 0x{data[at]:02x} at byte offset {offset + at} is not valid UTF-8; expected UTF-8 "
                    "(the file may be Latin-1 or Windows-1252: re-save it as UTF-8)",
                    file=self.file,
                    line=first_line + _count_lines(data[:at]),
                )
            ) from None
        if nul >= 0:
            raise BadInput(
                Problem(
                    f"NUL byte at byte offset {offset + nul}: binary data, not a UTF-8 CSV text file",
                    file=self.file,
                    line=first_line + _count_lines(data[:nul]),
                )
            )
        raise AssertionError("_fail called on a good block")

    def lines(self, first: int, last: int) -> str:
        """Text of physical lines first..last as far as they lie in the current block (for bad-row messages)."""
        if self._split is None:
            self._split = list(io.StringIO(self.text, newline=""))
        lo = max(first - self.first_line, 0)
        return "".join(self._split[lo : last - self.first_line + 1]).rstrip("\r\n")
