"""Bad input through the CLI: one line on stderr naming the file (and line/field), exit 2, store unchanged.

Runs on both engines (`engine` in conftest.py); the lock test is about the embedded engine's file and stays there.
"""

import json
import subprocess
import sys

import pytest

from pipeline.cli import main

TTL = """@prefix skos: <http://www.w3.org/2004/02/skos/core#> .
@prefix ex: <http://example.org/r/> .
ex:G a skos:Concept ; skos:prefLabel "Garden"@en ; skos:notation "G" .
ex:T a skos:Concept ; skos:prefLabel "Garden tools"@en ; skos:notation "T" ; skos:broader ex:G .
"""


def _seeded(tmp_path, cli: list[str]) -> list[str]:
    ttl = tmp_path / "ref.ttl"
    ttl.write_text(TTL)
    tree = tmp_path / "src.csv"
    tree.write_text("code,label,parent_code\n1,Outdoor,\n2,Pruners,1\n")
    assert main([*cli, "ingest", "reference", str(ttl), "--scheme", "ref"]) == 0
    assert main([*cli, "ingest", "source", "shop", str(tree)]) == 0
    return cli


@pytest.fixture()
def store(tmp_path, engine):
    """Global options naming a seeded store: --store PATH or --neo4j URI."""
    return _seeded(tmp_path, engine.cli)


@pytest.fixture()
def ladybug_store(tmp_path):
    return _seeded(tmp_path, ["--store", str(tmp_path / "s.lbug")])


def _snapshot(store, capsys):
    capsys.readouterr()
    assert main([*store, "--json", "status"]) == 0
    status = json.loads(capsys.readouterr().out)
    return status["nodes"], status["edges"], status["schemes"]


@pytest.mark.parametrize(
    "args, content, expect",
    [
        (["ingest", "reference"], "@prefix ex: <http://x/> .\nex:a ex:b ", "bad.ttl"),
        (["ingest", "reference", "--root", "http://example.org/r/NOPE"], TTL, "NOPE"),
        (["ingest", "source", "shop"], "code,name\n1,x\n", "label"),
        (["ingest", "source", "shop"], "", "empty"),
        (["ingest", "source", "shop"], "code,label,parent_code\n1,A,9\n", "9"),
        (["ingest", "source", "shop"], "code,label,parent_code\n1,A,2\n2,B,1\n", "cycle"),
        (["ingest", "source", "shop"], b"code,label,parent_code\n1,Caf\xe9,\n", "UTF-8"),
    ],
)
def test_bad_files_exit_2_and_leave_the_store_alone(tmp_path, store, capsys, args, content, expect):
    bad = tmp_path / "bad.ttl" if args[1] == "reference" else tmp_path / "bad.csv"
    bad.write_bytes(content if isinstance(content, bytes) else content.encode())
    before = _snapshot(store, capsys)
    code = main([*store, *args, str(bad)])
    err = capsys.readouterr().err
    assert code == 2, err
    assert expect in err
    assert err.startswith("graftwork: ")
    assert _snapshot(store, capsys) == before


def test_a_missing_file_is_bad_input(tmp_path, store, capsys):
    assert main([*store, "ingest", "source", "shop", str(tmp_path / "nope.csv")]) == 2
    assert "nope.csv" in capsys.readouterr().err


def test_items_for_an_unknown_source_exit_2(tmp_path, store, capsys):
    items = tmp_path / "items.csv"
    items.write_text("item_key,title,category\n1,Spade,2\n")
    assert main([*store, "ingest", "items", "other", str(items)]) == 2
    assert "other" in capsys.readouterr().err


def test_bad_item_rows_go_to_the_reject_file_and_good_rows_are_kept(tmp_path, store, capsys):
    items = tmp_path / "items.csv"
    items.write_text("item_key,title,category\n1,Spade,2\n,No key,2\n3,Unknown cat,99\n4,Loppers,2\n")
    rejects = tmp_path / "rejects.csv"
    capsys.readouterr()
    assert main([*store, "--json", "ingest", "items", "shop", str(items), "--rejects", str(rejects)]) == 0
    summary = json.loads(capsys.readouterr().out)
    assert summary["rows_items"] == 2 and summary["rejected"] == 2
    text = rejects.read_text()
    assert "3" in text and "99" in text  # line 3 (empty key) and the unknown category


def test_a_locked_store_exits_3(ladybug_store):
    store = ladybug_store[1]
    code = (
        "import sys, time\n"
        "from pipeline.store import open_store\n"
        f"s = open_store({store!r})\n"
        "print('held', flush=True)\n"
        "time.sleep(30)\n"
    )
    holder = subprocess.Popen([sys.executable, "-c", code], stdout=subprocess.PIPE, text=True)
    try:
        assert holder.stdout.readline().strip() == "held"
        out = subprocess.run([sys.executable, "-m", "pipeline.cli", *ladybug_store, "map"],
                             capture_output=True, text=True, timeout=120)
        assert out.returncode == 3, out.stderr
        assert "held for writing by pid" in out.stderr  # names the job that holds it
    finally:
        holder.kill()
        holder.wait()
