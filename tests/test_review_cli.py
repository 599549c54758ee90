"""`graftwork review ...` wiring: output, exit codes, the sheet on disk."""

import json

import pytest

from pipeline.cli import main
from review_graphs import build


@pytest.fixture
def store(tmp_path):
    return build(tmp_path)


def test_list_json_and_text(store, capsys):
    assert main(["--store", store, "--json", "review", "list", "uncertain"]) == 0
    rows = json.loads(capsys.readouterr().out)
    assert [(r["source"], r["category_code"], r["items"]) for r in rows] == [("shop", "3", 3), ("shop", "5", 2)]
    assert main(["--store", store, "review", "list", "unmapped", "--source", "shop"]) == 0
    assert "Oddments" in capsys.readouterr().out


def test_list_csv_then_import(store, tmp_path, capsys):
    sheet = tmp_path / "q.csv"
    assert main(["--store", store, "review", "list", "uncertain", "--csv", str(sheet)]) == 0
    text = sheet.read_text().splitlines()
    text[1] = text[1][: text[1].rindex(",,")] + ",accept,"  # first row: decision=accept, note empty
    sheet.write_text("\n".join(text) + "\n")
    capsys.readouterr()
    assert main(["--store", store, "--json", "review", "import", str(sheet), "--by", "ana"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert (out["status"], out["applied"]) == ("applied", 1)


def test_accept_history_and_reopen(store, capsys):
    assert main(["--store", store, "review", "accept", "shop", "3", "LM", "--note", "ok", "--by", "ana"]) == 0
    capsys.readouterr()
    assert main(["--store", store, "--json", "review", "history", "shop", "3"]) == 0
    hist = json.loads(capsys.readouterr().out)
    assert [h["action"] for h in hist] == ["proposed", "proposed", "accepted", "superseded"]
    assert main(["--store", store, "review", "reopen", "shop", "3"]) == 0


def test_remap_by_label_and_search(store, capsys):
    assert main(["--store", store, "review", "remap", "shop", "6", "Cookware"]) == 0
    capsys.readouterr()
    assert main(["--store", store, "--json", "review", "search", "cook"]) == 0
    assert json.loads(capsys.readouterr().out)[0]["code"] == "KC"


def test_bad_decisions_exit_2_with_one_line(store, capsys):
    assert main(["--store", store, "review", "accept", "shop", "99", "LM"]) == 2
    err = capsys.readouterr().err
    assert err.startswith("graftwork: ") and "99" in err
    assert main(["--store", store, "review", "reject", "shop", "3", "NOPE"]) == 2


def test_pending_is_empty_on_a_quiet_store(store, capsys):
    assert main(["--store", store, "--json", "review", "pending"]) == 0
    assert json.loads(capsys.readouterr().out) == {"pending": [], "refused_at_replay": []}
