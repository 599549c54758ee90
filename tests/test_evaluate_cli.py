"""`graftwork evaluate` wiring: exit codes, printed figures, files written, and the ablation restoring the edges."""

import json

import pytest

from pipeline.cli import main

REF = ("code,label,parent_code\nG,Garden,\nGT,Garden tools,G\nGP,Pruning shears,GT\nGS,Spades and shovels,GT\n"
       "K,Kitchen,\nKE,Electric kettles,K\nKP,Cooking pots,K\n")
SRC = ("code,label,parent_code\n1,Garden,\n11,Garden tools,1\n111,Pruning shears,11\n112,Shovels and spades,11\n"
       "2,Kitchen,\n21,Kettles electric,2\n22,Pots for cooking,2\n")
KEY = "source_code,reference_code\n111,GP\n112,GS\n21,KE\n22,KP\n11,GT\n"


@pytest.fixture(scope="module")
def mapped(tmp_path_factory):
    tmp = tmp_path_factory.mktemp("evcli")
    (tmp / "ref.csv").write_text(REF)
    (tmp / "src.csv").write_text(SRC)
    (tmp / "key.csv").write_text(KEY)
    store = str(tmp / "s.lbug")
    run = lambda *a: main(["--store", store, *a])
    assert run("ingest", "reference", str(tmp / "ref.csv"), "--format", "tree", "--scheme", "ref") == 0
    assert run("ingest", "source", "shop", str(tmp / "src.csv")) == 0
    assert run("embed") == 0
    assert run("map") == 0
    return tmp, store


def _json(capsys, *args):
    capsys.readouterr()
    rc = main(list(args))
    out = capsys.readouterr()
    return rc, (json.loads(out.out) if rc == 0 else None), out.err


def test_evaluate_prints_figures_and_writes_files(mapped, capsys, tmp_path):
    tmp, store = mapped
    rc, out, _ = _json(capsys, "--store", store, "--json", "evaluate", "--answer-key", str(tmp / "key.csv"),
                       "--source", "shop", "--k", "3", "--out", str(tmp_path / "o"))
    assert rc == 0
    assert out["scored"] == 5 and "hit@3" in out and 0 <= out["top1"] <= 1
    assert set(out["partial_breakdown"]) == {"exact", "too_broad", "too_narrow", "other", "none"}
    assert (tmp_path / "o" / "curves.png").read_bytes()[:4] == b"\x89PNG"
    report = json.loads((tmp_path / "o" / "report.json").read_text())
    assert report["k"] == 3 and report["source"] == "shop" and report["reference"] == "ref"


def test_evaluate_without_out_writes_nothing(mapped, capsys, tmp_path, monkeypatch):
    tmp, store = mapped
    monkeypatch.chdir(tmp_path)
    rc, out, _ = _json(capsys, "--store", store, "--json", "evaluate", "--answer-key", str(tmp / "key.csv"),
                       "--source", "shop")
    assert rc == 0 and "written" not in out
    assert list(tmp_path.iterdir()) == []


def test_bad_answer_key_exits_2_naming_the_line(mapped, capsys, tmp_path):
    _, store = mapped
    bad = tmp_path / "bad.csv"
    bad.write_text("source_code,reference_code\n111,GP\n,GS\n")
    rc, _, err = _json(capsys, "--store", store, "evaluate", "--answer-key", str(bad), "--source", "shop")
    assert rc == 2
    assert "bad.csv:3 [source_code]" in err


def test_unknown_source_exits_2(mapped, capsys):
    tmp, store = mapped
    rc, _, err = _json(capsys, "--store", store, "evaluate", "--answer-key", str(tmp / "key.csv"),
                       "--source", "nope")
    assert rc == 2 and "nope" in err


def test_missing_required_option_is_a_usage_error(mapped, capsys):
    _, store = mapped
    with pytest.raises(SystemExit) as exc:
        main(["--store", store, "evaluate", "--source", "shop"])
    assert exc.value.code == 2


def test_ablation_reports_rows_and_leaves_the_edges_as_they_were(mapped, capsys, tmp_path):
    tmp, store = mapped
    before, after = tmp_path / "before.csv", tmp_path / "after.csv"
    assert main(["--store", store, "export", "mappings", "--candidates", "5", str(before)]) == 0
    rc, out, _ = _json(capsys, "--store", store, "--json", "evaluate", "--answer-key", str(tmp / "key.csv"),
                       "--source", "shop", "--ablation", "--out", str(tmp_path / "o"))
    assert rc == 0
    from pipeline.match.ablation import known_features

    features = known_features()
    if features is None:
        assert out["ablation"] == [] and out["ablation_skipped"][0]["feature"] == "*"
    else:
        assert out["ablation"][0]["without"] == "-"
        ran = {r["without"] for r in out["ablation"]} | {s["feature"] for s in out.get("ablation_skipped", [])}
        assert ran == {"-", *features}
        assert out["ablation"][0]["delta_top1"] == 0.0
    assert main(["--store", store, "export", "mappings", "--candidates", "5", str(after)]) == 0
    assert _without_run_ids(before) == _without_run_ids(after)
    capsys.readouterr()
    assert main(["--store", store, "--json", "status"]) == 0
    runs = json.loads(capsys.readouterr().out)["runs"]
    assert any(r["job"] == "evaluate" and r["status"] == "ok" for r in runs)


def _without_run_ids(path):
    import pandas as pd

    df = pd.read_csv(path, dtype=str, keep_default_na=False)
    return df.drop(columns=[c for c in df.columns if c in ("run_id", "decided_at")]).to_dict("records")


def test_ablation_plan_repeats_the_last_map_runs_settings(mapped, monkeypatch):
    """One re-map per feature, the baseline, then the last run's own settings when it switched something off."""
    from pipeline.match import map_job
    from pipeline.match.ablation import ablate, known_features, last_map_settings
    from pipeline.store import open_store

    features = known_features()
    if features is None:
        pytest.skip("this build's map job cannot switch features off")
    _, store = mapped
    assert main(["--store", store, "map", "--without", features[-1], "--auto-threshold", "0.7"]) == 0
    calls = []
    monkeypatch.setattr(map_job, "map_sources", lambda s, **kw: calls.append(kw["settings"]))
    with open_store(store) as s:
        last = last_map_settings(s)
        assert last.auto_threshold == 0.7 and last.disabled == frozenset({features[-1]})
        result = ablate(s, "shop", {"111": {"GP"}})
    assert [set(c.disabled) for c in calls] == [{f} for f in features] + [set(), {features[-1]}]
    assert all(c.auto_threshold == 0.7 for c in calls)
    assert result["settings"]["disabled"] == [features[-1]]
    monkeypatch.undo()
    assert main(["--store", store, "map"]) == 0  # leave the module's store as the other tests expect
