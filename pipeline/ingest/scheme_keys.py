"""Scheme keys name a reference or a source everywhere (uids, CLI, exports), so they are kept simple."""

from __future__ import annotations

import re
from pathlib import Path

from pipeline.errors import BadInput, Problem

_KEY = re.compile(r"[A-Za-z0-9][A-Za-z0-9_.-]{0,63}")


def check_scheme_key(key: str, *, option: str = "scheme key") -> str:
    if not _KEY.fullmatch(key or ""):
        raise BadInput(Problem(
            f"{option} {key!r} must be 1-64 characters of letters, digits, '_', '.', '-', starting with a letter or digit",
            field=option,
        ))
    return key


def key_from_filename(path: str | Path) -> str:
    """A default scheme key from a file name: `isic-rev4.ttl` -> `isic-rev4`."""
    stem = Path(path).name.split(".")[0]
    key = re.sub(r"[^A-Za-z0-9_.-]+", "-", stem).strip("-._") or "reference"
    return key[:64]
