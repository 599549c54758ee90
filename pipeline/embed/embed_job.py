"""Job: write category and concept vectors, skipping nodes whose input text and embedder are unchanged."""

from __future__ import annotations

import logging

import numpy as np

from pipeline.embed.signals import CATEGORY_SIGNALS, CONCEPT_SIGNALS, category_text, concept_text
from pipeline.hashing import content_hash
from pipeline.progress import progress
from pipeline.store import Store

log = logging.getLogger(__name__)
BATCH = 20_000


def embed(store: Store, *, embedder: str = "static", **embedder_options) -> dict:
    """Embed every live concept and category for each signal; returns counts of embedded and skipped texts."""
    from pipeline.embed.registry import get_embedder

    schemes = store.rows("schemes_list")
    work: list[tuple[str, str, list[str], list[str]]] = []  # (kind, signal, uids, texts)
    for s in schemes:
        if s["role"] == "reference":
            rows = store.rows("concept_texts", scheme=s["key"])
            for sig in CONCEPT_SIGNALS:
                work.append(("Concept", sig, [r["uid"] for r in rows], [concept_text(sig, r) for r in rows]))
        else:
            rows = store.rows("category_texts", scheme=s["key"])
            for sig in CATEGORY_SIGNALS:
                work.append(("Category", sig, [r["uid"] for r in rows], [category_text(sig, r) for r in rows]))

    model = get_embedder(embedder, **embedder_options)
    if hasattr(model, "fit"):
        # A corpus-fitted embedder (lexical) sees every text once; its id then names the fitted state.
        model.fit(sorted({t for _, _, _, texts in work for t in texts if t}))
    counts = {"embedder": model.embedder_id, "embedded": 0, "skipped": 0}
    total = sum(len(u) for _, _, u, _ in work)
    with progress(desc="embed", total=total, unit="texts") as bar:
        for kind, signal, uids, texts in work:
            stored = store.get_vectors(kind, signal, owners=uids) if uids else None
            have = {o: (h, e) for o, h, e in stored.iter_rows()} if stored else {}
            todo = [
                (u, t, content_hash(t))
                for u, t in zip(uids, texts)
                if have.get(u) != (content_hash(t), model.embedder_id)
            ]
            counts["skipped"] += len(uids) - len(todo)
            bar.update(len(uids) - len(todo))
            for start in range(0, len(todo), BATCH):
                chunk = todo[start:start + BATCH]
                vecs = np.asarray(model.encode([t for _, t, _ in chunk]), dtype=np.float32)
                store.put_vectors(kind, signal, model.embedder_id, [u for u, _, _ in chunk],
                                  [h for _, _, h in chunk], vecs)
                counts["embedded"] += len(chunk)
                bar.update(len(chunk))
    store.run("meta_set", key="embedder_id", value=model.embedder_id)
    store.run("meta_set", key="embedder_name", value=embedder)
    log.info("embedded %(embedded)d texts, skipped %(skipped)d unchanged", counts)
    return counts
