"""Property-based checks of the parsers (hypothesis): whatever bytes arrive, a reader either returns records or
raises BadInput with a file named -- never another exception -- and text that is valid comes back as written."""

from __future__ import annotations

import csv
import io
import json
import tempfile
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from pipeline.errors import BadInput
from pipeline.ingest.items_reader import normalise_title, read_items
from pipeline.ingest.rdf_reference import read_reference_rdf
from pipeline.ingest.source_taxonomy import read_source_taxonomy
from pipeline.jobs.config import parse_config

FAST = settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
_dir = Path(tempfile.mkdtemp(prefix="gw-props-"))


def _file(name: str, data: bytes) -> Path:
    p = _dir / name
    p.write_bytes(data)
    return p


def _only_bad_input(fn) -> None:
    try:
        fn()
    except BadInput as exc:
        assert exc.problems and all(p.file for p in exc.problems), exc


csv_ish = st.one_of(
    st.binary(max_size=300),
    st.text(alphabet=st.sampled_from(list('ab,"\r\n \t|>\x00\x07é')), max_size=200).map(lambda t: t.encode()),
    st.text(max_size=120).map(lambda t: ("code,label,parent_code\n" + t).encode("utf-8", "surrogatepass")),
)


@FAST
@given(data=csv_ish)
def test_the_tree_reader_takes_any_bytes_without_crashing(data):
    _only_bad_input(lambda: read_source_taxonomy(_file("t.csv", data), fmt="tree"))


@FAST
@given(data=csv_ish, fmt=st.sampled_from(["paths", "tags"]))
def test_the_paths_and_tags_readers_take_any_bytes_without_crashing(data, fmt):
    _only_bad_input(lambda: read_source_taxonomy(_file("p.csv", data), fmt=fmt))


@FAST
@given(data=csv_ish)
def test_the_item_reader_takes_any_bytes_without_crashing(data):
    def consume():
        for batch in read_items(_file("i.csv", b"item_key,title,category\n" + data), batch_size=7):
            for item in batch.items:
                assert item.key and item.title and item.category_codes
    _only_bad_input(consume)


@FAST
@given(data=st.one_of(st.binary(max_size=300), st.text(max_size=300).map(str.encode)),
       suffix=st.sampled_from([".ttl", ".nt", ".rdf", ".jsonld"]))
def test_the_rdf_reader_takes_any_bytes_without_crashing(data, suffix):
    _only_bad_input(lambda: read_reference_rdf(_file("r" + suffix, data)))


label = st.text(alphabet=st.characters(blacklist_categories=["Cs", "Cc", "Zl", "Zp"]), min_size=1, max_size=40) \
    .map(str.strip).filter(bool)


@FAST
@given(labels=st.lists(label, min_size=1, max_size=8, unique=True))
def test_tree_labels_and_codes_come_back_as_written(labels):
    buf = io.StringIO()
    w = csv.writer(buf)
    w.writerow(["code", "label", "parent_code"])
    for n, text in enumerate(labels):
        w.writerow([text, text + "!", labels[n - 1] if n else ""])
    cats = read_source_taxonomy(_file("rt.csv", buf.getvalue().encode()), fmt="tree").categories
    assert sorted((c.code, c.label) for c in cats) == sorted((t, t + "!") for t in labels)


@FAST
@given(labels=st.lists(label, min_size=1, max_size=6, unique=True))
def test_turtle_labels_come_back_as_written(labels):
    lines = ["@prefix skos: <http://www.w3.org/2004/02/skos/core#> ."]
    for n, text in enumerate(labels):
        lines.append(f"<http://example.org/c{n}> a skos:Concept ; skos:prefLabel {json.dumps(text, ensure_ascii=False)} .")
    ref = read_reference_rdf(_file("rt.ttl", "\n".join(lines).encode()))
    assert sorted(c.pref_label for c in ref.concepts) == sorted(labels)


@FAST
@given(text=st.text(max_size=80))
def test_normalised_titles_have_no_control_characters_and_are_stable(text):
    once = normalise_title(text)
    assert normalise_title(once) == once
    assert not any(ord(ch) < 32 or 0x7F <= ord(ch) <= 0x9F for ch in once)


toml_value = st.recursive(
    st.one_of(st.none(), st.booleans(), st.integers(), st.floats(allow_nan=False), st.text(max_size=10)),
    lambda inner: st.one_of(st.lists(inner, max_size=3), st.dictionaries(st.text(max_size=8), inner, max_size=3)),
    max_leaves=8,
)


@FAST
@given(raw=st.dictionaries(st.sampled_from(["store", "reference", "embed", "map", "sources", "other"]),
                           toml_value, max_size=5))
def test_the_config_parser_takes_any_shape_without_crashing(raw):
    try:
        parse_config(raw, _dir / "graftwork.toml")
    except BadInput as exc:
        assert all(p.field for p in exc.problems), exc
