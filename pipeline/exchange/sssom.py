"""SSSOM/TSV: the open standard table of mappings, written from and read back into the crosswalk.

A file is a YAML metadata block (every line starting with `#`: `curie_map`, `mapping_set_id`, `license`, ...)
followed by a tab-separated table, one mapping per row (SSSOM/TSV specification, "Structure"; identifiers are
CURIEs expanded through `curie_map`, the SSSOM built-in prefixes need no entry).

How our edges are written (one row per MAPS_TO edge):
- `predicate_id`: the edge's SKOS mapping property (`skos:exactMatch`, `skos:closeMatch`, `skos:broadMatch`,
  `skos:narrowMatch`, `skos:relatedMatch`); a `rejected` edge carries `predicate_modifier: Not`.
- `mapping_justification` (SEMAPV terms): `semapv:ManualMappingCuration` for a person's decision (accepted,
  rejected, imported); for machine edges `semapv:LexicalMatching` when the labels are equal after normalisation
  (match type exactMatch), otherwise `semapv:SemanticSimilarityThresholdMatching` (embedding cosine scores).
- `confidence`: the edge score; `author_label`/`mapping_date`/`comment`: who decided, when, and their note;
  `other`: `graftwork_status=...|graftwork_rank=...|graftwork_method=...` so a re-import knows what was unreviewed.
"""

from __future__ import annotations

import csv
import io
from dataclasses import dataclass, field
from datetime import date
from pathlib import Path

import pandas as pd
import yaml

from pipeline.errors import BadInput, Problem

SKOS_MAPPING_PROPERTIES = ("exactMatch", "closeMatch", "broadMatch", "narrowMatch", "relatedMatch")
MANUAL = "semapv:ManualMappingCuration"
LEXICAL = "semapv:LexicalMatching"
SEMANTIC = "semapv:SemanticSimilarityThresholdMatching"
DECIDED = ("accepted", "rejected")
UNSPECIFIED_LICENSE = "https://w3id.org/sssom/license/unspecified"  # SSSOM's value for "no licence stated"
COLUMNS = ["subject_id", "subject_label", "predicate_id", "predicate_modifier", "object_id", "object_label",
           "mapping_justification", "confidence", "author_label", "mapping_date", "comment", "other"]


@dataclass
class MappingSetInfo:
    """Set-level metadata of one export: the CURIE map (built-ins left out) and the descriptive slots."""

    curie_map: dict[str, str]
    mapping_set_id: str
    license: str = UNSPECIFIED_LICENSE
    title: str = ""
    description: str = ""
    tool_version: str = ""
    mapping_date: str = field(default_factory=lambda: date.today().isoformat())

    def metadata(self) -> dict:
        meta = {"curie_map": dict(sorted(self.curie_map.items())), "mapping_set_id": self.mapping_set_id,
                "mapping_set_title": self.title, "mapping_set_description": self.description,
                "license": self.license, "mapping_tool": "graftwork", "mapping_tool_version": self.tool_version,
                "mapping_date": self.mapping_date}
        return {k: v for k, v in meta.items() if v}  # SSSOM: write only the slots that have a value


def justification(status: str, method: str, match_type: str) -> str:
    if status in DECIDED or method == "imported":
        return MANUAL
    return LEXICAL if match_type == "exactMatch" else SEMANTIC


def sssom_rows(frame: pd.DataFrame) -> pd.DataFrame:
    """The mappings frame (with `subject_id`/`object_id` CURIEs) as SSSOM columns, empty columns dropped."""
    out = pd.DataFrame({
        "subject_id": frame["subject_id"],
        "subject_label": frame["source_label"],
        "predicate_id": "skos:" + frame["match_type"].astype(str),
        "predicate_modifier": ["Not" if s == "rejected" else "" for s in frame["status"]],
        "object_id": frame["object_id"],
        "object_label": frame["concept_label"],
        "mapping_justification": [justification(s, m, t) for s, m, t in
                                  zip(frame["status"], frame["method"].fillna(""), frame["match_type"])],
        "confidence": [f"{float(x):.4f}" if pd.notna(x) else "" for x in frame["score"]],
        "author_label": frame["decided_by"].fillna(""),
        "mapping_date": [str(d)[:10] if isinstance(d, str) and d else "" for d in frame["decided_at"]],
        "comment": frame["note"].fillna(""),
        "other": [f"graftwork_status={s}|graftwork_rank={int(r)}|graftwork_method={m or ''}"
                  for s, r, m in zip(frame["status"], frame["rank"], frame["method"].fillna(""))],
    })
    keep = [c for c in COLUMNS if c in ("subject_id", "predicate_id", "object_id", "mapping_justification")
            or (out[c].astype(str) != "").any()]
    return out[keep]


