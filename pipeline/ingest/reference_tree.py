"""Read a reference hierarchy from a CSV with one node per row: `code,label,parent_code`.

>>> import pathlib, tempfile
>>> p = pathlib.Path(tempfile.mkdtemp()) / "ref.csv"
>>> _ = p.write_text("code,label,parent_code\\nb,Bulbs,a\\na,Garden,\\n")
>>> [(c.code, c.pref_label, c.parent_codes, c.line) for c in read_reference_tree(p)]
[('b', 'Bulbs', ['a'], 2), ('a', 'Garden', [], 3)]

Values are trimmed; an empty parent means a top node. Children may come before their parents: the hierarchy is
checked after the whole file is read, and every problem of the file (empty codes or labels, duplicate codes, unknown
parents, cycles) is raised together as one BadInput.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from os import PathLike

from pipeline.errors import BadInput, Problem
from pipeline.ingest.hierarchy import Hierarchy, check_hierarchy
from pipeline.ingest.text_input import read_csv_rows
from pipeline.records import ConceptRecord


def read_reference_tree(
    path: str | PathLike[str],
    *,
    code_col: str = "code",
    label_col: str = "label",
    parent_col: str = "parent_code",
    alt_labels_col: str | None = None,
    definition_col: str | None = None,
    iri_col: str | None = None,
    parent_separator: str | None = None,
    alt_label_separator: str = "|",
    delimiter: str = ",",
) -> list[ConceptRecord]:
    """Concepts in file order, validated as a hierarchy.

    `parent_separator` (e.g. "|") allows several parents in one cell (SKOS allows more than one `broader`).
    Alt labels are split on `alt_label_separator`, trimmed, empty ones dropped.
    """
    extra = [c for c in (alt_labels_col, definition_col, iri_col) if c]
    rows, problems = read_tree_rows(
        path,
        code_col=code_col,
        label_col=label_col,
        parent_col=parent_col,
        extra_cols=extra,
        parent_separator=parent_separator,
        delimiter=delimiter,
    )
    concepts = []
    for r in rows:
        alts = []
        if alt_labels_col:
            alts = list(dict.fromkeys(a.strip() for a in r.extra[alt_labels_col].split(alt_label_separator)))
            alts = [a for a in alts if a]
        concepts.append(
            ConceptRecord(
                code=r.code,
                pref_label=r.label,
                parent_codes=r.parents,
                iri=r.extra[iri_col].strip() if iri_col else "",
                alt_labels=alts,
                definition=r.extra[definition_col].strip() if definition_col else "",
                line=r.line,
            )
        )
    validate_tree(rows, problems, file=str(path))
    return concepts


@dataclass
class TreeRow:
    """One trimmed row of a tree CSV."""

    line: int
    code: str
    label: str
    parents: list[str]
    extra: dict[str, str]


def read_tree_rows(
    path: str | PathLike[str],
    *,
    code_col: str,
    label_col: str,
    parent_col: str,
    extra_cols: Sequence[str] = (),
    parent_separator: str | None = None,
    delimiter: str = ",",
) -> tuple[list[TreeRow], list[Problem]]:
    """Rows with a code (label may be empty) and the row-level problems found; shared with source trees."""
    file = str(path)
    problems: list[Problem] = []
    rows: list[TreeRow] = []

    def bad_row(line: int, reason: str, raw: str) -> None:
        problems.append(Problem(reason, file=file, line=line))

    required = list(dict.fromkeys([code_col, label_col, parent_col, *extra_cols]))
    for line, row in read_csv_rows(path, required=required, delimiter=delimiter, on_bad_row=bad_row):
        code = row[code_col].strip()
        label = row[label_col].strip()
        parent_cell = row[parent_col].strip()
        if parent_separator:
            parents = [p.strip() for p in parent_cell.split(parent_separator) if p.strip()]
        else:
            parents = [parent_cell] if parent_cell else []
        if not code:
            problems.append(Problem("empty code", file=file, line=line, field=code_col))
            continue  # nothing can refer to a node without a code, so it is left out of the hierarchy check
        if not label:
            problems.append(Problem(f"empty label for code {code!r}", file=file, line=line, field=label_col))
        rows.append(TreeRow(line, code, label, parents, {c: row[c] for c in extra_cols}))
    if not rows and not problems:
        problems.append(Problem("no rows: the file has a header but no nodes", file=file))
    return rows, problems


def validate_tree(rows: list[TreeRow], problems: list[Problem], *, file: str) -> Hierarchy | None:
    """Run check_hierarchy over the rows and raise every problem (row-level and structural) together."""
    lines: dict[str, int] = {}
    for r in rows:
        if r.code in lines and lines[r.code] < 0:
            continue
        # A repeated code is reported by check_hierarchy at `lines[code]`; point it at the repeat, which is the row
        # to fix (negative marks "already repeated" while building, so the first repeat wins).
        lines[r.code] = -r.line if r.code in lines else r.line
    lines = {c: abs(n) for c, n in lines.items()}
    hierarchy = None
    try:
        hierarchy = check_hierarchy([(r.code, r.label, r.parents) for r in rows], file=file, lines=lines)
    except BadInput as exc:
        problems = problems + exc.problems
    if problems:
        problems.sort(key=lambda p: (p.line is None, p.line or 0))
        raise BadInput(problems)
    return hierarchy
