"""Distillation of the static table, end to end on a tiny random teacher built in tmp_path."""

import json

import numpy as np
import pytest

from pipeline.embed import distill
from pipeline.embed.bert_numpy import write_safetensors
from pipeline.embed.static import StaticEmbedder
from pipeline.errors import BadInput

WORDS = [
    "[PAD]",
    "[UNK]",
    "[CLS]",
    "[SEP]",
    "[MASK]",
    "[unused0]",
    "the",
    "sofa",
    "couch",
    "lamp",
    "hose",
    "garden",
    "##s",
    "red",
    "blue",
    "rug",
]


def make_teacher(folder, hidden=8, heads=2, layers=1, inter=16, words=WORDS, seed=0):
    """A tiny BERT (random weights) with a WordPiece tokenizer: enough to run the whole build in ms."""
    from tokenizers import Tokenizer, normalizers, pre_tokenizers
    from tokenizers.models import WordPiece

    folder.mkdir(parents=True, exist_ok=True)
    rng = np.random.default_rng(seed)
    w = {
        "embeddings.word_embeddings.weight": rng.normal(size=(len(words), hidden)),
        "embeddings.position_embeddings.weight": rng.normal(size=(16, hidden)),
        "embeddings.token_type_embeddings.weight": rng.normal(size=(2, hidden)),
        "embeddings.LayerNorm.weight": np.ones(hidden),
        "embeddings.LayerNorm.bias": np.zeros(hidden),
    }
    for i in range(layers):
        p = f"encoder.layer.{i}."
        for name, shape in [
            ("attention.self.query", (hidden, hidden)),
            ("attention.self.key", (hidden, hidden)),
            ("attention.self.value", (hidden, hidden)),
            ("attention.output.dense", (hidden, hidden)),
            ("intermediate.dense", (inter, hidden)),
            ("output.dense", (hidden, inter)),
        ]:
            w[p + name + ".weight"] = rng.normal(size=shape) * 0.3
            w[p + name + ".bias"] = rng.normal(size=shape[0]) * 0.1
        for ln in ("attention.output.LayerNorm", "output.LayerNorm"):
            w[p + ln + ".weight"] = np.ones(hidden)
            w[p + ln + ".bias"] = np.zeros(hidden)
    write_safetensors(folder / "model.safetensors", {k: v.astype(np.float32) for k, v in w.items()})
    (folder / "config.json").write_text(
        json.dumps(
            {
                "hidden_size": hidden,
                "num_attention_heads": heads,
                "num_hidden_layers": layers,
                "intermediate_size": inter,
                "max_position_embeddings": 16,
                "hidden_act": "gelu",
            }
        )
    )
    tok = Tokenizer(WordPiece({t: i for i, t in enumerate(words)}, unk_token="[UNK]"))
    tok.normalizer = normalizers.BertNormalizer(lowercase=True)
    tok.pre_tokenizer = pre_tokenizers.BertPreTokenizer()
    tok.save(str(folder / "tokenizer.json"))
    return folder


def test_build_writes_table_tokenizer_config_and_notice(tmp_path):
    teacher = make_teacher(tmp_path / "teacher")
    config = distill.build(tmp_path / "out" / "tiny", teacher, dim=4)
    out = tmp_path / "out" / "tiny"
    assert sorted(p.name for p in out.iterdir()) == [
        "NOTICE.md",
        "config.json",
        "tokenizer.json",
        "vectors.npy",
    ]
    table = np.load(out / "vectors.npy")
    assert table.shape == (len(WORDS), 4) and table.dtype == np.float16
    assert config["dim"] == 4 and config["rows"] == len(WORDS)
    notice = (out / "NOTICE.md").read_text()
    assert "python -m pipeline.embed.distill --out pipeline/embed/models/tiny" in notice
    assert "Apache" in notice


def test_special_tokens_get_zero_rows(tmp_path):
    distill.build(tmp_path / "m", make_teacher(tmp_path / "t"), dim=4)
    table = np.load(tmp_path / "m" / "vectors.npy")
    assert not table[:6].any()  # [PAD] [UNK] [CLS] [SEP] [MASK] [unused0]
    assert np.abs(table[6:]).sum(axis=1).min() > 0