def write_sssom(frame: pd.DataFrame, out: str | Path, info: MappingSetInfo) -> int:
    """Write the metadata block and the table; returns the number of mappings. UTF-8, LF line ends, no BOM."""
    rows = sssom_rows(frame)
    meta = yaml.safe_dump(info.metadata(), sort_keys=False, allow_unicode=True, default_flow_style=False)
    buf = io.StringIO()
    for line in meta.splitlines():
        buf.write(f"#{line}\n")
    rows.to_csv(buf, sep="\t", index=False, lineterminator="\n", quoting=csv.QUOTE_MINIMAL)
    _write_atomic(Path(out), buf.getvalue())
    return len(rows)


@dataclass
class SssomTable:
    """A parsed SSSOM/TSV file: its metadata, CURIE map, and rows with their line numbers in the file."""

    file: str
    metadata: dict
    curie_map: dict[str, str]
    columns: list[str]
    rows: list[tuple[int, dict[str, str]]]


PROPAGATABLE = ("predicate_id", "mapping_justification", "author_label", "mapping_date", "comment",
                "predicate_modifier", "confidence")


def read_sssom(path: str | Path) -> SssomTable:
    """Parse an SSSOM/TSV file (embedded metadata). Raises BadInput naming the line for a broken block or table."""
    path = Path(path)
    name = str(path)
    try:
        text = path.read_bytes().decode("utf-8")
    except UnicodeDecodeError as exc:
        raise BadInput(Problem(f"not UTF-8 text ({exc.reason} at byte {exc.start})", file=name)) from None
    text = text.removeprefix("\ufeff")
    lines = text.splitlines(keepends=True)
    meta_lines = []
    while len(meta_lines) < len(lines) and lines[len(meta_lines)].startswith("#"):
        meta_lines.append(lines[len(meta_lines)])
    metadata = _metadata(meta_lines, name)
    curie_map = metadata.get("curie_map") or {}
    if not isinstance(curie_map, dict) or not all(isinstance(v, str) for v in curie_map.values()):
        raise BadInput(Problem("curie_map must map prefix names to IRI prefixes", file=name, field="curie_map"))
    table = "".join(lines[len(meta_lines):])
    reader = csv.reader(io.StringIO(table), delimiter="\t")
    header = next(reader, None)
    first = len(meta_lines) + 1
    if not header:
        raise BadInput(Problem("no table after the metadata block", file=name, line=first))
    header = [h.strip() for h in header]
    rows = []
    for values in reader:
        line = first + reader.line_num - 1
        if not any(v.strip() for v in values):
            continue
        if len(values) != len(header):
            raise BadInput(Problem(f"{len(values)} fields, the header has {len(header)}", file=name, line=line))
        rows.append((line, {h: v.strip() for h, v in zip(header, values)}))
    for slot in PROPAGATABLE:  # set-level value shared by every row (SSSOM/TSV "Propagation")
        if slot not in header and isinstance(metadata.get(slot), (str, int, float)):
            for _, row in rows:
                row[slot] = str(metadata[slot])
            header.append(slot)
    return SssomTable(name, metadata, {str(k): v for k, v in curie_map.items()}, header, rows)


def _metadata(meta_lines: list[str], file: str) -> dict:
    stripped = [ln[1:].rstrip("\r\n") for ln in meta_lines]
    pad = min((len(s) - len(s.lstrip(" ")) for s in stripped if s.strip()), default=0)
    try:
        meta = yaml.safe_load("\n".join(s[pad:] for s in stripped)) if stripped else {}
    except yaml.YAMLError as exc:
        mark = getattr(exc, "problem_mark", None)
        raise BadInput(Problem(f"metadata block is not valid YAML ({getattr(exc, 'problem', exc)})", file=file,
                               line=mark.line + 1 if mark else None)) from None
    if meta is None:
        return {}
    if not isinstance(meta, dict):
        raise BadInput(Problem("metadata block must be a YAML mapping", file=file, line=1))
    return meta


def _write_atomic(path: Path, text: str) -> None:
    # Write beside the target, then rename: a failed export never leaves a half-written file.
    tmp = path.with_name(path.name + ".part")
    tmp.write_text(text, encoding="utf-8", newline="")
    tmp.replace(path)
