"""Job: (re)place items on reference concepts through the live MAPS_TO edges of their categories."""

from __future__ import annotations

from pipeline.errors import NotFound
from pipeline.schemes import choose_reference
from pipeline.store import Store

BLOCK = 2_000  # categories per transaction: bounded memory, and a kill loses at most one block of work


def place(store: Store, *, sources: list[str] | None = None, categories: list[str] | None = None,
          reference: str | None = None, pending_only: bool = False) -> dict:
    """Re-place the items of `categories` (uids), or of every category of `sources` (default: all sources);
    with `pending_only`, only what waits: every item of a category whose edges changed (`place_dirty`), and the
    not-yet-placed members of a category that only received items (`place_new`).
    Each block of categories is placed and unmarked in one transaction, so a re-run converges."""
    schemes = store.rows("schemes_list")
    reference = choose_reference(schemes, reference)
    whole = categories is None
    arrivals: list[str] = []
    if categories is None:
        known = [s["key"] for s in schemes if s["role"] == "source"]
        chosen = sources or known
        unknown = [s for s in chosen if s not in known]
        if unknown:
            raise NotFound(f"unknown source(s): {', '.join(unknown)}")
        if pending_only:
            categories = []
            for s in chosen:
                pend = store.frame("categories_pending", scheme=s)
                dirty = pend["place_dirty"].map(_is_true)
                new = pend["place_new"].map(_is_true) & ~dirty
                categories += pend["uid"][dirty].tolist()
                arrivals += pend["uid"][new].tolist()
        else:
            categories = [u for s in chosen for u in store.frame("source_category_uids", scheme=s)["uid"]]
    for start in range(0, len(categories), BLOCK):
        block = list(categories[start:start + BLOCK])
        with store.transaction():
            store.run("placements_clear", uids=block)
            store.run("placements_create", uids=block, reference=reference)
            store.run("categories_mark_placed", uids=block)
    # Deleting and re-creating every placement of a category that only gained members would cost a nightly drop
    # as much as a rebuild of those categories: only the new members are placed.
    for start in range(0, len(arrivals), BLOCK):
        block = arrivals[start:start + BLOCK]
        with store.transaction():
            store.run("placements_add_missing", uids=block, reference=reference)
            store.run("categories_mark_placed", uids=block)
    summary = {"reference": reference, "categories": len(categories) + len(arrivals),
               "categories_replaced": len(categories), "categories_with_arrivals": len(arrivals)}
    if whole:
        # Store-wide totals cost a scan of every placement: only for whole-source runs, not per decision.
        placed = store.frame("count_placed", reference=reference)
        summary["placements"] = int(placed["placements"].iloc[0]) if len(placed) else 0
        summary["items_placed"] = int(placed["items"].iloc[0]) if len(placed) else 0
    return summary


def _is_true(flag) -> bool:
    return flag is True or flag == 1  # unset marks read back as None or NaN