def test_build_is_deterministic(tmp_path):
    teacher = make_teacher(tmp_path / "t")
    distill.build(tmp_path / "a" / "m", teacher, dim=4)
    distill.build(tmp_path / "b" / "m", teacher, dim=4)
    assert (tmp_path / "a/m/vectors.npy").read_bytes() == (tmp_path / "b/m/vectors.npy").read_bytes()


def test_built_model_loads_as_static_embedder(tmp_path):
    distill.build(tmp_path / "m", make_teacher(tmp_path / "t"), dim=4)
    emb = StaticEmbedder(tmp_path / "m")
    v = emb.encode(["red sofa", "", "zzz"])  # "zzz" is only [UNK], which has a zero row
    assert v.shape == (3, 4) and v.dtype == np.float32
    assert np.isclose(np.linalg.norm(v[0]), 1.0)
    assert not v[1].any() and not v[2].any()


def test_rebuild_with_other_teacher_changes_embedder_id(tmp_path):
    distill.build(tmp_path / "a" / "m", make_teacher(tmp_path / "t1", seed=1), dim=4)
    distill.build(tmp_path / "b" / "m", make_teacher(tmp_path / "t2", seed=2), dim=4)
    first, second = StaticEmbedder(tmp_path / "a" / "m"), StaticEmbedder(tmp_path / "b" / "m")
    assert first.embedder_id != second.embedder_id


def test_build_replaces_existing_folder_whole(tmp_path):
    out = tmp_path / "m"
    out.mkdir()
    (out / "stale.txt").write_text("old")
    distill.build(out, make_teacher(tmp_path / "t"), dim=4)
    assert not (out / "stale.txt").exists()


def test_tokenizer_larger_than_model_is_bad_input(tmp_path):
    teacher = make_teacher(tmp_path / "t")
    make_teacher(tmp_path / "big", words=WORDS + ["extra"])
    (teacher / "tokenizer.json").write_bytes((tmp_path / "big" / "tokenizer.json").read_bytes())
    with pytest.raises(BadInput, match="embeddings"):
        distill.build(tmp_path / "m", teacher, dim=4)


def test_pca_centres_and_orders_by_variance():
    rng = np.random.default_rng(0)
    rows = rng.normal(size=(200, 3)) * np.array([10.0, 1.0, 0.1]) + 5.0
    reduced, explained = distill.pca(rows, 2)
    assert reduced.shape == (200, 2)
    assert np.allclose(reduced.mean(axis=0), 0, atol=1e-4)
    assert reduced[:, 0].var() > reduced[:, 1].var()
    assert 0.99 < explained <= 1.0


def test_sif_weights_grow_with_rank():
    w = distill.sif_weights(1000, a=1e-3)
    assert w.shape == (1000,)
    assert np.all(np.diff(w) > 0)  # rarer (later) tokens weigh more
    assert 0 < w[0] < w[-1] < 1


def test_cli_main_builds_and_reports(tmp_path, capsys):
    teacher = make_teacher(tmp_path / "t")
    code = distill.main(["--out", str(tmp_path / "m"), "--teacher", str(teacher), "--dim", "4"])
    printed = capsys.readouterr().out
    assert '"dim": 4' in printed and "cos('sofa', 'couch')" in printed
    assert code in (0, 1)  # random teacher: the synonym checks may fail, the build must not


def test_scrub_vocabulary_renames_blocked_entries_and_keeps_ids(monkeypatch):
    import hashlib
    import json

    from pipeline.embed import distill

    monkeypatch.setattr(distill, "BLOCKED_TOKEN_SHA256", frozenset({hashlib.sha256(b"zebra").hexdigest()}))
    text = json.dumps({"model": {"vocab": {"[PAD]": 0, "zebra": 1, "lamp": 2}}})
    out = json.loads(distill.scrub_vocabulary(text))["model"]["vocab"]
    assert out == {"[PAD]": 0, "[blocked1]": 1, "lamp": 2}


def test_the_shipped_tokenizer_holds_no_blocked_entry():
    import hashlib
    import json

    from pipeline.embed import distill
    from pipeline.embed.static import DEFAULT_MODEL, MODELS_DIR

    vocab = json.loads((MODELS_DIR / DEFAULT_MODEL / "tokenizer.json").read_text(encoding="utf-8"))["model"]["vocab"]
    assert not [w for w in vocab if hashlib.sha256(w.encode()).hexdigest() in distill.BLOCKED_TOKEN_SHA256]
