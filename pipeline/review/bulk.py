"""Bulk review through a spreadsheet: export a queue to CSV, fill the `decision` column, import it back.

The sheet has one row per (category, candidate) — a category without candidates gets one row with an empty
concept — and the columns a person fills: `decision` (accept, reject, remap, reopen; empty = no decision),
`concept_code` (change it to map elsewhere; a label works too) and `note`. Every row carries the sheet's `batch`
id; a row is applied at most once (its key is the batch, the row's decision and target), so a sheet that is
imported again — after fixing the rows reported as invalid — applies only what it did not apply before.

>>> SHEET_COLUMNS[:4]
['batch', 'queue', 'source', 'category_code']
"""

from __future__ import annotations

import csv
import hashlib
import io
import secrets
from datetime import datetime, timezone
from pathlib import Path

from pipeline.errors import BadInput, Problem
from pipeline.review.decisions import ACTIONS, Decision, apply_decisions, problem_dict
from pipeline.review.queues import QueueEntry
from pipeline.store import Store

SHEET_COLUMNS = ["batch", "queue", "source", "category_code", "category_label", "category_path", "items",
                 "titles", "reason", "rank", "concept_code", "concept_label", "concept_path", "score", "status",
                 "match_type", "evidence", "decision", "note"]
REQUIRED = ("source", "category_code", "concept_code", "decision")


def new_batch_id() -> str:
    return datetime.now(timezone.utc).strftime("sheet-%Y%m%dT%H%M%S-") + secrets.token_hex(3)


def sheet_rows(entries: list[QueueEntry], *, batch: str | None = None) -> list[dict]:
    batch = batch or new_batch_id()
    rows = []
    for e in entries:
        base = {"batch": batch, "queue": e.queue, "source": e.source, "category_code": e.code,
                "category_label": e.label, "category_path": e.path, "items": e.items,
                "titles": " | ".join(e.titles), "reason": "; ".join(e.reasons), "decision": "", "note": ""}
        if not e.candidates:
            rows.append({**base, "rank": "", "concept_code": "", "concept_label": "", "concept_path": "",
                         "score": "", "status": "", "match_type": "", "evidence": ""})
        for c in e.candidates:
            ev = ", ".join(f"{k}={v}" for k, v in c["evidence"].items())
            rows.append({**base, "rank": "" if c["rank"] is None else c["rank"], "concept_code": c["concept_code"],
                         "concept_label": c["concept_label"], "concept_path": c["concept_path"],
                         "score": "" if c["score"] is None else round(c["score"], 4), "status": c["status"],
                         "match_type": c["match_type"], "evidence": ev})
    return rows


def write_sheet(entries: list[QueueEntry], out, *, batch: str | None = None) -> dict:
    """Write the queue as a decision sheet to a path (written whole, then moved into place) or a text stream."""
    rows = sheet_rows(entries, batch=batch)
    buf = io.StringIO()
    w = csv.DictWriter(buf, fieldnames=SHEET_COLUMNS, lineterminator="\n")
    w.writeheader()
    w.writerows(rows)
    if hasattr(out, "write"):
        out.write(buf.getvalue())
        return {"rows": len(rows), "categories": len(entries)}
    path = Path(out)
    tmp = path.with_name(path.name + ".part")
    tmp.write_text(buf.getvalue(), encoding="utf-8")
    tmp.replace(path)
    return {"file": str(path), "rows": len(rows), "categories": len(entries)}


def read_sheet(path: str | Path, *, by: str = "") -> tuple[list[Decision], list[Problem]]:
    """The filled rows of a sheet as decisions (with line numbers), and the rows that cannot be read."""
    path = Path(path)
    try:
        text = path.read_text(encoding="utf-8-sig")  # spreadsheets often save a byte-order mark
    except UnicodeDecodeError as exc:
        raise BadInput(Problem(f"not UTF-8 text ({exc.reason} at byte {exc.start}); save the sheet as CSV UTF-8",
                               file=str(path))) from None
    reader = csv.DictReader(io.StringIO(text))
    header = [h.strip() for h in reader.fieldnames or []]
    missing = [c for c in REQUIRED if c not in header]
    if missing:
        raise BadInput(Problem(f"missing column(s): {', '.join(missing)}", file=str(path), line=1,
                               field=missing[0]))
    reader.fieldnames = header
    decisions, problems = [], []
    for row in reader:
        line = reader.line_num
        def get(k: str, row: dict = row) -> str:
            return (row.get(k) or "").strip()

        action = get("decision").lower()
        if not action:
            continue
        if action not in ACTIONS:
            problems.append(Problem(f"unknown decision {get('decision')!r}; use one of: {', '.join(ACTIONS)}",
                                    file=str(path), line=line, field="decision"))
            continue
        for col in ("source", "category_code"):
            if not get(col):
                problems.append(Problem(f"{col} is empty", file=str(path), line=line, field=col))
                break
        else:
            if action != "reopen" and not get("concept_code"):
                problems.append(Problem(f"{action} needs a concept_code", file=str(path), line=line,
                                        field="concept_code"))
                continue
            key = "\x1f".join([get("batch") or str(path.resolve()), get("source"), get("category_code"),
                               get("concept_code"), action, get("note")])
            decisions.append(Decision(action=action, source=get("source"), category=get("category_code"),
                                      concept=get("concept_code"), note=get("note"), by=by,
                                      ref="sheet:" + hashlib.sha256(key.encode()).hexdigest()[:32],
                                      file=str(path), line=line))
    return decisions, problems


def import_sheet(store: Store, path: str | Path, *, by: str = "", reference: str | None = None) -> dict:
    """Apply the filled rows of a sheet: good rows in one transaction, bad rows reported by line (not applied);
    rows applied by an earlier import of the same sheet are skipped."""
    decisions, problems = read_sheet(path, by=by)
    summary = apply_decisions(store, decisions, reference=reference, strict=False)
    return merge_problems(summary, problems)


def merge_problems(summary: dict, problems: list[Problem]) -> dict:
    rows = [problem_dict(p) for p in problems] + summary.get("invalid_rows", [])
    rows.sort(key=lambda r: (r["line"] or 0))
    summary["invalid_rows"] = rows
    summary["invalid"] = [str(Problem(r["message"], file=r["file"], line=r["line"], field=r["field"])) for r in rows]
    return summary
