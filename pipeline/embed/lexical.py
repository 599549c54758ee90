"""The model-free embedder: TF-IDF over character n-grams and words, reduced by truncated SVD (LSA).

It must be fitted on the texts of a run (or loaded from a saved fit). Character n-grams (3-5, within word
boundaries) catch spelling variants and shared stems; word unigrams keep whole-word identity. Both TF-IDF
blocks are L2-normalised and stacked, then projected to `dim` components (zero-padded when the corpus allows
fewer).

    >>> emb = LexicalEmbedder(dim=8, seed=0).fit(["garden hose", "hose reel", "table lamp", "desk lamp"])
    >>> v = emb.encode(["garden hoses", ""])
    >>> v.shape, float(v[1].sum())
    ((2, 8), 0.0)
"""

from __future__ import annotations

import hashlib
import json
import os
import tempfile
from collections.abc import Sequence
from pathlib import Path

import numpy as np

from pipeline.embed.base import EmbedderUnavailable, batches, check_batch_size, check_texts, l2_normalise
from pipeline.errors import BadInput, Problem

FORMAT = 1
_CHAR = {"analyzer": "char_wb", "ngram_range": (3, 5)}
_WORD = {"analyzer": "word", "token_pattern": r"(?u)\b\w+\b", "ngram_range": (1, 1)}
_COMMON = {"lowercase": True, "sublinear_tf": True, "dtype": np.float32}


def _vectorizer(spec: dict, vocabulary: dict[str, int] | None = None):
    from sklearn.feature_extraction.text import TfidfVectorizer

    return TfidfVectorizer(**spec, **_COMMON, vocabulary=vocabulary)


