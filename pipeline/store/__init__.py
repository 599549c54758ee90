"""Storage engines behind one interface (`Store`). Open one with `open_store`."""

from __future__ import annotations

from pathlib import Path

from pipeline.store.base import Store, VectorSet

DEFAULT_STORE = "graftwork.lbug"


def open_store(path: str | Path | None = None, *, neo4j: str | None = None, read_only: bool = False,
               create: bool = True, lock_timeout: float = 0.0) -> Store:
    """Open the embedded store at `path` (created on first write), or a Neo4j database at URI `neo4j`."""
    if neo4j:
        from pipeline.store.neo4j_store import Neo4jStore  # noqa: PLC0415 (optional engine)

        return Neo4jStore(neo4j, read_only=read_only, create=create)
    from pipeline.store.ladybug_store import LadybugStore  # noqa: PLC0415

    return LadybugStore(path or DEFAULT_STORE, read_only=read_only, create=create, lock_timeout=lock_timeout)


__all__ = ["Store", "VectorSet", "open_store", "DEFAULT_STORE"]
