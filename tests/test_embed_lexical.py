"""TF-IDF char/word n-grams + truncated SVD: fit, encode, padding, ids, save/load."""

import numpy as np
import pytest

from pipeline.embed.base import Embedder, EmbedderUnavailable
from pipeline.embed.lexical import LexicalEmbedder
from pipeline.errors import BadInput

CORPUS = [
    "garden hose",
    "garden hose reel",
    "expanding hose",
    "table lamp",
    "desk lamp",
    "floor lamp",
    "oak table",
    "dining table",
    "wool rug",
    "runner rug",
    "cordless drill",
    "hammer drill",
]


@pytest.fixture(scope="module")
def fitted():
    return LexicalEmbedder(dim=16, seed=0).fit(CORPUS)


def test_is_an_embedder(fitted):
    assert isinstance(fitted, Embedder)
    assert fitted.embedder_id.startswith("lexical:16:")


def test_shape_dtype_unit_rows(fitted):
    v = fitted.encode(["garden hoses", "lamp"])
    assert v.shape == (2, 16) and v.dtype == np.float32
    assert np.allclose(np.linalg.norm(v, axis=1), 1.0, atol=1e-5)


def test_empty_text_and_unseen_text_give_zero_rows(fitted):
    v = fitted.encode(["", "qqqq"])  # "qqqq" shares no n-gram with the corpus
    assert not v.any()


def test_pads_with_zeros_when_fewer_components_possible():
    emb = LexicalEmbedder(dim=256).fit(["red rug", "blue lamp", "green hose"])
    v = emb.encode(["red rug"])
    assert v.shape == (1, 256)
    assert emb.n_components == 3
    assert not v[0, 3:].any()


def test_spelling_variant_is_nearer_than_other_item(fitted):
    a, b, c = fitted.encode(["garden hose", "garden hoses", "desk lamp"])
    assert a @ b > a @ c


def test_same_seed_same_vectors():
    a = LexicalEmbedder(dim=8, seed=3).fit(CORPUS)
    b = LexicalEmbedder(dim=8, seed=3).fit(CORPUS)
    assert a.embedder_id == b.embedder_id
    assert np.array_equal(a.encode(CORPUS), b.encode(CORPUS))


def test_id_changes_with_fit_corpus_and_dim(fitted):
    other = LexicalEmbedder(dim=16, seed=0).fit(CORPUS + ["wicker basket"])
    assert other.embedder_id != fitted.embedder_id
    assert LexicalEmbedder(dim=8, seed=0).fit(CORPUS).embedder_id != fitted.embedder_id


def test_save_load_round_trip(fitted, tmp_path):
    path = fitted.save(tmp_path / "lex" / "state.npz")
    loaded = LexicalEmbedder.load(path)
    assert loaded.embedder_id == fitted.embedder_id
    assert (loaded.dim, loaded.seed) == (16, 0)
    texts = ["garden hoses", "", "oak desk lamp"]
    assert np.allclose(loaded.encode(texts), fitted.encode(texts), atol=1e-6)


def test_save_leaves_no_temp_files(fitted, tmp_path):
    fitted.save(tmp_path / "state.npz")
    assert [p.name for p in tmp_path.iterdir()] == ["state.npz"]


def test_unfitted_encode_and_save_refuse(tmp_path):
    emb = LexicalEmbedder()
    assert emb.embedder_id == "lexical:unfitted"
    with pytest.raises(EmbedderUnavailable, match="not fitted"):
        emb.encode(["x"])
    with pytest.raises(EmbedderUnavailable):
        emb.save(tmp_path / "s.npz")


@pytest.mark.parametrize("texts", [[], ["", "  "], ["!!", "?"]])
def test_fit_without_usable_text_is_bad_input(texts):
    with pytest.raises(BadInput, match="cannot fit"):
        LexicalEmbedder().fit(texts)


def test_bad_dim_is_bad_input():
    with pytest.raises(BadInput, match="dim"):
        LexicalEmbedder(dim=0)


def test_load_garbage_names_the_file(tmp_path):
    bad = tmp_path / "bad.npz"
    bad.write_bytes(b"not a zip")
    with pytest.raises(BadInput) as err:
        LexicalEmbedder.load(bad)
    assert err.value.problems[0].file == str(bad)


def test_load_npz_missing_arrays_names_fields(tmp_path):
    path = tmp_path / "partial.npz"
    np.savez(path, meta=np.array("{}"))
    with pytest.raises(BadInput) as err:
        LexicalEmbedder.load(path)
    assert "components" in [p.field for p in err.value.problems]
