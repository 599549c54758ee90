"""Import an existing crosswalk as people's decisions: `accepted` (or `rejected`) MAPS_TO edges, method `imported`.

Every row is checked against the graph first (known source and live category, known live concept, a SKOS mapping
property, a confidence in 0..1, no pair twice); any problem stops the import with one line per bad row and nothing
written. Then, in one transaction: each (category, concept) pair gets exactly the imported edge (a decision that
is already there with the same status and match type is left as it is); a category given an accepted edge loses its
machine edges (auto, proposed), as the map job never writes them for such a category; the affected categories'
items are placed again. Other decided edges of the same categories are kept.

>>> import_mappings(store, "old_crosswalk.csv", by="rowan")                  # doctest: +SKIP
{'file': 'old_crosswalk.csv', 'rows': 120, 'accepted': 118, 'rejected': 2, 'unchanged': 0, 'skipped': 0, ...}
"""

from __future__ import annotations

import getpass
import json
import math
import os
from datetime import UTC, datetime
from pathlib import Path

from pipeline.errors import BadInput, NotFound, Problem
from pipeline.exchange.crosswalk_rows import Crosswalk, CrosswalkRow, read_crosswalk
from pipeline.exchange.iris import SKOS_NS, SchemeNamespaces, expand_curie, prefix_name
from pipeline.exchange.sssom import SKOS_MAPPING_PROPERTIES
from pipeline.ingest.graph_writer import node_uid
from pipeline.schemes import choose_reference
from pipeline.store import Store


def import_mappings(store: Store, path: str | Path, *, fmt: str | None = None, by: str | None = None,
                    note: str | None = None, source: str | None = None, reference: str | None = None,
                    prefixes: dict[str, str] | None = None, run_id: str = "", dry_run: bool = False) -> dict:
    """Check the whole file, then write its decisions and re-place the affected categories (unless `dry_run`).

    `by`: who decided (default: the user running the import); `note`: for rows that carry none; `source`: the
    source key of a CSV without a `source_scheme` column; `prefixes`: scheme key -> IRI namespace, as given to
    the export (`--prefix`), for SSSOM files whose ids were minted in another namespace.
    """
    schemes = store.rows("schemes_list")
    reference = choose_reference(schemes, reference)
    sources = [s["key"] for s in schemes if s["role"] == "source"]
    if source and source not in sources:
        raise NotFound(f"unknown source {source!r}; known: {', '.join(sources) or 'none'}")
    crosswalk = read_crosswalk(path, fmt=fmt, source=source)
    checked = _check(store, crosswalk, sources, reference, prefixes or {})
    decided_by = by or _current_user()
    now = datetime.now(UTC).isoformat(timespec="seconds")
    todo = [c for c in checked if c["decision"] != "skip"]
    cats = sorted({c["category"] for c in todo})
    existing = store.frame("import_edges_existing", uids=cats, reference=reference) if cats else None
    have = {}
    if existing is not None:
        for cat, con, st, mt in zip(existing["category"], existing["concept"], existing["status"],
                                    existing["match_type"]):
            have.setdefault((cat, con), []).append((st, mt))
    writes, unchanged = [], 0
    for c in todo:
        if have.get((c["category"], c["concept"])) == [(c["decision"], c["match_type"])]:
            unchanged += 1
            continue
        writes.append({
            "category": c["category"], "concept": c["concept"], "score": c["score"], "rank": 1,
            "match_type": c["match_type"], "status": c["decision"], "run_id": run_id,
            "evidence": json.dumps(c["evidence"], sort_keys=True, ensure_ascii=False),
            "decided_by": decided_by, "decided_at": now, "note": c["note"] or note or "",
        })
    accepted_cats = sorted({c["category"] for c in todo if c["decision"] == "accepted"})
    summary = {"file": str(path), "format": crosswalk.kind, "reference": reference, "rows": len(checked),
               "accepted": sum(w["status"] == "accepted" for w in writes),
               "rejected": sum(w["status"] == "rejected" for w in writes), "unchanged": unchanged,
               "skipped": len(checked) - len(todo), "categories": len(cats), "decided_by": decided_by,
               "dry_run": dry_run}
    if dry_run:
        return summary
    from pipeline.place.place_job import place

    with store.transaction():
        if writes:
            store.run("import_pairs_clear", rows=[{"category": w["category"], "concept": w["concept"]}
                                                  for w in writes])
        if accepted_cats:
            store.run("machine_edges_clear", uids=accepted_cats, reference=reference)
        if writes:
            store.run("import_decisions_create", rows=writes)
        summary["history"] = _record_history(store, writes, have, accepted_cats, decided_by, path)
        if cats:
            place(store, categories=cats, reference=reference)
            placed = store.frame("count_placed", reference=reference)
            summary["items_placed"] = int(placed["items"].iloc[0]) if len(placed) else 0
    return summary


