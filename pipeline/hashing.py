"""Stable content hashes: the same content gives the same hash on every machine and run."""

from __future__ import annotations

import hashlib
import json
from pathlib import Path


def content_hash(*parts) -> str:
    """Hash of JSON-serialisable parts (order matters), 16 hex chars.

    >>> content_hash("a", [1, 2]) == content_hash("a", [1, 2])
    True
    """
    text = json.dumps(parts, ensure_ascii=False, sort_keys=True, separators=(",", ":"))
    return hashlib.blake2b(text.encode("utf-8"), digest_size=8).hexdigest()


def file_hash(path: str | Path) -> str:
    h = hashlib.blake2b(digest_size=16)
    with open(path, "rb") as fh:
        for block in iter(lambda: fh.read(1 << 20), b""):
            h.update(block)
    return h.hexdigest()
