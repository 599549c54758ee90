"""Job: write category and concept vectors, skipping nodes whose input text and embedder are unchanged.

Where the time went (pyinstrument, small benchmark, 9.4 s stage against 2.9 s of raw encoding): 4.4 s in
commits of vector batches (LadybugDB rewrites the Vector column chunks each commit appends to, so many small
commits cost far more than one big one), 1.0 s reading and grouping every member item of every category,
0.6 s hashing each text twice, 0.2 s reading stored vectors back only to compare hashes. So: stale nodes are
found from stored hashes alone (`Store.vector_hashes`, one scan per signal); member titles come sampled in the
query, a uid range of categories at a time; and the encoder runs on this thread while a `VectorSink` thread
does every store call, gathering the vectors into few large transactions. The stored rows are byte for byte
what they were.
"""

from __future__ import annotations

import logging
from collections import deque
from collections.abc import Iterator
from concurrent.futures import ThreadPoolExecutor

import numpy as np

from pipeline.embed.input_hash import text_hash, titles_hash
from pipeline.embed.members import MEMBER_SAMPLE, READ_CHUNK, mean_vectors, member_samples
from pipeline.embed.signals import CATEGORY_SIGNALS, CONCEPT_SIGNALS, category_text, concept_text
from pipeline.embed.vector_sink import VectorSink
from pipeline.progress import progress
from pipeline.store import Store

log = logging.getLogger(__name__)
BATCH = 20_000  # texts per encode call (the raw-embedder benchmark encodes in the same batches)
MEMBER_CHUNK = 2_000  # stale categories whose member titles are encoded together
# Member-sample reads queued ahead of use. Queued early, they run on the store thread before the writes that
# queue up later, so the encoder seldom waits for them; at most READ_AHEAD x READ_CHUNK samples are held.
READ_AHEAD = 8
__all__ = ["BATCH", "MEMBER_CHUNK", "MEMBER_SAMPLE", "embed"]


def embed(store: Store, *, embedder: str = "static", **embedder_options) -> dict:
    """Embed every live concept and category for each signal; returns counts of embedded and skipped texts.

    Batches commit whole, many per transaction (up to vector_sink.MAX_ROWS rows); a killed run keeps what was
    committed and a re-run embeds only the rest, since each vector carries the hash of its input text and the
    embedder id."""
    from pipeline.embed.registry import get_embedder

    # The model loads (imports, token table) on a helper thread while the texts are read here.
    with ThreadPoolExecutor(max_workers=1, thread_name_prefix="graftwork-model") as loader:
        loading = loader.submit(get_embedder, embedder, **embedder_options)
        work, sources = _node_texts(store)
        model = loading.result()

    if hasattr(model, "fit"):
        # A corpus-fitted embedder (lexical) sees every text once; its id then names the fitted state.
        model.fit(sorted({t for _, _, _, texts in work for t in texts if t}))
    emb_id = model.embedder_id
    counts = {"embedder": emb_id, "embedded": 0, "skipped": 0, "members": 0, "member_texts": 0}
    total = sum(len(uids) for _, _, uids, _ in work)
    with progress(desc="embed", total=total, unit="texts") as bar, VectorSink(store) as sink:
        # Queued first: what is stale per signal (stored hashes vs now), then the first member samples. They
        # run on the store thread; the Python there (hashing) overlaps the tokenizer, which releases the GIL.
        stale = [sink.submit(_stale_texts, store, kind, signal, uids, texts, emb_id)
                 for kind, signal, uids, texts in work]
        del work
        chunks = _MemberChunks(sink, sources, emb_id)
        for future in stale:
            kind, signal, uids, texts, hashes, skipped = future.result()
            counts["skipped"] += skipped
            bar.update(skipped)
            for start in range(0, len(uids), BATCH):
                part = slice(start, start + BATCH)
                vecs = np.asarray(model.encode(texts[part]), dtype=np.float32)
                sink.put(kind, signal, emb_id, uids[part], hashes[part], vecs)
                counts["embedded"] += len(vecs)
                bar.update(len(vecs))
        counts["members"], counts["member_texts"] = _embed_members(sink, chunks, model)
    log.debug("vector commits (rows, s): %s", sink.commits)
    store.run("meta_set", key="embedder_id", value=emb_id)
    store.run("meta_set", key="embedder_name", value=embedder)
    log.info("embedded %(embedded)d texts, skipped %(skipped)d unchanged", counts)
    return counts


