"""Items with their reference path (CSV, Parquet), the coverage picture, and the export/import command lines."""

import json
from pathlib import Path

import pandas as pd
import pytest
from demo_layer import tiny_layer

from pipeline.cli import main
from pipeline.exchange.coverage_view import export_coverage
from pipeline.exchange.items_export import export_items, items_frame
from pipeline.store import open_store


@pytest.fixture(scope="module")
def store(tmp_path_factory):
    # shared: these tests only read, or import a crosswalk that is already there (which changes nothing)
    return tiny_layer(tmp_path_factory.mktemp("tiny"))


def test_items_frame_has_one_row_per_placement_with_path_and_levels(store):
    with open_store(store, read_only=True) as s:
        df = items_frame(s)
    rows = {(r.source, r.item_key): r for r in df.itertuples()}
    k1 = rows[("shop", "k1")]
    assert (k1.concept_code, k1.concept_path, k1.level_1, k1.level_2, k1.top_code) == \
        ("A1", "Garden > Tools", "Garden", "Tools", "A")
    assert (k1.via_category, k1.categories, k1.status, k1.attr_colour) == ("s2", "s2", "accepted", "green")
    m9 = rows[("mart", "m9")]
    assert (m9.concept_code, m9.categories, m9.status) == ("", "misc", "")  # unplaced items are kept
    assert len(df) == 7


def test_csv_and_parquet_hold_the_same_table(store, tmp_path):
    with open_store(store, read_only=True) as s:
        a = export_items(s, tmp_path / "i.csv")
        b = export_items(s, tmp_path / "i.parquet")
    assert (a["format"], b["format"], a["rows"], b["rows"], a["placed_rows"]) == ("csv", "parquet", 7, 7, 6)
    csv = pd.read_csv(tmp_path / "i.csv", dtype=str, keep_default_na=False)
    pq = pd.read_parquet(tmp_path / "i.parquet")
    assert list(csv.columns) == list(pq.columns)
    assert list(csv.item_key) == list(pq.item_key) and list(csv.concept_path) == list(pq.concept_path)


def test_coverage_picture_png_and_html(store, tmp_path):
    with open_store(store, read_only=True) as s:
        png = export_coverage(s, tmp_path / "c.png")
        page = export_coverage(s, tmp_path / "c.html")
    assert (tmp_path / "c.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"  # PNG signature (PNG spec, 5.2)
    assert png["concepts"] == page["concepts"] == 2
    text = (tmp_path / "c.html").read_text()
    assert "A  Garden" in text and "Kitchen" in text and "shop: 4 of 4 items placed" in text


def test_coverage_picture_needs_a_known_format(store, tmp_path):
    assert main(["--store", store, "export", "coverage", str(tmp_path / "c.gif")]) == 2
    assert not (tmp_path / "c.gif").exists()


def test_cli_exports_and_queries(store, tmp_path, capsys):
    out = tmp_path / "m.sssom.tsv"
    assert main(["--store", store, "export", "mappings", str(out), "--prefix", "shop=https://x.example/s/"]) == 0
    assert "shop: https://x.example/s/" in out.read_text()
    assert main(["--store", store, "export", "mappings", str(tmp_path / "m.ttl")]) == 0
    assert (tmp_path / "m.ttl").read_text().startswith("@prefix")
    assert main(["--store", store, "export", "items", str(tmp_path / "i.parquet"), "--source", "mart"]) == 0
    capsys.readouterr()
    for q in (["rollup", "--depth", "2", "--where", "colour=red"], ["drilldown", "A"], ["overlap"],
              ["coverage", "--accepted-only"], ["subtree", "A1"]):
        assert main(["--store", store, "--json", "query", *q]) == 0, q
        assert json.loads(capsys.readouterr().out), q
    assert main(["--store", store, "query", "rollup", "--source", "nope"]) == 2


def test_cli_import_errors_exit_2_naming_the_line(store, tmp_path, capsys):
    bad = tmp_path / "bad.csv"
    bad.write_text("source_scheme,source_code,concept_code\nshop,s1,A\nshop,zz,A\n")
    capsys.readouterr()
    assert main(["--store", store, "import", "mappings", str(bad)]) == 2
    err = capsys.readouterr().err
    assert err.startswith("graftwork: ") and "bad.csv:3 [source_code]" in err and "'zz'" in err
    assert main(["--store", store, "import", "mappings", str(bad), "--prefix", "nonsense"]) == 2
    assert main(["--store", store, "--json", "import", "mappings", str(Path(store).parent / "crosswalk.csv"),
                 "--by", "kit"]) == 0
    assert json.loads(capsys.readouterr().out.splitlines()[-1])["unchanged"] == 5
