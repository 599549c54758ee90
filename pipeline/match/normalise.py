"""Light label normalisation for equality tests: case, punctuation, '&' vs 'and', spacing.

>>> normalise_label("  Tools & Hardware ")
'tools and hardware'
"""

from __future__ import annotations

import functools
import re
import unicodedata

_PUNCT = re.compile(r"[^\w\s]+")
_SPACE = re.compile(r"\s+")


@functools.lru_cache(maxsize=200_000)  # the map step asks for the same labels for every candidate
def normalise_label(text: str) -> str:
    text = unicodedata.normalize("NFKC", text or "").lower().replace("&", " and ")
    return _SPACE.sub(" ", _PUNCT.sub(" ", text)).strip()