def _node_texts(store: Store) -> tuple[list[tuple[str, str, list[str], list[str]]], list[tuple[str, list[str]]]]:
    """(kind, signal, uids, texts) for every signal of every live node, and (scheme, live category uids) of each
    source for the members signal."""
    work: list[tuple[str, str, list[str], list[str]]] = []
    sources: list[tuple[str, list[str]]] = []
    for s in store.rows("schemes_list"):
        if s["role"] == "reference":
            rows = _records(store.frame("concept_texts", scheme=s["key"]))
            for sig in CONCEPT_SIGNALS:
                work.append(("Concept", sig, [r["uid"] for r in rows], [concept_text(sig, r) for r in rows]))
        else:
            rows = _records(store.frame("category_texts", scheme=s["key"]))
            for sig in CATEGORY_SIGNALS:
                work.append(("Category", sig, [r["uid"] for r in rows], [category_text(sig, r) for r in rows]))
            sources.append((s["key"], [r["uid"] for r in rows]))
    return work, sources


def _records(df) -> list[dict]:
    """`df.to_dict("records")` (the same values), built from column lists: about 4x faster."""
    cols = list(df.columns)
    return [dict(zip(cols, values)) for values in zip(*(df[c].tolist() for c in cols))]


def _stale_texts(store: Store, kind: str, signal: str, uids: list[str], texts: list[str], emb_id: str):
    """(kind, signal, uids, texts, hashes) of the nodes whose stored vector has another input hash or embedder
    (or none), and how many were skipped as unchanged."""
    # One scan of the signal's hashes: cheaper than a key lookup per node (retired owners in it do no harm).
    have = store.vector_hashes(kind, signal) if uids else {}
    hashes = [text_hash(t) for t in texts]
    todo = [i for i, (u, h) in enumerate(zip(uids, hashes)) if have.get(u) != (h, emb_id)]
    return (kind, signal, [uids[i] for i in todo], [texts[i] for i in todo], [hashes[i] for i in todo],
            len(uids) - len(todo))


class _MemberChunks:
    """(scheme, stale categories as (uid, sample, hash)) per READ_CHUNK categories, in order. The first
    READ_AHEAD reads are queued on the store thread at once (so they run while the node texts are encoded),
    then one more per chunk taken."""

    def __init__(self, sink: VectorSink, sources: list[tuple[str, list[str]]], emb_id: str):
        self._sink, self._emb_id = sink, emb_id
        self._stored = sink.submit(sink.store.vector_hashes, "Category", "members") if sources else None
        self._jobs = deque((key, uids[i:i + READ_CHUNK]) for key, uids in sources
                           for i in range(0, len(uids), READ_CHUNK))
        self._ahead: deque = deque()
        for _ in range(READ_AHEAD):
            self._start_next()

    def _start_next(self) -> None:
        if self._jobs:
            scheme, uids = self._jobs.popleft()
            self._ahead.append((scheme, self._sink.submit(_stale_members, self._sink.store, scheme, uids,
                                                          self._stored, self._emb_id)))

    def __iter__(self) -> Iterator[tuple[str, list[tuple[str, list[str], str]]]]:
        while self._ahead:
            self._start_next()
            scheme, future = self._ahead.popleft()
            yield scheme, future.result()


def _stale_members(store: Store, scheme: str, uids: list[str], stored, emb_id: str
                   ) -> list[tuple[str, list[str], str]]:
    """(uid, sampled titles, their hash) of the categories among `uids` whose members vector is stale; `stored`
    is the future of every stored members hash (done: it ran before this on the same thread)."""
    samples = member_samples(store, scheme, uids, MEMBER_SAMPLE)
    have = stored.result()
    out = []
    for uid, sample in samples.items():
        h = titles_hash(sample)
        if have.get(uid) != (h, emb_id):
            out.append((uid, sample, h))
    return out


def _embed_members(sink: VectorSink, chunks, model) -> tuple[int, int]:
    """The `members` signal: mean vector of (up to MEMBER_SAMPLE) member item titles per category, re-embedded
    only when the sampled titles change. Stale categories are encoded MEMBER_CHUNK at a time within a source
    (the same groups as before streaming). Returns (categories embedded, titles encoded)."""
    emb_id = model.embedder_id
    embedded = encoded = 0
    todo: list[tuple[str, list[str], str]] = []  # (uid, sample, hash) of stale categories of the current source
    current = None

    def encode(group: list[tuple[str, list[str], str]]) -> int:
        titles = sorted({t for _, sample, _ in group for t in sample})
        vecs = np.asarray(model.encode(titles), dtype=np.float32)
        samples = [sample for _, sample, _ in group]
        # The means are taken on the store thread, beside the next encode.
        sink.put("Category", "members", emb_id, [u for u, _, _ in group], [h for _, _, h in group],
                 lambda: mean_vectors(samples, titles, vecs))
        return len(titles)

    for scheme, stale in chunks:
        if scheme != current:
            if todo:
                encoded += encode(todo)
                embedded += len(todo)
            todo, current = [], scheme
        todo.extend(stale)
        while len(todo) >= MEMBER_CHUNK:
            group, todo = todo[:MEMBER_CHUNK], todo[MEMBER_CHUNK:]
            encoded += encode(group)
            embedded += len(group)
    if todo:
        encoded += encode(todo)
        embedded += len(todo)
    return embedded, encoded
