"""Items with their place on the reference, flat for BI tools: CSV or Parquet (pyarrow).

One row per (item, placement); an item placed nowhere has one row with empty concept fields. Columns: source,
item_key, title, categories (the codes it is filed under, `|`-joined), via_category, status, score, concept_code,
concept_label, concept_depth, concept_path (labels, " > "), level_1 .. level_N (labels from the top), top_code,
top_label, and one `attr_<name>` column per item attribute.
"""

from __future__ import annotations

from pathlib import Path

import pandas as pd

from pipeline.errors import BadInput, NotFound, Problem
from pipeline.query.drilldown import attribute_columns
from pipeline.query.filters import LIVE, PLACEMENT_STATUSES, pick_reference
from pipeline.query.reference_tree import ReferenceTree
from pipeline.store import Store

FORMATS = ("csv", "parquet")


def items_frame(store: Store, *, reference: str | None = None, sources: list[str] | None = None,
                statuses: tuple[str, ...] = LIVE) -> pd.DataFrame:
    reference = pick_reference(store, reference)
    known = [s["key"] for s in store.rows("schemes_list") if s["role"] == "source"]
    unknown = [s for s in sources or [] if s not in known]
    if unknown:
        raise NotFound(f"unknown source(s): {', '.join(unknown)}; known: {', '.join(known) or 'none'}")
    if not statuses or any(s not in PLACEMENT_STATUSES for s in statuses):
        raise BadInput(Problem(f"edge status must be among {', '.join(PLACEMENT_STATUSES)}", field="--status"))
    rows = store.frame("export_items", reference=reference, sources=list(sources or []), statuses=list(statuses))
    links = store.frame("export_item_categories", sources=list(sources or []))
    tree = ReferenceTree.load(store, reference)
    filed = links.groupby("item_uid")["category_code"].agg(lambda s: "|".join(sorted(set(s)))) if len(links) \
        else pd.Series(dtype=str)
    code_of = dict(zip(links["category_uid"], links["category_code"])) if len(links) else {}
    max_depth = int(tree.frame["depth"].max()) if len(tree.frame) else 0
    records = []
    for r in rows.itertuples(index=False):
        code = r.concept_code if isinstance(r.concept_code, str) else ""
        chain = [*tree.ancestors(code), code] if code and code in tree else []
        rec = {"source": r.source, "item_key": r.item_key, "title": r.title,
               "categories": filed.get(r.item_uid, ""), "via_category": code_of.get(r.via, "") if isinstance(r.via, str) else "",
               "status": r.status if isinstance(r.status, str) else "", "score": float(r.score) if pd.notna(r.score) else None,
               "concept_code": code, "concept_label": tree.label(code) if chain else "",
               "concept_depth": len(chain) or None,
               "concept_path": " > ".join(tree.label(c) for c in chain)}
        for lvl in range(1, max_depth + 1):
            rec[f"level_{lvl}"] = tree.label(chain[lvl - 1]) if lvl <= len(chain) else ""
        rec["top_code"] = chain[0] if chain else ""
        rec["top_label"] = tree.label(chain[0]) if chain else ""
        records.append(rec)
    frame = pd.DataFrame(records)
    if frame.empty:
        return frame
    frame["concept_depth"] = frame["concept_depth"].astype("Int64")
    attrs = attribute_columns(rows["attributes"].reset_index(drop=True))
    return pd.concat([frame, attrs], axis=1)


def export_items(store: Store, out: str | Path, *, fmt: str | None = None, reference: str | None = None,
                 sources: list[str] | None = None, statuses: tuple[str, ...] = LIVE) -> dict:
    out = Path(out)
    fmt = fmt or ("parquet" if out.suffix.lower() in (".parquet", ".pq") else "csv")
    if fmt not in FORMATS:
        raise BadInput(Problem(f"unknown items format {fmt!r}; use csv or parquet", field="--format"))
    frame = items_frame(store, reference=reference, sources=sources, statuses=statuses)
    tmp = out.with_name(out.name + ".part")  # never leave a half-written file behind
    if fmt == "parquet":
        frame.to_parquet(tmp, engine="pyarrow", index=False)
    else:
        frame.to_csv(tmp, index=False)
    tmp.replace(out)
    placed = frame.loc[frame["concept_code"] != "", "item_key"] if len(frame) else []
    return {"file": str(out), "format": fmt, "rows": len(frame),
            "items": int(frame[["source", "item_key"]].drop_duplicates().shape[0]) if len(frame) else 0,
            "placed_rows": len(placed)}
