"""The texts each node contributes to its vectors, one per signal.

`path` (the ancestor path "A > B > C") carries most of the evidence (DESIGN.md: +20 points top-1 over the bare
label on public crosswalks); `label` keeps the node's own words sharp; `gloss` adds a concept's alt labels and
definition, which sources never have.
"""

from __future__ import annotations

CONCEPT_SIGNALS = ("label", "path", "gloss")
CATEGORY_SIGNALS = ("label", "path")


def concept_text(signal: str, row: dict) -> str:
    if signal == "label":
        return row["label"] or ""
    if signal == "path":
        return row["path"] or ""
    if signal == "gloss":
        alts = [a for a in (row.get("alt_labels") or []) if a]
        parts = [row["label"] or "", "; ".join(alts), row.get("definition") or ""]
        return ". ".join(p for p in parts if p)
    raise ValueError(f"unknown concept signal {signal!r}")


def category_text(signal: str, row: dict) -> str:
    if signal == "label":
        return row["label"] or ""
    if signal == "path":
        return row["path"] or ""
    raise ValueError(f"unknown category signal {signal!r}")
