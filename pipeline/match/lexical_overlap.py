"""Lexical similarity of two labels after light normalisation: case, punctuation, '&'/'and', stop words,
plural/singular. The mean of word-set Jaccard and character-trigram Dice, in 0..1.

>>> round(lexical_similarity("Pots & Planters", "planter and pot"), 2)
1.0
>>> lexical_similarity("Secateurs", "Lawn mowers") < 0.2
True
"""

from __future__ import annotations

import functools
import re

from pipeline.match.normalise import normalise_label

# Function words common to category titles in English (common practice, no source).
STOP_WORDS = frozenset(
    "a an and the of for in on with without to from by or other n e c nec etc except including".split()
)


def singular(word: str) -> str:
    """Crude English singular for matching, not for display: 'boxes'->'box', 'berries'->'berry', 'tools'->'tool'."""
    if len(word) > 4 and word.endswith("ies"):
        return word[:-3] + "y"
    if len(word) > 4 and re.search(r"(ss|x|ch|sh)es$", word):
        return word[:-2]
    if len(word) > 3 and word.endswith("s") and not word.endswith(("ss", "us", "is")):
        return word[:-1]
    return word


@functools.lru_cache(maxsize=200_000)
def word_set(label: str) -> frozenset[str]:
    return frozenset(singular(w) for w in normalise_label(label).split() if w not in STOP_WORDS)


@functools.lru_cache(maxsize=200_000)
def trigrams(label: str) -> frozenset[str]:
    text = " " + " ".join(sorted(word_set(label))) + " "
    return frozenset(text[i:i + 3] for i in range(len(text) - 2))


def word_weights(labels) -> dict[str, float]:
    """Smoothed inverse document frequency of each normalised word over `labels` (common TF-IDF practice, no
    source): words shared by many nodes ("farming", "products") count for less than the words that tell nodes
    apart."""
    import math

    df: dict[str, int] = {}
    n = 0
    for label in labels:
        n += 1
        for w in word_set(label):
            df[w] = df.get(w, 0) + 1
    return {w: math.log((1 + n) / (1 + c)) + 1.0 for w, c in df.items()}


def lexical_similarity(a: str, b: str, weights: dict[str, float] | None = None) -> float:
    """With `weights` (see `word_weights`), the word overlap is a weighted Jaccard."""
    wa, wb = word_set(a), word_set(b)
    if not wa or not wb:
        return 0.0
    if weights:
        union = sum(weights.get(w, 1.0) for w in wa | wb)
        jaccard = sum(weights.get(w, 1.0) for w in wa & wb) / union
    else:
        jaccard = len(wa & wb) / len(wa | wb)
    ta, tb = trigrams(a), trigrams(b)
    dice = 2 * len(ta & tb) / (len(ta) + len(tb)) if ta and tb else 0.0
    return (jaccard + dice) / 2
