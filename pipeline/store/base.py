"""The store interface every stage talks to. Engine types never leave `pipeline/store/`.

Queries are named files in `cypher/`; a store runs them with parameters and returns plain Python values or pandas
DataFrames. Bulk writes pass a DataFrame as `$rows`; vectors have their own calls because each engine keeps them
differently (ENGINES.md).
"""

from __future__ import annotations

import abc
import contextlib
from collections.abc import Iterator, Sequence

import numpy as np
import pandas as pd

SCHEMA_VERSION = "1"


class Store(abc.ABC):
    engine: str
    location: str

    @abc.abstractmethod
    def frame(self, name: str, **params) -> pd.DataFrame:
        """Run read query `name` and return its rows as a DataFrame (columns = RETURN aliases)."""

    @abc.abstractmethod
    def run(self, name: str, **params) -> None:
        """Run write query `name`."""

    @abc.abstractmethod
    def bulk(self, name: str, rows: pd.DataFrame, **params) -> None:
        """Run bulk write query `name` over `rows` (passed as `$rows`); the whole frame or nothing."""

    @abc.abstractmethod
    def transaction(self) -> contextlib.AbstractContextManager[None]:
        """Everything inside commits together or not at all; nesting joins the outer transaction."""

    @abc.abstractmethod
    def put_vectors(
        self, kind: str, signal: str, embedder: str, owners: Sequence[str], input_hashes: Sequence[str],
        vectors: np.ndarray,
    ) -> None:
        """Replace the vectors of `owners` for (kind, signal); other owners' vectors are untouched."""

    @abc.abstractmethod
    def get_vectors(self, kind: str, signal: str, owners: Sequence[str] | None = None) -> "VectorSet":
        """Vectors of one kind (`Concept`/`Category`/`Item`) and signal, in a stable owner order."""

    @abc.abstractmethod
    def delete_vectors(self, kind: str, owners: Sequence[str]) -> None:
        """Drop every signal's vectors for these owners."""

    def put_vector_batches(self, batches: Sequence[tuple[str, str, str, Sequence[str], Sequence[str], np.ndarray]]
                           ) -> None:
        """`put_vectors(*batch)` for each batch, all in one transaction; engines may override it to write them
        in one statement (LadybugDB must: rolling back several COPYs into one table broke its key index)."""
        with self.transaction():
            for batch in batches:
                self.put_vectors(*batch)

    def vector_hashes(self, kind: str, signal: str, owners: Sequence[str] | None = None
                      ) -> dict[str, tuple[str, str]]:
        """owner -> (input hash, embedder id) of the stored vectors of `owners` (None: of every owner); owners
        without one are absent. What the embed job compares to skip unchanged texts; engines may override it
        to skip reading the vectors."""
        return {o: (h, e) for o, h, e in self.get_vectors(kind, signal, owners=owners).iter_rows()}

    @abc.abstractmethod
    def close(self) -> None: ...

    def release_memory(self) -> None:
        """Give back what the engine holds in this process between jobs (caches, buffers); the store stays open
        and locked. Called between the stages of a long run; nothing happens inside a transaction, or on engines
        that hold nothing in this process."""

    def rows(self, name: str, **params) -> list[dict]:
        return self.frame(name, **params).to_dict("records")

    def scalar(self, name: str, **params):
        df = self.frame(name, **params)
        return None if df.empty else df.iloc[0, 0]

    def __enter__(self) -> "Store":
        return self

    def __exit__(self, *exc) -> None:
        self.close()


class VectorSet:
    """Owners, their input hashes and embedder ids, and a float32 matrix with one row per owner."""

    def __init__(self, owners: list[str], hashes: list[str], embedders: list[str], matrix: np.ndarray):
        self.owners = owners
        self.hashes = hashes
        self.embedders = embedders
        self.matrix = matrix

    def __len__(self) -> int:
        return len(self.owners)

    def index(self) -> dict[str, int]:
        return {o: i for i, o in enumerate(self.owners)}

    def iter_rows(self) -> Iterator[tuple[str, str, str]]:
        return zip(self.owners, self.hashes, self.embedders)
