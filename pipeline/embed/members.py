"""The `members` signal's input: the first MEMBER_SAMPLE member titles (by item uid) of each category, read a
chunk of categories at a time so that no more than a chunk's samples are ever held.

    >>> member_samples(store, "shop", ["shop:12", "shop:13"])                # doctest: +SKIP
    {'shop:12': ['Oak side table', 'Pine shelf'], 'shop:13': ['Desk lamp']}
"""

from __future__ import annotations

import itertools
from collections.abc import Sequence

import numpy as np

from pipeline.store import Store

MEMBER_SAMPLE = 32  # member titles per category: enough for a stable mean, bounded cost per category
READ_CHUNK = 2_000  # categories per sample query
SEP = "\x01"  # joins item uid and title in category_member_sample; sorts below every other character but NUL


def member_samples(store: Store, scheme: str, uids: Sequence[str], sample: int = MEMBER_SAMPLE
                   ) -> dict[str, list[str]]:
    """uid -> its first `sample` member titles in item-uid order, for the categories of `uids` that have items.
    `uids` is a run of the source's live category uids in the store's order (one uid range is queried)."""
    if not uids:
        return {}
    rng = {"scheme": scheme, "lo": uids[0], "hi": uids[-1], "n": sample}
    df = store.frame("category_member_sample", **rng, sep=SEP, nul="\x00")
    wanted = set(uids)
    if df.empty or int(df["odd"].sum()) == 0:
        # each entry is "item uid" SEP "title", and no uid here holds SEP: the first SEP ends the uid
        return {u: [f.partition(SEP)[2] for f in firsts]
                for u, firsts in zip(df["uid"].tolist(), df["firsts"].tolist()) if u in wanted}
    df = store.frame("category_member_sample_exact", **rng)
    cats, titles = df["uid"].tolist(), df["title"].tolist()
    out: dict[str, list[str]] = {}
    pos = 0
    for uid, group in itertools.groupby(cats):
        n = sum(1 for _ in group)
        if uid in wanted:
            out[uid] = titles[pos:pos + n]
        pos += n
    return out


def mean_vectors(samples: Sequence[list[str]], titles: list[str], vecs: np.ndarray) -> np.ndarray:
    """The L2-normalised mean of each sample's title vectors (`vecs[i]` encodes `titles[i]`)."""
    pos = {t: i for i, t in enumerate(titles)}
    means = np.stack([vecs[[pos[t] for t in s]].mean(axis=0) for s in samples])
    means /= np.maximum(np.linalg.norm(means, axis=1, keepdims=True), 1e-12)
    return means