def _record_history(store: Store, writes: list[dict], have: dict, accepted_cats: list[str], by: str, path) -> int:
    """The audit trail of the import: one event per imported decision (as a steward's would be), and one
    `superseded` event per machine edge an accepted import replaced. Returns how many events were written."""
    import pandas as pd

    from pipeline.review.events import now_iso, write_event_table

    written = {(w["category"], w["concept"]) for w in writes}
    accepted = set(accepted_cats)
    rows = [{"action": w["status"], "category": w["category"], "concept": w["concept"], "status": w["status"],
             "status_before": (have.get((w["category"], w["concept"])) or [("", "")])[0][0], "score": w["score"],
             "rank": w["rank"], "concept_hash": "", "note": w["note"]} for w in writes]
    rows += [{"action": "superseded", "category": cat, "concept": con, "status": "", "status_before": st,
              "score": None, "rank": None, "concept_hash": "", "note": f"imported from {Path(path).name}"}
             for (cat, con), states in sorted(have.items()) if cat in accepted and (cat, con) not in written
             for st, _ in states if st in ("auto", "proposed")]
    if not rows:
        return 0
    table = pd.DataFrame(rows)
    table["rank"] = table["rank"].astype("Int64")
    table["score"] = pd.to_numeric(table["score"], errors="coerce")
    return write_event_table(store, table, actor=by, at=now_iso())


def _check(store: Store, cw: Crosswalk, sources: list[str], reference: str, overrides: dict[str, str]) -> list:
    """Resolve every row to (category uid, concept uid, match type, ...), or raise BadInput with every problem."""
    cat_frame = store.frame("import_categories", sources=sources or ["-"])
    categories = {u: bool(r) for u, r in zip(cat_frame["uid"], cat_frame["retired"].fillna(False))}
    concepts = store.frame("query_concepts", reference=reference).drop_duplicates("uid")
    concept_uids = set(concepts["uid"])
    by_iri = {i: u for i, u in zip(concepts["iri"], concepts["uid"]) if isinstance(i, str) and i}
    ns = _namespaces(cw, sources, reference, overrides)
    problems: list[Problem] = []
    seen: dict[tuple[str, str], int] = {}
    out = []

    def bad(row: CrosswalkRow, field: str, message: str) -> None:
        problems.append(Problem(message, file=cw.file, line=row.line, field=field))

    for row in cw.rows:
        n_before = len(problems)
        if cw.kind == "csv":
            src, code, concept_code, mt = row.source, row.code, row.concept_code, row.predicate
            if src not in sources:
                bad(row, "source_scheme", f"unknown source {src!r}; known: {', '.join(sources) or 'none'}")
            elif not code:
                bad(row, "source_code", "empty source code")
            category = node_uid(src, code)
            concept = node_uid(reference, concept_code) if concept_code else ""
            if not concept_code:
                bad(row, "concept_code", "empty concept code")
            if mt not in SKOS_MAPPING_PROPERTIES:
                bad(row, "match_type", f"{mt!r} is not a SKOS mapping property "
                                       f"({', '.join(SKOS_MAPPING_PROPERTIES)})")
        else:
            category, concept, mt = _resolve_sssom(row, cw, ns, sources, reference, by_iri, bad)
            src = category.split(":", 1)[0] if category else ""
        if len(problems) == n_before:
            if category not in categories:
                bad(row, "subject_id" if cw.kind == "sssom" else "source_code",
                    f"no category {category.split(':', 1)[1]!r} in source {category.split(':', 1)[0]!r}")
            elif categories[category]:
                bad(row, "subject_id" if cw.kind == "sssom" else "source_code",
                    f"category {category!r} is retired (gone from its source's latest taxonomy)")
            if concept not in concept_uids:
                bad(row, "object_id" if cw.kind == "sssom" else "concept_code",
                    f"no live concept {concept.split(':', 1)[-1]!r} in reference {reference!r}")
        score = _confidence(row, bad)
        if len(problems) > n_before:
            continue
        pair = (category, concept)
        if pair in seen:
            bad(row, "subject_id" if cw.kind == "sssom" else "source_code",
                f"the pair {category} -> {concept} is already given on line {seen[pair]}")
            continue
        seen[pair] = row.line
        evidence = {"file": Path(cw.file).name, "line": row.line}
        evidence.update({k: v for k, v in (("justification", row.justification), ("author", row.author),
                                           ("confidence", row.confidence)) if v})
        out.append({"category": category, "concept": concept, "match_type": mt, "decision": row.decision,
                    "score": score if score is not None else 1.0, "note": row.note, "evidence": evidence,
                    "source": src})
    if problems:
        raise BadInput(problems)
    return out


