"""Read a source taxonomy in one of three shapes: a tree CSV, a list of paths, or a flat list of tags.

>>> import pathlib, tempfile
>>> p = pathlib.Path(tempfile.mkdtemp()) / "paths.csv"
>>> _ = p.write_text("path\\nGarden > Tools > Pruners\\n")
>>> [(c.code, c.label, c.parent_code) for c in read_source_taxonomy(p, fmt="paths").categories]
[('Garden', 'Garden', None), ('Garden > Tools', 'Tools', 'Garden'), ('Garden > Tools > Pruners', 'Pruners', 'Garden > Tools')]

Formats:
- "tree": CSV `code,label,parent_code`, one node per row, children may precede parents (as reference trees).
- "paths": one path per row in `path_col`, such as `Garden > Tools > Pruners`. Every prefix becomes a category
  whose code is the normalised full path: the path split on `separator` (surrounding spaces of the separator are
  not significant, so `A>B` and `A > B` are one path), each segment trimmed, re-joined with " > ". So codes are
  stable across files whatever the separator and spacing. Label = last segment. Repeated paths are the same node.
  An empty segment (`Garden >  > Tools`) is a problem. A segment containing " > " is a problem (it would make codes
  ambiguous). Explicit codes: when the file also has a `code_col` column, a non-empty value there is the code of
  that row's leaf (the full path of the row); prefixes without an explicit code keep their path code. One path
  given two different explicit codes is a problem; one explicit code used for two paths is a duplicate code.
- "tags": one tag per row in `tag_col`, flat (no parents); code = the tag trimmed, label = the same text (case
  kept); repeated tags collapse to one category, first spelling and line kept.
For "paths" and "tags" a file may also be a bare list without a header: with `header=None` (auto) a one-column file
whose first line is not the column name (compared case-insensitively) is read as data from line 1.
All problems of a file are raised together as one BadInput; nothing is returned from a file with problems.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from os import PathLike

from pipeline.errors import BadInput, Problem
from pipeline.ingest.hierarchy import Hierarchy
from pipeline.ingest.reference_tree import TreeRow, read_tree_rows, validate_tree
from pipeline.ingest.text_input import read_csv_rows, read_header
from pipeline.records import CategoryRecord

PATH_JOINER = " > "
FORMATS = ("tree", "paths", "tags")


@dataclass
class SourceTaxonomy:
    categories: list[CategoryRecord]  # validated with check_hierarchy (codes unique, parents exist, acyclic)
    hierarchy: Hierarchy | None = field(
        default=None, repr=False
    )  # depth and label paths, from the same check


def read_source_taxonomy(
    path: str | PathLike[str],
    *,
    fmt: str,
    code_col: str = "code",
    label_col: str = "label",
    parent_col: str = "parent_code",
    path_col: str = "path",
    separator: str = " > ",
    tag_col: str = "tag",
    header: bool | None = None,
    delimiter: str = ",",
) -> SourceTaxonomy:
    """Read `path` as a "tree", "paths" or "tags" taxonomy (see the module docstring for each)."""
    file = str(path)
    if fmt == "tree":
        rows, problems = read_tree_rows(
            path, code_col=code_col, label_col=label_col, parent_col=parent_col, delimiter=delimiter
        )
    elif fmt == "paths":
        rows, problems = _path_rows(path, path_col, code_col, separator, header, delimiter)
    elif fmt == "tags":
        rows, problems = _tag_rows(path, tag_col, header, delimiter)
    else:
        raise BadInput(
            Problem(f"unknown taxonomy format {fmt!r}; expected one of {', '.join(FORMATS)}", file=file)
        )
    hierarchy = validate_tree(rows, problems, file=file)
    cats = [CategoryRecord(r.code, r.label, r.parents[0] if r.parents else None, r.line) for r in rows]
    return SourceTaxonomy(categories=cats, hierarchy=hierarchy)


def path_segments(text: str, separator: str = " > ") -> list[str]:
    """Trimmed segments of a path; empty segments are kept (as "") so callers can report them.

    >>> path_segments(" Garden>Tools  > Pruners ")
    ['Garden', 'Tools', 'Pruners']
    """
    core = separator.strip() or separator
    return [s.strip() for s in text.split(core)]


def path_code(text: str, separator: str = " > ") -> str:
    """The stable category code of a path, as `read_source_taxonomy(fmt="paths")` makes it.

    Useful for items files that name categories by path. Raises ValueError on an empty segment.

    >>> path_code("Garden/ Tools", separator="/")
    'Garden > Tools'
    """
    segs = path_segments(text, separator)
    if any(not s for s in segs):
        raise ValueError(f"empty segment in path {text!r}")
    return PATH_JOINER.join(segs)


def _columns(path, wanted: str, header: bool | None, delimiter: str) -> tuple[list[str] | None, list[str]]:
    """(fieldnames to pass for a headerless file or None, the column names)."""
    names = read_header(path, delimiter=delimiter)
    if header is False or (header is None and len(names) == 1 and names[0].lower() != wanted.lower()):
        return [wanted], [wanted]
    return None, names


def _path_rows(path, path_col, code_col, separator, header, delimiter) -> tuple[list[TreeRow], list[Problem]]:
    file = str(path)
    fieldnames, names = _columns(path, path_col, header, delimiter)
    has_code = fieldnames is None and code_col in names and code_col != path_col
    problems: list[Problem] = []
    nodes: dict[str, TreeRow] = {}  # path code -> node, in first-mention order (so parents come first)
    explicit: dict[str, tuple[str, int]] = {}  # path code -> (explicit code, line)

    def bad_row(line: int, reason: str, raw: str) -> None:
        problems.append(Problem(reason, file=file, line=line))

    for line, row in read_csv_rows(
        path, required=[path_col], delimiter=delimiter, fieldnames=fieldnames, on_bad_row=bad_row
    ):
        text = row[path_col]
        segs = path_segments(text, separator)
        if not text.strip():
            problems.append(Problem("empty path", file=file, line=line, field=path_col))
            continue
        if any(not s for s in segs):
            where = ", ".join(str(i) for i, s in enumerate(segs, start=1) if not s)
            problems.append(
                Problem(
                    f"empty segment (number {where}) in path {text.strip()!r}",
                    file=file,
                    line=line,
                    field=path_col,
                )
            )
            continue
        if separator.strip() != PATH_JOINER.strip() and any(PATH_JOINER in s for s in segs):
            problems.append(
                Problem(
                    f"a segment of {text.strip()!r} contains {PATH_JOINER!r}, which codes use",
                    file=file,
                    line=line,
                    field=path_col,
                )
            )
            continue
        parent = None
        for i in range(1, len(segs) + 1):
            pc = PATH_JOINER.join(segs[:i])
            if pc not in nodes:
                nodes[pc] = TreeRow(line, pc, segs[i - 1], [parent] if parent else [], {})
            parent = pc
        code = row[code_col].strip() if has_code else ""
        if code:
            leaf = parent
            if leaf in explicit and explicit[leaf][0] != code:
                first_code, first_line = explicit[leaf]
                problems.append(
                    Problem(
                        f"path {leaf!r} has code {code!r} here but {first_code!r} on line {first_line}",
                        file=file,
                        line=line,
                        field=code_col,
                    )
                )
            else:
                explicit.setdefault(leaf, (code, line))
    # Explicit codes are applied after the whole file is read, since a prefix may be given its code on a later row.
    rows = []
    for pc, node in nodes.items():
        code, line = explicit.get(pc, (pc, node.line))
        parents = [explicit.get(p, (p, 0))[0] for p in node.parents]
        rows.append(TreeRow(line, code, node.label, parents, {}))
    if not rows and not problems:
        problems.append(Problem("no rows: the file has no paths", file=file))
    return rows, problems


def _tag_rows(path, tag_col, header, delimiter) -> tuple[list[TreeRow], list[Problem]]:
    file = str(path)
    fieldnames, _names = _columns(path, tag_col, header, delimiter)
    problems: list[Problem] = []
    seen: dict[str, TreeRow] = {}

    def bad_row(line: int, reason: str, raw: str) -> None:
        problems.append(Problem(reason, file=file, line=line))

    for line, row in read_csv_rows(
        path, required=[tag_col], delimiter=delimiter, fieldnames=fieldnames, on_bad_row=bad_row
    ):
        tag = row[tag_col].strip()
        if not tag:
            problems.append(Problem("empty tag", file=file, line=line, field=tag_col))
        elif tag not in seen:
            seen[tag] = TreeRow(line, tag, tag, [], {})
    if not seen and not problems:
        problems.append(Problem("no rows: the file has no tags", file=file))
    return list(seen.values()), problems
