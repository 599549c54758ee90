"""Evaluation against a real (tiny) store whose edges are written by hand, and the report files it produces."""

import json
import struct

import pandas as pd
import pytest

from pipeline.cli import main
from pipeline.errors import BadInput, NotFound
from pipeline.match.evaluate import evaluate, gather
from pipeline.match.report import build_report, run_evaluation, write_outputs
from pipeline.store import open_store

REF = "code,label,parent_code\nA,Garden,\nA1,Garden tools,A\nA11,Pruners,A1\nA12,Spades,A1\nB,Kitchen,\nB1,Kettles,B\n"
SRC = "code,label,parent_code\n1,Outdoor,\n11,Cutting tools,1\n12,Digging,1\n2,Cooking,\n21,Water boilers,2\n"
# (category code, concept code, score, rank, status)
EDGES = [("11", "A11", 0.92, 1, "auto"), ("11", "A12", 0.50, 2, "proposed"),
         ("12", "A1", 0.60, 1, "proposed"), ("12", "A12", 0.55, 2, "proposed"),
         ("21", "B", 0.85, 1, "auto"), ("21", "B1", 0.80, 2, "proposed")]
KEY = {"11": {"A11"}, "12": {"A12"}, "21": {"B1"}, "99": {"A"}}  # 99 is not in the source


@pytest.fixture()
def store_path(tmp_path):
    (tmp_path / "ref.csv").write_text(REF)
    (tmp_path / "src.csv").write_text(SRC)
    path = str(tmp_path / "s.lbug")
    assert main(["--store", path, "ingest", "reference", str(tmp_path / "ref.csv"), "--format", "tree",
                 "--scheme", "ref"]) == 0
    assert main(["--store", path, "ingest", "source", "shop", str(tmp_path / "src.csv")]) == 0
    rows = pd.DataFrame([{"category": f"shop:{a}", "concept": f"ref:{b}", "score": s, "rank": r,
                          "match_type": "closeMatch", "status": st, "method": "hand", "evidence": "{}",
                          "run_id": "t"} for a, b, s, r, st in EDGES])
    with open_store(path) as s:
        s.bulk("machine_edges_create", rows)
    return path


def test_evaluate_on_hand_written_edges(store_path):
    with open_store(store_path, read_only=True) as s:
        m = evaluate(s, "shop", KEY, k=2)
    assert m["scored"] == 4 and m["not_in_source"] == 1 and m["unknown_targets"] == 0
    assert m["top1"] == 1 / 4                      # only 11
    assert m["hit@2"] == 3 / 4                     # 11, 12 (rank 2), 21 (rank 2)
    assert m["mrr"] == pytest.approx((1 + 0.5 + 0.5) / 4)
    assert m["auto_edges"] == 2 and m["auto_precision"] == 0.5   # 11 right, 21 -> B wrong
    assert m["auto_coverage"] == 2 / 4
    assert m["coverage"] == 3 / 4
    # partial: 11 exact (1), 12 -> A1 parent of A12 (0.5), 21 -> B parent of B1 (0.5), 99 none (0)
    assert m["partial"] == pytest.approx(2 / 4)
    assert m["partial_breakdown"] == {"exact": 1, "too_broad": 2, "too_narrow": 0, "other": 0, "none": 1}


def test_unknown_targets_are_counted(store_path):
    with open_store(store_path, read_only=True) as s:
        assert evaluate(s, "shop", {"11": {"A11", "ZZ"}})["unknown_targets"] == 1


def test_unknown_source_is_not_found(store_path):
    with open_store(store_path, read_only=True) as s, pytest.raises(NotFound, match="shop"):
        evaluate(s, "nope", KEY)


def test_report_has_curves_and_definitions(store_path):
    with open_store(store_path, read_only=True) as s:
        report = build_report(gather(s, "shop", KEY), k=5)
    assert [p["threshold"] for p in report["precision_coverage"]["points"]] == [0.92, 0.85, 0.6]
    assert report["precision_coverage"]["best_at_target"]["coverage"] == 1 / 4
    assert sum(b["count"] for b in report["reliability"]["bins"]) == 3
    assert "0.5**h" in report["definitions"]["partial"]
    assert report["ablation"] is None


def _png_size(path):
    data = path.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n"  # PNG signature (PNG specification, ISO/IEC 15948)
    assert data[12:16] == b"IHDR"
    return struct.unpack(">II", data[16:24])


def test_outputs_are_a_valid_png_and_json(store_path, tmp_path):
    with open_store(store_path, read_only=True) as s:
        out = run_evaluation(s, "shop", KEY, out=tmp_path / "out")
    png, js = tmp_path / "out" / "curves.png", tmp_path / "out" / "report.json"
    assert out["written"] == {"report": str(js), "curves": str(png)}
    width, height = _png_size(png)
    assert width > 600 and height > 300
    from matplotlib.image import imread

    assert imread(png).shape[:2] == (height, width)
    assert json.loads(js.read_text())["metrics"]["top1"] == 0.25
    assert sorted(p.name for p in (tmp_path / "out").iterdir()) == ["curves.png", "report.json"]  # no temp files


def test_out_that_is_a_file_is_bad_input_and_nothing_written(store_path, tmp_path):
    target = tmp_path / "taken"
    target.write_text("x")
    with open_store(store_path, read_only=True) as s, pytest.raises(BadInput, match="--out"):
        run_evaluation(s, "shop", KEY, out=target)
    assert target.read_text() == "x"


def test_a_failed_plot_leaves_no_files(store_path, tmp_path, monkeypatch):
    from pipeline.match import plots

    def boom(report, path, **kw):
        raise RuntimeError("plot failed")

    monkeypatch.setattr(plots, "write_curves", boom)
    with open_store(store_path, read_only=True) as s:
        report = build_report(gather(s, "shop", KEY))
    with pytest.raises(RuntimeError):
        write_outputs(report, tmp_path / "out")
    assert list((tmp_path / "out").iterdir()) == []
