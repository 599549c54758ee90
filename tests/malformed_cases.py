"""Shared set-up for the malformed-input suite: a small seeded store, and one call that runs a command on a copy
of it and reports the exit code, stderr and whether the layer changed (canonical export, tests/graph_snapshot.py)."""

from __future__ import annotations

import contextlib
import io
from dataclasses import dataclass
from pathlib import Path

from crash_harness import copy_store
from graph_snapshot import snapshot_of

from pipeline.cli import main

TTL = """@prefix skos: <http://www.w3.org/2004/02/skos/core#> .
@prefix ex: <http://example.org/r/> .
ex:G a skos:Concept ; skos:prefLabel "Garden"@en ; skos:notation "G" .
ex:T a skos:Concept ; skos:prefLabel "Garden tools"@en ; skos:notation "T" ; skos:broader ex:G .
"""
TREE = "code,label,parent_code\n1,Outdoor,\n2,Pruners,1\n"
ITEMS = "item_key,title,category\nk1,Bypass pruner,2\n"


def build_template(folder: Path) -> Path:
    """reference `ref` (G, T), source `shop` (1, 2) with one item, all through the CLI."""
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "ref.ttl").write_text(TTL)
    (folder / "tree.csv").write_text(TREE)
    (folder / "items.csv").write_text(ITEMS)
    store = folder / "s.lbug"
    with contextlib.redirect_stdout(io.StringIO()):
        assert main(["--store", str(store), "ingest", "reference", str(folder / "ref.ttl"), "--scheme", "ref"]) == 0
        assert main(["--store", str(store), "ingest", "source", "shop", str(folder / "tree.csv")]) == 0
        assert main(["--store", str(store), "ingest", "items", "shop", str(folder / "items.csv")]) == 0
    return store


@dataclass
class Result:
    code: int
    err: str
    out: str
    changed: bool
    store: Path


def run_on_copy(template: Path, tmp_path: Path, args: list[str], name: str | None = None,
                content: str | bytes | None = None) -> Result:
    """Write `content` to tmp_path/name (if given), run `graftwork --store COPY *args [FILE]` in-process."""
    store = copy_store(template, tmp_path / "store" / "s.lbug")
    argv = ["--store", str(store), *args]
    if name is not None:
        f = tmp_path / name
        if content is not None:
            f.write_bytes(content if isinstance(content, bytes) else content.encode("utf-8"))
        argv.append(str(f))
    before = snapshot_of(store)
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(argv)
    return Result(code, err.getvalue(), out.getvalue(), snapshot_of(store) != before, store)