def _namespaces(cw: Crosswalk, sources: list[str], reference: str, overrides: dict[str, str]) -> SchemeNamespaces:
    # Precedence for a scheme's namespace: --prefix, then the file's own curie_map entry under the scheme's
    # prefix name, then the minted default (pipeline/exchange/iris.py).
    from_file = {k: cw.curie_map[prefix_name(k)] for k in [*sources, reference] if prefix_name(k) in cw.curie_map}
    return SchemeNamespaces.build({k: None for k in [*sources, reference]}, {**from_file, **overrides})


def _resolve_sssom(row: CrosswalkRow, cw: Crosswalk, ns: SchemeNamespaces, sources: list[str], reference: str,
                   by_iri: dict[str, str], bad) -> tuple[str, str, str]:
    subject_iri = _to_iri(row.subject, cw.curie_map)
    object_iri = _to_iri(row.obj, cw.curie_map)
    predicate_iri = _to_iri(row.predicate, cw.curie_map)
    category = concept = mt = ""
    if subject_iri is None:
        bad(row, "subject_id", f"{row.subject!r}: prefix not declared in the curie_map")
    else:
        for key in sources:
            code = ns.code_of(key, subject_iri)
            if code is not None:
                category = node_uid(key, code)
                break
        else:
            bad(row, "subject_id", f"{row.subject!r} is in no source's namespace "
                                   f"({', '.join(ns.bases[k] for k in sources)}); see --prefix")
    if object_iri is None:
        bad(row, "object_id", f"{row.obj!r}: prefix not declared in the curie_map")
    elif object_iri in by_iri:
        concept = by_iri[object_iri]
    elif ns.code_of(reference, object_iri) is not None:
        concept = node_uid(reference, ns.code_of(reference, object_iri))
    else:
        bad(row, "object_id", f"{row.obj!r} is no concept IRI of reference {reference!r}")
    if predicate_iri is None or not predicate_iri.startswith(SKOS_NS) \
            or predicate_iri[len(SKOS_NS):] not in SKOS_MAPPING_PROPERTIES:
        bad(row, "predicate_id", f"{row.predicate!r} is not a SKOS mapping property "
                                 f"(skos:{', skos:'.join(SKOS_MAPPING_PROPERTIES)})")
    else:
        mt = predicate_iri[len(SKOS_NS):]
    return category, concept, mt


def _to_iri(value: str, curie_map: dict[str, str]) -> str | None:
    expanded = expand_curie(value, curie_map)
    if expanded is not None:
        return expanded
    # A full IRI instead of a CURIE (the SSSOM/TSV spec asks for CURIEs; we accept both, they are unambiguous).
    if "://" in value or value.startswith("urn:"):
        return value
    return None


def _confidence(row: CrosswalkRow, bad) -> float | None:
    if not row.confidence:
        return None
    try:
        value = float(row.confidence)
    except ValueError:
        value = math.nan
    if not (0.0 <= value <= 1.0):
        bad(row, "confidence", f"{row.confidence!r} is not a number between 0 and 1")
        return None
    return value


def _current_user() -> str:
    for var in ("GRAFTWORK_USER", "USER", "LOGNAME", "USERNAME"):
        if os.environ.get(var):
            return os.environ[var]
    try:
        return getpass.getuser()
    except (OSError, KeyError):  # no passwd entry in some containers
        return "unknown"
