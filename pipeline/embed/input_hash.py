"""The input hash stored beside each vector, computed fast: the same value as `pipeline.hashing.content_hash`.

`content_hash(text)` runs `json.dumps` with sort_keys over a one-element tuple for every node text; for the
plain strings the embed stage hashes, that JSON is simply `["<escaped text>"]`, so the escaping function
`json.dumps` itself uses is called directly (about 5x faster). Anything that is not a plain `str` falls back to
`content_hash`, so the value never differs (tests/test_embed_input_hash.py checks both on awkward strings).

    >>> from pipeline.hashing import content_hash
    >>> text_hash("Sofas & couches") == content_hash("Sofas & couches")
    True
    >>> titles_hash(["a", "b"]) == content_hash(["a", "b"])
    True
"""

from __future__ import annotations

import hashlib
from collections.abc import Sequence
from json.encoder import encode_basestring  # the escaper json.dumps uses when ensure_ascii=False

from pipeline.hashing import content_hash


def _digest(text: str) -> str:
    return hashlib.blake2b(text.encode("utf-8"), digest_size=8).hexdigest()


def text_hash(text: str) -> str:
    """`content_hash(text)` for one node text."""
    if type(text) is not str:
        return content_hash(text)
    return _digest("[" + encode_basestring(text) + "]")


def titles_hash(titles: Sequence[str]) -> str:
    """`content_hash(list(titles))` for a list of member titles (order matters)."""
    if not all(type(t) is str for t in titles):
        return content_hash(list(titles))
    return _digest("[[" + ",".join(map(encode_basestring, titles)) + "]]")
