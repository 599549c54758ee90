"""Read an existing crosswalk (SSSOM/TSV or CSV) into plain rows, each with its line, before checking the graph.

CSV columns (our `export mappings --format csv` writes them): `source_scheme` (or `--source` for the whole file),
`source_code`, `concept_code`; optional `match_type` (SKOS mapping property name, default `closeMatch`),
`status` (`accepted`/`auto` -> accepted, `rejected` -> rejected, `proposed` -> skipped as unreviewed; default
accepted), `score` or `confidence`, `note`, `decided_by`.
SSSOM/TSV: `subject_id`, `predicate_id`, `object_id` (CURIEs through the file's `curie_map`, or IRIs);
`predicate_modifier: Not` -> rejected; `confidence`, `comment`, `author_label`, `mapping_justification` are kept;
`other` containing `graftwork_status=proposed` (our own export of an unreviewed edge) -> skipped.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from pipeline.errors import BadInput, Problem
from pipeline.exchange.sssom import read_sssom
from pipeline.ingest.text_input import read_csv_rows

DEFAULT_MATCH_TYPE = "closeMatch"
CSV_STATUS = {"": "accepted", "accepted": "accepted", "auto": "accepted", "rejected": "rejected",
              "proposed": "skip"}


@dataclass
class CrosswalkRow:
    line: int
    decision: str                 # accepted | rejected | skip
    predicate: str                # SKOS property name (CSV) or the predicate as written (SSSOM)
    source: str = ""              # CSV: scheme key and code
    code: str = ""
    concept_code: str = ""
    subject: str = ""             # SSSOM: subject and object as written
    obj: str = ""
    confidence: str = ""
    note: str = ""
    author: str = ""
    justification: str = ""


@dataclass
class Crosswalk:
    file: str
    kind: str                     # "csv" | "sssom"
    rows: list[CrosswalkRow]
    curie_map: dict[str, str]


def detect_format(path: str | Path, fmt: str | None) -> str:
    if fmt:
        if fmt not in ("csv", "sssom"):
            raise BadInput(Problem(f"unknown import format {fmt!r}; use csv or sssom", field="--format"))
        return fmt
    name = Path(path).name.lower()
    return "sssom" if name.endswith((".tsv", ".sssom")) else "csv"


def read_crosswalk(path: str | Path, *, fmt: str | None = None, source: str | None = None) -> Crosswalk:
    kind = detect_format(path, fmt)
    return _read_sssom(path) if kind == "sssom" else _read_csv(path, source)


def _read_csv(path: str | Path, source: str | None) -> Crosswalk:
    required = ["source_code", "concept_code"] + ([] if source else ["source_scheme"])
    rows, problems = [], []
    for line, r in read_csv_rows(path, required=required):
        status = (r.get("status") or "").strip().lower()
        if status not in CSV_STATUS:
            problems.append(Problem(f"status {status!r} is not one of accepted, auto, rejected, proposed",
                                    file=str(path), line=line, field="status"))
            continue
        rows.append(CrosswalkRow(
            line=line, decision=CSV_STATUS[status],
            predicate=(r.get("match_type") or "").strip() or DEFAULT_MATCH_TYPE,
            source=(source or r.get("source_scheme") or "").strip(), code=(r.get("source_code") or "").strip(),
            concept_code=(r.get("concept_code") or "").strip(),
            confidence=(r.get("confidence") or r.get("score") or "").strip(), note=(r.get("note") or "").strip(),
            author=(r.get("decided_by") or "").strip(),
        ))
    if problems:
        raise BadInput(problems)
    return Crosswalk(str(path), "csv", rows, {})


def _read_sssom(path: str | Path) -> Crosswalk:
    table = read_sssom(path)
    missing = [c for c in ("subject_id", "predicate_id", "object_id") if c not in table.columns]
    if missing:
        raise BadInput(Problem(f"missing column(s) {', '.join(missing)}", file=table.file, field=missing[0]))
    rows, problems = [], []
    for line, r in table.rows:
        modifier = r.get("predicate_modifier", "")
        if modifier not in ("", "Not"):
            problems.append(Problem(f"predicate_modifier {modifier!r}: only 'Not' is defined", file=table.file,
                                    line=line, field="predicate_modifier"))
            continue
        unreviewed = "graftwork_status=proposed" in r.get("other", "").split("|")
        rows.append(CrosswalkRow(
            line=line, decision="skip" if unreviewed else ("rejected" if modifier == "Not" else "accepted"),
            predicate=r["predicate_id"], subject=r["subject_id"], obj=r["object_id"],
            confidence=r.get("confidence", ""), note=r.get("comment", ""), author=r.get("author_label", ""),
            justification=r.get("mapping_justification", ""),
        ))
    if problems:
        raise BadInput(problems)
    return Crosswalk(table.file, "sssom", rows, table.curie_map)
