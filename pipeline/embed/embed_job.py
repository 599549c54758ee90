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
MEMBER_SAMPLE = 32  # member titles per category: enough for a stable mean, bounded cost per category


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
    counts["members"] = counts["member_texts"] = 0
    for s in schemes:
        if s["role"] == "source":
            members, titles = _embed_members(store, s["key"], model)
            counts["members"] += members
            counts["member_texts"] += titles
    store.run("meta_set", key="embedder_id", value=model.embedder_id)
    store.run("meta_set", key="embedder_name", value=embedder)
    log.info("embedded %(embedded)d texts, skipped %(skipped)d unchanged", counts)
    return counts


def _embed_members(store: Store, scheme: str, model) -> tuple[int, int]:
    """The `members` signal: mean vector of (up to MEMBER_SAMPLE) member item titles per category, re-embedded
    only when the sampled titles change. Returns (categories embedded, titles encoded)."""
    rows = store.frame("category_members", scheme=scheme)
    if rows.empty:
        return 0, 0
    sample = rows.groupby("uid", sort=True)["title"].apply(lambda t: list(t[:MEMBER_SAMPLE]))
    uids = list(sample.index)
    stored = store.get_vectors("Category", "members", owners=uids)
    have = {o: (h, e) for o, h, e in stored.iter_rows()}
    hashes = {u: content_hash(sample[u]) for u in uids}
    todo = [u for u in uids if have.get(u) != (hashes[u], model.embedder_id)]
    encoded = 0
    for start in range(0, len(todo), 2_000):
        chunk = todo[start:start + 2_000]
        titles = sorted({t for u in chunk for t in sample[u]})
        pos = {t: i for i, t in enumerate(titles)}
        vecs = np.asarray(model.encode(titles), dtype=np.float32)
        encoded += len(titles)
        means = np.stack([vecs[[pos[t] for t in sample[u]]].mean(axis=0) for u in chunk])
        means /= np.maximum(np.linalg.norm(means, axis=1, keepdims=True), 1e-12)
        store.put_vectors("Category", "members", model.embedder_id, chunk, [hashes[u] for u in chunk], means)
    return len(todo), encoded
