"""Load named Cypher queries from `cypher/`: `<engine>/<name>.cypher` first, then `common/<name>.cypher`.

Python never builds query text from data; it only picks a file by name and passes parameters.
"""

from __future__ import annotations

import functools
import re
from pathlib import Path

_PACKAGE_DIR = Path(__file__).resolve().parent.parent


def _query_roots() -> list[Path]:
    # Installed wheel: queries are packaged under pipeline/_cypher; source checkout: the top-level cypher/ folder.
    return [p for p in (_PACKAGE_DIR / "_cypher", _PACKAGE_DIR.parent / "cypher") if p.is_dir()]


@functools.cache
def load_query(name: str, engine: str) -> str:
    """Return the text of query `name` for `engine`, comments stripped."""
    if not re.fullmatch(r"[a-z0-9_]+", name):
        raise ValueError(f"bad query name {name!r}")
    for root in _query_roots():
        for folder in (engine, "common"):
            path = root / folder / f"{name}.cypher"
            if path.is_file():
                return strip_comments(path.read_text(encoding="utf-8"))
    raise FileNotFoundError(f"no query named {name!r} for engine {engine!r} under {_query_roots()}")


def strip_comments(text: str) -> str:
    """Drop whole-line `//` comments (headers); inline text is left alone so string literals stay intact."""
    return "\n".join(line for line in text.splitlines() if not line.lstrip().startswith("//")).strip()


def statements(text: str) -> list[str]:
    """Split a multi-statement file (DDL) on semicolons at line ends."""
    return [s.strip() for s in re.split(r";\s*(?:\n|$)", text) if s.strip()]
