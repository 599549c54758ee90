"""A small demo layer built once per test session for the query and exchange tests (not a test module).

Built through the CLI on the invented scenario (pipeline/demo), like tests/test_cli_end_to_end.py; tests that
write get their own copy of the store file (`copy_store`).
"""

from __future__ import annotations

import shutil
from pathlib import Path

from pipeline.cli import main
from pipeline.demo.scenario import generate_scenario

N_ITEMS = 1500
_BUILT: dict[str, tuple] = {}


def demo_layer(tmp_path_factory) -> tuple[Path, str, object]:
    """(folder, store path, ScenarioFiles) of a store with the scenario ingested, embedded, mapped and placed."""
    if "layer" not in _BUILT:
        tmp = tmp_path_factory.mktemp("layer")
        files = generate_scenario(tmp / "data", seed=5, n_items=N_ITEMS)
        store = str(tmp / "layer.lbug")
        run = lambda *a: main(["--store", store, *a])
        assert run("ingest", "reference", str(files.reference), "--scheme", "market") == 0
        for src in files.sources:
            cols, opts = src["columns"], ["--format", src["format"]]
            if src["format"] == "paths":
                opts += ["--separator", src["separator"]]
            assert run("ingest", "source", src["key"], str(src["taxonomy"]), *opts) == 0
            assert run("ingest", "items", src["key"], str(src["items"]), "--key-column", cols["key"],
                       "--title-column", cols["title"], "--category-column", cols["category"]) == 0
        for step in ("embed", "map", "place"):
            assert run(step) == 0
        _BUILT["layer"] = (tmp, store, files)
    return _BUILT["layer"]


def copy_store(store: str, dest: Path) -> str:
    """A private copy of a closed store (the database file and its write-ahead log, if any)."""
    dest.mkdir(parents=True, exist_ok=True)
    target = dest / Path(store).name
    shutil.copy(store, target)
    wal = Path(store + ".wal")
    if wal.exists():
        shutil.copy(wal, str(target) + ".wal")
    return str(target)


TINY = {
    "ref.csv": "code,label,parent_code\nA,Garden,\nA1,Tools,A\nA2,Plants,A\nB,Kitchen,\nB1,Pans,B\n",
    "shop.csv": "code,label,parent_code\ns1,Garden stuff,\ns2,Spades,s1\ns3,Cookware,\n",
    "mart.csv": "tag\ngarden-tools\npans\nmisc\n",
    "shop_items.csv": "item_key,title,category,colour\nk1,Spade,s2,green\nk2,Rake,s2,red\nk3,Pan,s3,red\n"
                      "k4,Seed,s1,green\n",
    "mart_items.csv": "item_key,title,category,colour\nk1,Spade,garden-tools,green\nk3,Pan,pans,red\n"
                      "m9,Thing,misc,blue\n",
    "crosswalk.csv": "source_scheme,source_code,concept_code,match_type\nshop,s1,A,closeMatch\n"
                     "shop,s2,A1,exactMatch\nshop,s3,B1,closeMatch\nmart,garden-tools,A1,closeMatch\n"
                     "mart,pans,B,broadMatch\n",
}


def tiny_layer(tmp_path: Path, *, with_crosswalk: bool = True) -> str:
    """A hand-made layer without embedding or mapping: a 5-concept tree reference `ref`, sources `shop` (tree) and
    `mart` (tags), 7 items, and (by default) 5 accepted edges imported from `crosswalk.csv`, placed."""
    for name, text in TINY.items():
        (tmp_path / name).write_text(text, encoding="utf-8")
    store = str(tmp_path / "tiny.lbug")
    run = lambda *a: main(["--store", store, *a])
    assert run("ingest", "reference", str(tmp_path / "ref.csv"), "--format", "tree", "--scheme", "ref") == 0
    assert run("ingest", "source", "shop", str(tmp_path / "shop.csv")) == 0
    assert run("ingest", "source", "mart", str(tmp_path / "mart.csv"), "--format", "tags") == 0
    assert run("ingest", "items", "shop", str(tmp_path / "shop_items.csv")) == 0
    assert run("ingest", "items", "mart", str(tmp_path / "mart_items.csv")) == 0
    if with_crosswalk:
        assert run("import", "mappings", str(tmp_path / "crosswalk.csv"), "--by", "tester") == 0
    return store
