"""The default embedder: a static WordPiece token-vector table shipped in the package (fast, no torch).

Encoding = tokenize with the WordPiece tokenizer (HF `tokenizers`, no special tokens) -> sum of the token rows
(the SIF weights are already baked into the rows, so this is the weighted mean up to scale) -> L2 normalise.
A text with no known tokens (empty, blank, only unknown characters) gets an all-zero row.

    >>> emb = StaticEmbedder()
    >>> v = emb.encode(["sofa", "couch", ""])
    >>> v.shape, v.dtype.name, float(v[2].sum())
    ((3, 256), 'float32', 0.0)
"""

from __future__ import annotations

import itertools
import json
from collections.abc import Sequence
from pathlib import Path

import numpy as np
from scipy.sparse import csr_matrix

from pipeline.embed.base import (
    EmbedderUnavailable,
    batches,
    check_batch_size,
    check_texts,
    hash_files,
    l2_normalise,
)

MODELS_DIR = Path(__file__).resolve().parent / "models"
DEFAULT_MODEL = "minilm-static-256"


class StaticEmbedder:
    """Token-table embedder; `model_dir` holds vectors.npy, tokenizer.json, config.json (see distill.py)."""

    def __init__(self, model_dir: str | Path | None = None):
        from tokenizers import Tokenizer

        self.model_dir = Path(model_dir) if model_dir is not None else MODELS_DIR / DEFAULT_MODEL
        files = [self.model_dir / n for n in ("vectors.npy", "tokenizer.json", "config.json")]
        missing = [str(f) for f in files if not f.is_file()]
        if missing:
            raise EmbedderUnavailable(
                f"static model files missing: {', '.join(missing)} "
                f"(rebuild with: python -m pipeline.embed.distill --out {self.model_dir})"
            )
        self.config = json.loads(files[2].read_text())
        # float32 in memory: the gather+sum is faster and exact enough; the file stays float16
        self.table = np.load(files[0], allow_pickle=False).astype(np.float32)
        self.dim = int(self.table.shape[1])
        self.tokenizer = Tokenizer.from_file(str(files[1]))
        self.tokenizer.no_padding()
        self.tokenizer.no_truncation()
        if self.tokenizer.get_vocab_size(with_added_tokens=True) > len(self.table):
            raise EmbedderUnavailable(f"{files[1]}: tokenizer has more ids than {files[0]} has rows")
        self._encode_batch = getattr(self.tokenizer, "encode_batch_fast", self.tokenizer.encode_batch)
        self.embedder_id = f"static:{self.model_dir.name}:{hash_files(files[:2])[:16]}"

    def token_ids(self, texts: Sequence[str]) -> list[list[int]]:
        """WordPiece ids of each text, without [CLS]/[SEP]."""
        return [e.ids for e in self._encode_batch(list(texts), add_special_tokens=False)]

    def encode(self, texts: Sequence[str], batch_size: int = 2048) -> np.ndarray:
        texts = check_texts(texts)
        check_batch_size(batch_size)
        out = np.zeros((len(texts), self.dim), dtype=np.float32)
        for sl in batches(len(texts), batch_size):
            ids = self.token_ids(texts[sl])
            lengths = np.fromiter(map(len, ids), dtype=np.int64, count=len(ids))
            indptr = np.concatenate([[0], np.cumsum(lengths)])
            flat = np.fromiter(itertools.chain.from_iterable(ids), dtype=np.int64, count=int(indptr[-1]))
            # (texts x vocab) count matrix times the table sums each text's rows; repeated ids add up, and
            # empty texts stay zero. Much faster than np.add.reduceat over the gathered rows.
            counts = csr_matrix(
                (np.ones(len(flat), dtype=np.float32), flat, indptr), shape=(len(ids), len(self.table))
            )
            out[sl] = counts @ self.table
        return l2_normalise(out)
