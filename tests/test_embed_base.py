"""Shared helpers of the embedders."""

import numpy as np
import pytest

from pipeline.embed.base import Embedder, batches, check_texts, hash_files, l2_normalise
from pipeline.errors import BadInput


def test_l2_normalise_keeps_zero_rows():
    out = l2_normalise(np.array([[3.0, 4.0], [0.0, 0.0]]))
    assert out.dtype == np.float32
    assert np.allclose(out, [[0.6, 0.8], [0.0, 0.0]])


def test_check_texts_accepts_tuple_and_rejects_bytes():
    assert check_texts(("a", "b")) == ["a", "b"]
    with pytest.raises(BadInput) as err:
        check_texts(["a", b"b"])
    assert err.value.problems[0].field == "texts[1]"


def test_batches_cover_everything_once():
    assert [(s.start, s.stop) for s in batches(5, 2)] == [(0, 2), (2, 4), (4, 5)]
    assert list(batches(0, 3)) == []


def test_hash_files_depends_on_content_and_extra(tmp_path):
    (tmp_path / "a").write_text("x")
    first = hash_files([tmp_path / "a"])
    assert hash_files([tmp_path / "a"], extra="k=1") != first
    (tmp_path / "a").write_text("y")
    assert hash_files([tmp_path / "a"]) != first


def test_protocol_rejects_object_without_encode():
    class NoEncode:
        embedder_id = "x"
        dim = 1

    assert not isinstance(NoEncode(), Embedder)
