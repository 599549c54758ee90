"""The fast input hashes equal `content_hash` (the stored hashes must not change, or every vector re-embeds)."""

import pytest

from pipeline.embed.input_hash import text_hash, titles_hash
from pipeline.hashing import content_hash

AWKWARD = ["", "plain", 'quote " inside', "back\\slash", "tab\tand\nnewline", "\x00\x01\x1f control",
           "caf\u00e9 na\u00efve", "\u2028 line separator", "emoji \U0001f331", "\ud7ff edge", "/ slash", "a" * 5000]


@pytest.mark.parametrize("text", AWKWARD)
def test_text_hash_is_content_hash(text):
    assert text_hash(text) == content_hash(text)


def test_titles_hash_is_content_hash_of_the_list():
    assert titles_hash(AWKWARD) == content_hash(AWKWARD)
    assert titles_hash([]) == content_hash([])
    assert titles_hash(("a", "b")) == content_hash(["a", "b"])


def test_order_matters():
    assert titles_hash(["a", "b"]) != titles_hash(["b", "a"])


def test_non_text_values_fall_back_to_content_hash():
    assert text_hash(None) == content_hash(None)
    assert titles_hash(["a", None]) == content_hash(["a", None])
