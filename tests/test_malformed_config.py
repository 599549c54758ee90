"""A malformed graftwork.toml, or a run whose inputs hold a bad file: one message naming the file and the key
(or the input's line), exit code 2, and the layer as it was -- a bad file late in the list stops the run before the
good files before it are written (`nightly.preflight`)."""

from __future__ import annotations

import contextlib
import io

import pytest
from graph_snapshot import snapshot_of
from malformed_cases import ITEMS, TREE, TTL

from pipeline.cli import main


def _files(tmp_path):
    (tmp_path / "ref.ttl").write_text(TTL)
    (tmp_path / "tree.csv").write_text(TREE)
    (tmp_path / "items.csv").write_text(ITEMS)


GOOD = """[store]
path = "s.lbug"
[reference]
file = "ref.ttl"
scheme = "ref"
[map]
candidates = 3
[[sources]]
key = "shop"
taxonomy = "tree.csv"
items = ["items.csv"]
"""


def _run(tmp_path, text):
    cfg = tmp_path / "graftwork.toml"
    cfg.write_bytes(text if isinstance(text, bytes) else text.encode())
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(["--config", str(cfg), "run"])
    return code, err.getvalue()


BAD = [
    ("candidates-text", GOOD.replace("candidates = 3", 'candidates = "three"'), ["map.candidates", "whole number"]),
    ("candidates-bool", GOOD.replace("candidates = 3", "candidates = true"), ["map.candidates"]),
    ("threshold-out-of-range", GOOD + "", None),
    ("lock-timeout-negative", GOOD.replace('path = "s.lbug"', 'path = "s.lbug"\nlock_timeout = -1'),
     ["store.lock_timeout"]),
    ("store-path-number", GOOD.replace('path = "s.lbug"', "path = 7"), ["store.path", "text"]),
    ("items-number", GOOD.replace('items = ["items.csv"]', "items = 3"), ["sources[1].items"]),
    ("unknown-key", GOOD + "[extra]\nx = 1\n", ["extra", "unknown setting"]),
    ("sources-not-array", GOOD.split("[[sources]]")[0] + 'sources = "shop"\n', ["sources"]),
    ("not-toml", GOOD.replace("[map]", "[map"), ["graftwork.toml", "not valid TOML"]),
    ("not-utf8", GOOD.replace("ref.ttl", "r\xe9f.ttl").encode("latin-1"), ["graftwork.toml", "UTF-8"]),
    ("duplicate-source-key", GOOD + '[[sources]]\nkey = "shop"\ntaxonomy = "tree.csv"\n',
     ["sources[2].key", "used twice"]),
]
BAD[2] = ("threshold-out-of-range", GOOD.replace("candidates = 3", "candidates = 3\nauto_threshold = 1.5"),
          ["map.auto_threshold", "between 0 and 1"])


@pytest.mark.parametrize("text, words", [c[1:] for c in BAD], ids=[c[0] for c in BAD])
def test_a_bad_config_names_the_key_and_writes_nothing(tmp_path, text, words):
    _files(tmp_path)
    code, err = _run(tmp_path, text)
    assert code == 2, err
    for word in words:
        assert word in err, err
    assert not (tmp_path / "s.lbug").exists()


def test_a_missing_config_is_bad_input(tmp_path):
    code = main(["--config", str(tmp_path / "nope.toml"), "run"])
    assert code == 2


def _layer(tmp_path):
    return snapshot_of(tmp_path / "s.lbug")


@pytest.mark.parametrize("which, content, words", [
    ("items.csv", b"item_key,title,category\nk1,Caf\xe9,2\n", ["items.csv:2", "UTF-8"]),
    ("tree.csv", "code,label,parent_code\n1,A,2\n2,B,1\n", ["tree.csv", "cycle"]),
    ("ref.ttl", TTL + "ex:X a skos:Concept ; skos:broader ex:Nope .\n", ["ref.ttl"]),
], ids=["bad-items", "bad-taxonomy", "bad-reference"])
def test_a_run_with_one_bad_input_changes_nothing(tmp_path, which, content, words):
    _files(tmp_path)
    assert _run(tmp_path, GOOD)[0] == 0
    before = _layer(tmp_path)
    # a new reference version and a changed taxonomy wait to be taken in, but one file is bad
    (tmp_path / "ref.ttl").write_text(TTL.replace("Garden tools", "Tools for the garden"))
    (tmp_path / "tree.csv").write_text(TREE + "3,Loppers,1\n")
    target = tmp_path / which
    target.write_bytes(content if isinstance(content, bytes) else content.encode())
    code, err = _run(tmp_path, GOOD)
    assert code == 2, err
    for word in words:
        assert word in err, err
    assert _layer(tmp_path) == before


def test_every_bad_input_of_a_run_is_named_at_once(tmp_path):
    _files(tmp_path)
    (tmp_path / "tree.csv").write_text("code,label,parent_code\n1,A,9\n")
    (tmp_path / "items.csv").write_bytes(b"\x00\x00")
    code, err = _run(tmp_path, GOOD)
    assert code == 2
    assert "tree.csv:2" in err and "items.csv:1" in err
