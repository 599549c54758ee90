"""Pick an embedder by name: "static" (default, shipped), "lexical" (TF-IDF/LSA), "transformer" (optional).

>>> get_embedder().dim
256
>>> get_embedder("lexical", dim=64).embedder_id      # must be fitted (or loaded with path=...) before use
'lexical:unfitted'
"""

from __future__ import annotations

from pathlib import Path

from pipeline.embed.base import Embedder
from pipeline.errors import BadInput, Problem

NAMES = ("static", "lexical", "transformer")
_static_cache: dict[Path, Embedder] = {}


def get_embedder(name: str = "static", **options) -> Embedder:
    """Build the named embedder.

    Options: static: `model_dir`; lexical: `dim`, `seed`, or `path` of a saved fit; transformer: `model_dir`,
    `max_tokens`. The static model is loaded once per folder and shared (it is read-only).
    """
    try:
        if name == "static":
            from pipeline.embed.static import DEFAULT_MODEL, MODELS_DIR, StaticEmbedder

            model_dir = Path(options.pop("model_dir", None) or MODELS_DIR / DEFAULT_MODEL).resolve()
            _reject_unknown(name, options)
            if model_dir not in _static_cache:
                _static_cache[model_dir] = StaticEmbedder(model_dir)
            return _static_cache[model_dir]
        if name == "lexical":
            from pipeline.embed.lexical import LexicalEmbedder

            path = options.pop("path", None)
            if path is not None:
                _reject_unknown(name, options)
                return LexicalEmbedder.load(path)
            return LexicalEmbedder(**options)
        if name == "transformer":
            from pipeline.embed.transformer import TransformerEmbedder

            return TransformerEmbedder(**options)
    except TypeError as exc:  # an option the constructor does not take
        raise BadInput(Problem(f"bad option for embedder {name!r}: {exc}", field="embedder")) from exc
    raise BadInput(Problem(f"unknown embedder {name!r}; choose one of {', '.join(NAMES)}", field="embedder"))


def _reject_unknown(name: str, options: dict) -> None:
    if options:
        raise BadInput(
            Problem(
                f"unknown option(s) for embedder {name!r}: {', '.join(sorted(options))}", field="embedder"
            )
        )