class LexicalEmbedder:
    """TF-IDF (char 3-5 + word 1) -> truncated SVD to `dim`; `fit` learns, `encode` applies."""

    def __init__(self, dim: int = 256, seed: int = 0):
        if not isinstance(dim, int) or dim < 1:
            raise BadInput(Problem(f"dim must be a positive int, got {dim!r}", field="dim"))
        self.dim = dim
        self.seed = seed
        self._char = self._word = None
        self._components: np.ndarray | None = None  # (k, n_char + n_word), k <= dim
        self.embedder_id = "lexical:unfitted"

    @property
    def fitted(self) -> bool:
        return self._components is not None

    @property
    def n_components(self) -> int:
        """Components actually learned (the rest of `dim` is zero padding)."""
        return 0 if self._components is None else int(self._components.shape[0])

    def fit(self, texts: Sequence[str]) -> LexicalEmbedder:
        """Learn vocabularies, IDF weights and the SVD basis from `texts`; returns self."""
        from sklearn.decomposition import TruncatedSVD

        texts = check_texts(texts)
        if not any(t.strip() for t in texts):
            raise BadInput(Problem("cannot fit the lexical embedder: no non-empty texts", field="texts"))
        char, word = _vectorizer(_CHAR), _vectorizer(_WORD)
        try:
            x = self._stack(char.fit_transform(texts), word.fit_transform(texts))
        except ValueError as exc:  # e.g. only punctuation: empty vocabulary
            raise BadInput(Problem(f"cannot fit the lexical embedder: {exc}", field="texts")) from exc
        # more components than samples or features would only be noise; pad with zeros instead
        k = min(self.dim, x.shape[0], x.shape[1])
        svd = TruncatedSVD(n_components=k, algorithm="randomized", random_state=self.seed)
        svd.fit(x)
        self._char, self._word = char, word
        self._components = svd.components_.astype(np.float32)
        self.embedder_id = f"lexical:{self.dim}:{self._state_hash()[:16]}"
        return self

    @staticmethod
    def _stack(a, b):
        from scipy.sparse import hstack

        return hstack([a, b], format="csr")

    def _require_fitted(self) -> None:
        if not self.fitted:
            raise EmbedderUnavailable(
                "the lexical embedder is not fitted: call fit(texts) or LexicalEmbedder.load(path)"
            )

    def encode(self, texts: Sequence[str], batch_size: int = 2048) -> np.ndarray:
        self._require_fitted()
        texts = check_texts(texts)
        check_batch_size(batch_size)
        out = np.zeros((len(texts), self.dim), dtype=np.float32)
        k = self.n_components
        for sl in batches(len(texts), batch_size):
            chunk = texts[sl]
            x = self._stack(self._char.transform(chunk), self._word.transform(chunk))
            out[sl, :k] = x @ self._components.T
        return l2_normalise(out)

    # -- persistence: plain arrays + JSON in one .npz, loaded without pickle --------------------------------

    def _arrays(self) -> dict[str, np.ndarray]:
        def terms(vec) -> np.ndarray:
            inv = sorted(vec.vocabulary_.items(), key=lambda kv: kv[1])
            return np.array([t for t, _ in inv], dtype=str)

        meta = {"format": FORMAT, "dim": self.dim, "seed": self.seed}
        return {
            "meta": np.array(json.dumps(meta, sort_keys=True)),
            "char_terms": terms(self._char),
            "char_idf": self._char.idf_.astype(np.float32),
            "word_terms": terms(self._word),
            "word_idf": self._word.idf_.astype(np.float32),
            "components": self._components,
        }

    def _state_hash(self) -> str:
        h = hashlib.sha256()
        for name, arr in sorted(self._arrays().items()):
            h.update(name.encode())
            h.update(
                "\x1f".join(arr.tolist()).encode() if arr.dtype.kind == "U" and arr.ndim else arr.tobytes()
            )
        return h.hexdigest()

    def save(self, path: str | Path) -> Path:
        """Write the fitted state to one `.npz` file (atomically: a temp file renamed into place)."""
        self._require_fitted()
        path = Path(path)
        path.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".npz", dir=path.parent)
        try:
            with os.fdopen(fd, "wb") as f:
                np.savez(f, **self._arrays())
            os.replace(tmp, path)
        except BaseException:
            Path(tmp).unlink(missing_ok=True)
            raise
        return path

    @classmethod
    def load(cls, path: str | Path) -> LexicalEmbedder:
        """Read a state written by `save`; BadInput naming the file and field if it is not one."""
        path = Path(path)
        need = ("meta", "char_terms", "char_idf", "word_terms", "word_idf", "components")
        try:
            with np.load(path, allow_pickle=False) as z:
                missing = [n for n in need if n not in z.files]
                if missing:
                    raise BadInput(
                        [
                            Problem("missing from the saved lexical embedder", file=str(path), field=n)
                            for n in missing
                        ]
                    )
                arrays = {n: z[n] for n in need}
        except (OSError, ValueError) as exc:
            raise BadInput(Problem(f"not a saved lexical embedder: {exc}", file=str(path))) from exc
        meta = json.loads(str(arrays["meta"]))
        if meta.get("format") != FORMAT:
            raise BadInput(
                Problem(f"unsupported format {meta.get('format')!r}", file=str(path), field="meta")
            )
        self = cls(dim=int(meta["dim"]), seed=int(meta["seed"]))
        blocks = []
        for prefix, spec in (("char", _CHAR), ("word", _WORD)):
            terms = arrays[f"{prefix}_terms"].tolist()
            vec = _vectorizer(spec, vocabulary={t: i for i, t in enumerate(terms)})
            vec.idf_ = arrays[f"{prefix}_idf"]  # sklearn's setter rebuilds the fitted transformer
            blocks.append(vec)
        self._char, self._word = blocks
        comps = arrays["components"].astype(np.float32)
        width = len(self._char.idf_) + len(self._word.idf_)
        if comps.ndim != 2 or comps.shape[1] != width or comps.shape[0] > self.dim:
            raise BadInput(
                Problem(
                    f"components shape {comps.shape} does not match {width} terms / dim {self.dim}",
                    file=str(path),
                    field="components",
                )
            )
        self._components = comps
        self.embedder_id = f"lexical:{self.dim}:{self._state_hash()[:16]}"
        return self
