"""The embedder interface every stage codes against, plus the small helpers the embedders share.

An embedder turns texts into float32 rows of unit length (an all-zero row for a text with no usable tokens).
Its `embedder_id` changes whenever the vectors it would produce change, so stored vectors can be
reused safely.

    >>> import numpy as np
    >>> l2_normalise(np.array([[3.0, 4.0], [0.0, 0.0]], dtype=np.float32)).tolist()
    [[0.6000000238418579, 0.800000011920929], [0.0, 0.0]]
"""

from __future__ import annotations

import hashlib
from collections.abc import Iterable, Sequence
from pathlib import Path
from typing import Protocol, runtime_checkable

import numpy as np

from pipeline.errors import BadInput, GraftworkError, Problem


@runtime_checkable
class Embedder(Protocol):
    embedder_id: str  # stable id; changes whenever the produced vectors would change
    dim: int

    def encode(self, texts: Sequence[str], batch_size: int = 2048) -> np.ndarray:
        """float32 (n, dim), rows L2-normalised, all-zero row for empty text."""
        ...


class EmbedderUnavailable(GraftworkError):
    """The embedder cannot run: an optional package or model file is missing, or it was never fitted."""

    exit_code = 1


def check_texts(texts: Sequence[str], *, source: str = "texts") -> list[str]:
    """Return `texts` as a list, or raise BadInput naming every position that is not a str."""
    if isinstance(texts, str):
        raise BadInput(Problem("expected a sequence of texts, got one str", field=source))
    texts = list(texts)
    problems = [
        Problem(f"expected str, got {type(t).__name__}", field=f"{source}[{i}]")
        for i, t in enumerate(texts)
        if not isinstance(t, str)
    ]
    if problems:
        raise BadInput(problems)
    return texts


def check_batch_size(batch_size: int) -> int:
    if not isinstance(batch_size, int) or batch_size < 1:
        raise BadInput(Problem(f"batch_size must be a positive int, got {batch_size!r}", field="batch_size"))
    return batch_size


def l2_normalise(rows: np.ndarray) -> np.ndarray:
    """Scale each row to unit length in place (float32); rows of norm 0 stay all-zero."""
    rows = np.asarray(rows, dtype=np.float32)
    norms = np.linalg.norm(rows, axis=1, keepdims=True)
    np.divide(rows, norms, out=rows, where=norms > 0)
    return rows


def hash_files(paths: Iterable[str | Path], extra: str = "") -> str:
    """sha256 hex over the bytes of several files (in the order given) and an extra string."""
    h = hashlib.sha256()
    for p in paths:
        with open(p, "rb") as f:
            for block in iter(lambda: f.read(1 << 20), b""):
                h.update(block)
    h.update(extra.encode())
    return h.hexdigest()


def batches(n: int, batch_size: int) -> Iterable[slice]:
    for start in range(0, n, batch_size):
        yield slice(start, min(start + batch_size, n))
