"""Outside checks of the main job: map a published classification onto another through the CLI, embedded engine,
and score the top choice against the official correspondence table.

Tables (see each folder's SOURCE.md, read from ../shared/oracles/):
- NACE Rev.2 -> ISIC Rev.4: NACE Rev.2 structure published by Eurostat, ISIC Rev.4 by the United Nations Statistics
  Division (UNSD), and the UNSD/Eurostat NACE2_ISIC4 correspondence. Floor (TF-IDF char n-grams, top-1 over all
  nodes): 0.596.
- NAICS 2017 -> ISIC Rev.4: US Census Bureau concordance "2017 NAICS to ISIC 4.0"; ISIC from UNSD.
  Floor: 0.173 over all ISIC nodes, 0.421 over ISIC classes only.
The thresholds below are safe floors; the measured figures go to the benchmark report, not here.
"""

from pipeline.cli import main
from pipeline.match.evaluate import evaluate
from pipeline.store import open_store
from tests.oracles import answer_key, oracle_dir, tree_csv_to_skos


def _map_through_cli(tmp_path, folder, source_key):
    ttl = tree_csv_to_skos(folder / "reference_tree.csv", tmp_path / "isic.ttl", "http://example.org/isic4/")
    store = str(tmp_path / "o.lbug")
    assert main(["--store", store, "ingest", "reference", str(ttl), "--scheme", "isic4"]) == 0
    assert main(["--store", store, "ingest", "source", source_key, str(folder / "source_tree.csv")]) == 0
    assert main(["--store", store, "embed"]) == 0
    assert main(["--store", store, "map"]) == 0
    with open_store(store, read_only=True) as s:
        return evaluate(s, source_key, answer_key(folder))


def test_nace_to_isic_top1_through_the_cli(tmp_path):
    folder = oracle_dir("nace2-to-isic4")
    report = _map_through_cli(tmp_path, folder, "nace2")
    print(report)
    assert report["scored"] == 996
    assert report["top1"] >= 0.90  # issue target; the published-table floor is 0.596


def test_naics_to_isic_beats_the_published_floor(tmp_path):
    folder = oracle_dir("naics2017-to-isic4")
    report = _map_through_cli(tmp_path, folder, "naics2017")
    print(report)
    assert report["scored"] == 1057
    assert report["top1"] >= 0.421 + 0.05  # leaves-only floor plus a margin; all-nodes floor is 0.173


def test_naics_learning_from_a_fifth_of_the_key_helps_the_rest(tmp_path):
    """`map --learn` on a seeded random 20% of the NAICS 2017 -> ISIC Rev.4 concordance (US Census Bureau), scored
    on the other 80% against the unsupervised map of the same codes. Measured gain 6-7 points (benchmarks/
    oracles.py, seeds 7 and 11); the floor here is safe. The labelled pairs are kept with the model and dropped
    with it."""
    import csv
    import json
    import random

    folder = oracle_dir("naics2017-to-isic4")
    key = answer_key(folder)
    before = _map_through_cli(tmp_path, folder, "naics2017")  # builds tmp_path / "o.lbug"
    codes = sorted(key)
    random.Random(7).shuffle(codes)
    taught = set(codes[: round(0.2 * len(codes))])
    held = {c: v for c, v in key.items() if c not in taught}
    learn_file = tmp_path / "fifth.csv"
    with open(learn_file, "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(["source_code", "reference_code"])
        w.writerows((c, r) for c in sorted(taught) for r in sorted(key[c]))
    store = str(tmp_path / "o.lbug")
    with open_store(store, read_only=True) as s:
        unsupervised = evaluate(s, "naics2017", held)
    assert main(["--store", store, "map", "--learn", str(learn_file), "--source", "naics2017"]) == 0
    with open_store(store, read_only=True) as s:
        learned = evaluate(s, "naics2017", held)
        kept = json.loads(s.scalar("meta_get", key="scoring_model"))
    print(before["top1"], unsupervised["top1"], learned["top1"])
    assert learned["top1"] >= unsupervised["top1"] + 0.02
    assert sum(len(v) for v in kept["labels@isic4"]["naics2017"].values()) == sum(len(key[c]) for c in taught)
    assert main(["--store", store, "map", "--forget-model"]) == 0
    with open_store(store, read_only=True) as s:
        assert "labels@isic4" not in (s.scalar("meta_get", key="scoring_model") or "{}")
