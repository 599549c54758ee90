"""The shipped static model: shapes, normalisation, empty rows, determinism, id, synonym sanity."""

import shutil

import numpy as np
import pytest

from pipeline.embed.base import Embedder, EmbedderUnavailable
from pipeline.embed.distill import SANITY_TRIPLES
from pipeline.embed.static import DEFAULT_MODEL, MODELS_DIR, StaticEmbedder
from pipeline.errors import BadInput


@pytest.fixture(scope="module")
def emb():
    return StaticEmbedder()


def test_is_an_embedder_with_256_dims(emb):
    assert isinstance(emb, Embedder)
    assert emb.dim == 256
    assert emb.embedder_id.startswith("static:minilm-static-256:")


def test_encode_shape_dtype_and_unit_rows(emb):
    v = emb.encode(["garden hose", "oak dining table", "Cordless Drill 18V"])
    assert v.shape == (3, 256) and v.dtype == np.float32
    assert np.allclose(np.linalg.norm(v, axis=1), 1.0, atol=1e-5)


def test_empty_and_blank_texts_give_zero_rows(emb):
    v = emb.encode(["", "   ", "sofa", "\u2603"])  # a snowman is [UNK], whose row is zero
    assert not v[0].any() and not v[1].any() and not v[3].any()
    assert np.isclose(np.linalg.norm(v[2]), 1.0)


def test_empty_input_list(emb):
    assert emb.encode([]).shape == (0, 256)


def test_deterministic_and_independent_of_batch_size(emb):
    texts = [f"blue rug {i}" for i in range(50)] + [""]
    a = emb.encode(texts)
    assert np.array_equal(a, emb.encode(texts))
    assert np.allclose(a, emb.encode(texts, batch_size=7), atol=1e-6)


def test_case_does_not_matter(emb):
    # the WordPiece tokenizer of this model lowercases (tokenizer.json: BertNormalizer lowercase=true)
    a, b = emb.encode(["Table Lamp", "table lamp"])
    assert np.allclose(a, b)


def test_repeated_word_keeps_direction(emb):
    a, b = emb.encode(["lamp", "lamp lamp"])
    assert np.allclose(a, b, atol=1e-6)


@pytest.mark.parametrize("a,b,c", SANITY_TRIPLES)
def test_synonym_closer_than_unrelated(emb, a, b, c):
    # common practice, no source: a synonym should sit nearer than an unrelated household word
    va, vb, vc = emb.encode([a, b, c])
    assert va @ vb > va @ vc


def test_sofa_couch_clearly_similar(emb):
    # measured on the shipped build (0.82 vs -0.02); thresholds kept loose, common practice, no source
    va, vb, vc = emb.encode(["sofa", "couch", "lawnmower"])
    assert va @ vb > 0.6 and va @ vc < 0.2


def test_non_str_items_are_bad_input(emb):
    with pytest.raises(BadInput) as err:
        emb.encode(["ok", None, 3])
    assert [p.field for p in err.value.problems] == ["texts[1]", "texts[2]"]


def test_single_str_is_bad_input(emb):
    with pytest.raises(BadInput, match="one str"):
        emb.encode("sofa")


def test_bad_batch_size(emb):
    with pytest.raises(BadInput, match="batch_size"):
        emb.encode(["a"], batch_size=0)


def test_id_changes_when_vectors_change(tmp_path):
    copy = tmp_path / DEFAULT_MODEL
    shutil.copytree(MODELS_DIR / DEFAULT_MODEL, copy)
    before = StaticEmbedder(copy).embedder_id
    table = np.load(copy / "vectors.npy")
    table[2000] += np.float16(0.5)
    np.save(copy / "vectors.npy", table)
    assert StaticEmbedder(copy).embedder_id != before


def test_id_is_stable_across_loads():
    assert StaticEmbedder().embedder_id == StaticEmbedder().embedder_id


def test_missing_model_files_name_the_rebuild_command(tmp_path):
    with pytest.raises(EmbedderUnavailable, match="pipeline.embed.distill"):
        StaticEmbedder(tmp_path / "nothing")


def test_shipped_model_is_small_and_has_notice():
    folder = MODELS_DIR / DEFAULT_MODEL
    total = sum(p.stat().st_size for p in folder.iterdir())
    assert total < 20 * 2**20
    notice = (folder / "NOTICE.md").read_text()
    assert "Apache License 2.0" in notice and "python -m pipeline.embed.distill" in notice
