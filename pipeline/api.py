"""Python API for analysts: the unified layer as pandas DataFrames, a thin facade over pipeline.query/exchange.

>>> from pipeline.api import Layer
>>> layer = Layer("graftwork.lbug")                                            # doctest: +SKIP
>>> layer.rollup(depth=2, sources=["shop"], statuses=("accepted",))           # doctest: +SKIP
>>> layer.drilldown("HG.1.2", where={"colour": "green"})                      # doctest: +SKIP

Each call opens the store read-only for its own duration, so a Layer never holds the store while a job runs.
`statuses`: edge statuses whose placements count (`("accepted",)` or the default `("accepted", "auto")`);
`sources`: only these sources; `where`: item attributes that must equal these values.
"""

from __future__ import annotations

import contextlib
from pathlib import Path

import pandas as pd

from pipeline.query.filters import LIVE, Filters
from pipeline.store import DEFAULT_STORE, open_store


class Layer:
    def __init__(self, store_path: str | Path = DEFAULT_STORE, *, reference: str | None = None):
        self.store_path = str(store_path)
        self.reference = reference

    @contextlib.contextmanager
    def _store(self, *, write: bool = False):
        with open_store(self.store_path, read_only=not write, create=False) as store:
            yield store

    @staticmethod
    def _filters(sources, statuses, where) -> Filters:
        return Filters(sources=list(sources or []), statuses=tuple(statuses or LIVE), attributes=dict(where or {}))

    def rollup(self, *, concept: str | None = None, depth: int = 1, sources=None, statuses=None,
               where=None) -> pd.DataFrame:
        from pipeline.query.rollup import rollup

        with self._store() as s:
            return rollup(s, concept=concept, depth=depth, reference=self.reference,
                          filters=self._filters(sources, statuses, where))

    def drilldown(self, concept: str, *, descendants: bool = True, attributes: bool = False, limit: int = 100_000,
                  sources=None, statuses=None, where=None) -> pd.DataFrame:
        from pipeline.query.drilldown import drilldown

        with self._store() as s:
            return drilldown(s, concept, reference=self.reference, descendants=descendants,
                             filters=self._filters(sources, statuses, where), limit=limit, attributes=attributes)

    def overlap(self, *, detail: bool = False, sources=None, statuses=None, where=None) -> pd.DataFrame:
        from pipeline.query.overlap import overlap

        with self._store() as s:
            return overlap(s, reference=self.reference, filters=self._filters(sources, statuses, where),
                           detail=detail)

    def coverage(self, *, sources=None, statuses=None, where=None) -> pd.DataFrame:
        from pipeline.query.coverage import coverage

        with self._store() as s:
            return coverage(s, reference=self.reference, filters=self._filters(sources, statuses, where))

    def subtree(self, concept: str, *, depth: int = 1, sources=None, statuses=None, where=None) -> pd.DataFrame:
        from pipeline.query.subtree import subtree

        with self._store() as s:
            return subtree(s, concept, depth=depth, reference=self.reference,
                           filters=self._filters(sources, statuses, where))

    def mappings(self, *, candidates: int = 1, sources=None, statuses=None) -> pd.DataFrame:
        """MAPS_TO edges (ranks up to `candidates`, plus every live and rejected edge), with ids and provenance."""
        from pipeline.exchange.mappings_csv import mappings_frame

        with self._store() as s:
            return mappings_frame(s, candidates=candidates, sources=sources, statuses=statuses)

    def items(self, *, sources=None, statuses=None) -> pd.DataFrame:
        """Every item with its placements and reference path (the `export items` table)."""
        from pipeline.exchange.items_export import items_frame

        with self._store() as s:
            return items_frame(s, reference=self.reference, sources=sources, statuses=tuple(statuses or LIVE))

    def export_mappings(self, out: str | Path, *, fmt: str = "sssom", **options) -> dict:
        from pipeline.exchange.exporters import export_mappings

        with self._store() as s:
            return export_mappings(s, out, fmt=fmt, **options)

    def import_mappings(self, path: str | Path, **options) -> dict:
        """Write an existing crosswalk in as decisions (opens the store for writing, recorded in the run ledger)."""
        from pipeline.exchange.importer import import_mappings
        from pipeline.jobs.ledger import ledger

        with self._store(write=True) as s, ledger(s, "import mappings", {"file": str(path), **options}) as run:
            run["counts"] = import_mappings(s, path, run_id=run["run_id"], reference=self.reference, **options)
            return run["counts"]
