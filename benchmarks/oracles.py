"""Mapping quality on the official correspondence tables in ../shared/oracles/, measured through the CLI.

    python benchmarks/oracles.py                            # every table found, embedded engine, static embedder
    python benchmarks/oracles.py --only naics2017-to-isic4 --ablation
    python benchmarks/oracles.py --learn-fraction 0.2       # also learn from 20% of the key, score the other 80%

For each table folder (source_tree.csv, reference_tree.csv, correspondence.csv; see the folder's SOURCE.md for
publisher and licence) it converts the reference tree to SKOS Turtle with rdflib, then runs `graftwork ingest
reference`, `ingest source`, `embed`, `map` and `evaluate --out` on a fresh store, reads the report.json that
`evaluate` wrote, prints the figures beside the targets of issue 3 and writes everything as JSON. Nothing here
tunes anything: the tables are only read, and the same commands run on each.

With `--learn-fraction F` (needs `graftwork map --learn FILE`; skipped with a note when this build has none): the
answer key's source codes are split at random (seeded) into F to learn from and 1-F to score; the unsupervised
figure is scored on the same held-out codes, so the two are comparable. The same share is also imported as accepted
decisions into a copy of the store (`import mappings`), mapped plainly, and scored on the same held-out codes.
"""

from __future__ import annotations

import argparse
import contextlib
import csv
import io
import json
import os
import random
import re
import shutil
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from tests.oracles import tree_csv_to_skos  # noqa: E402  (the same conversion the oracle tests use)

from pipeline.cli import build_parser
from pipeline.cli import main as cli

ROOT = Path(__file__).resolve().parents[1]
DEFAULT_ORACLES = Path(os.environ.get("GRAFTWORK_ORACLES", ROOT.parent / "shared" / "oracles"))
NEEDED = ("source_tree.csv", "reference_tree.csv", "correspondence.csv")

# Issue 3 targets, each "measured >= target". learn_gain: top-1 on the held-out codes after `map --learn` minus
# top-1 on the same codes without labels.
TARGETS = {
    "naics2017-to-isic4": {"top1": 0.75, "hit@5": 0.93, "auto_precision": 0.95, "auto_coverage": 0.60,
                           "learn_gain": 0.10},
    "nace2-to-isic4": {"top1": 0.97},
}
SHOWN = ("top1", "hit@5", "mrr", "coverage", "auto_coverage", "auto_precision", "auto_rank1_precision", "auto_f1",
         "partial")

HEAD = {"auto_coverage": "auto cov", "auto_precision": "auto P", "auto_rank1_precision": "auto P rk1",
        "auto_f1": "auto F1"}


def graftwork(store: Path, *args: str) -> tuple[dict | None, float]:
    """Run one CLI command in-process with --json; (parsed stdout or None, seconds). Raises on a non-zero exit."""
    buf, err = io.StringIO(), io.StringIO()
    start = time.perf_counter()
    with contextlib.redirect_stdout(buf), contextlib.redirect_stderr(err):
        rc = cli(["--store", str(store), "--json", *args])
    elapsed = time.perf_counter() - start
    if rc != 0:
        raise RuntimeError(f"graftwork {' '.join(args)} exited {rc}: {err.getvalue().strip()}")
    text = buf.getvalue().strip()
    return (json.loads(text.splitlines()[-1]) if text else None), elapsed


def map_learn_option() -> str | None:
    """'--learn' when this build's `map` takes a labelled file with it, else None."""
    parser = build_parser()
    for action in parser._subparsers._group_actions:  # argparse has no public walk over sub-commands
        mp = action.choices.get("map")
        if mp is None:
            continue
        for a in mp._actions:
            if "--learn" in a.option_strings and a.nargs != 0:
                return "--learn"
    return None


def split_key(rows: list[dict], fraction: float, seed: int) -> tuple[list[dict], list[dict]]:
    """Split answer-key rows by source code (all rows of a code stay together), seeded."""
    codes = sorted({r["source_code"] for r in rows})
    random.Random(seed).shuffle(codes)
    learn = set(codes[: round(fraction * len(codes))])
    return [r for r in rows if r["source_code"] in learn], [r for r in rows if r["source_code"] not in learn]


def write_key(rows: list[dict], path: Path) -> Path:
    with open(path, "w", newline="", encoding="utf-8") as fh:
        w = csv.DictWriter(fh, fieldnames=["source_code", "reference_code"])
        w.writeheader()
        w.writerows({"source_code": r["source_code"], "reference_code": r["reference_code"]} for r in rows)
    return path


def scheme_keys(folder: Path) -> tuple[str, str]:
    """(source key, reference key) from a folder named `<source>-to-<reference>`, else generic names."""
    parts = folder.name.split("-to-")
    ok = len(parts) == 2 and all(re.fullmatch(r"[A-Za-z0-9][A-Za-z0-9_.-]*", p) for p in parts)
    return (parts[0], parts[1]) if ok and parts[0] != parts[1] else ("source", "reference")


def evaluate(store: Path, key: Path, out: Path, source: str, *extra: str) -> tuple[dict, float]:
    _, seconds = graftwork(store, "evaluate", "--answer-key", str(key), "--source", source, "--out", str(out),
                           *extra)
    return json.loads((out / "report.json").read_text(encoding="utf-8")), seconds


def run_table(folder: Path, work: Path, *, embedder: str, ablation: bool, learn_fraction: float | None,
              seed: int) -> dict:
    if work.exists():
        shutil.rmtree(work)
    work.mkdir(parents=True)
    store = work / "bench.lbug"
    times = {}
    source, reference = scheme_keys(folder)
    ttl = tree_csv_to_skos(folder / "reference_tree.csv", work / "reference.ttl", f"http://example.org/{reference}/")
    _, times["ingest_reference"] = graftwork(store, "ingest", "reference", str(ttl), "--scheme", reference)
    _, times["ingest_source"] = graftwork(store, "ingest", "source", source, str(folder / "source_tree.csv"))
    _, times["embed"] = graftwork(store, "embed", "--embedder", embedder)
    mapped, times["map"] = graftwork(store, "map")
    key = folder / "correspondence.csv"
    report, times["evaluate"] = evaluate(store, key, work / "report", source,
                                         *(["--ablation"] if ablation else []))
    result = {"table": folder.name, "work": str(work), "map": mapped, "metrics": report["metrics"],
              "best_at_precision_target": report["precision_coverage"]["best_at_target"],
              "ece": report["reliability"]["ece"], "ablation": report["ablation"], "seconds": times}
    if learn_fraction:
        result["learn"] = run_learn(store, key, work, source, learn_fraction, seed, times)
    return result


def run_learn(store: Path, key: Path, work: Path, source: str, fraction: float, seed: int, times: dict) -> dict:
    option = map_learn_option()
    if option is None:
        return {"skipped": "this build's `graftwork map` has no --learn FILE option"}
    with open(key, newline="", encoding="utf-8") as fh:
        rows = list(csv.DictReader(fh))
    learn_rows, held_rows = split_key(rows, fraction, seed)
    learn_csv, held_csv = write_key(learn_rows, work / "learn.csv"), write_key(held_rows, work / "held_out.csv")
    before, _ = evaluate(store, held_csv, work / "held_out_unsupervised", source)
    decided = run_decided(store, learn_rows, held_csv, work, source, times)
    _, times["map_learn"] = graftwork(store, "map", "--source", source, option, str(learn_csv))
    after, _ = evaluate(store, held_csv, work / "held_out_learned", source)
    b, a = before["metrics"], after["metrics"]
    return {"fraction": fraction, "seed": seed, "learned_codes": len({r["source_code"] for r in learn_rows}),
            "held_out_codes": a["scored"], "unsupervised": b, "learned": a, "learn_gain": a["top1"] - b["top1"],
            "decided": decided["metrics"], "decided_gain": decided["metrics"]["top1"] - b["top1"]}


def run_decided(store: Path, learn_rows: list[dict], held_csv: Path, work: Path, source: str, times: dict) -> dict:
    """The same labels as a steward's accepted decisions instead (`import mappings`), then a plain `map`, on a copy
    of the store: how much the decided codes help the others (parent context, the siblings feature)."""
    copy = work / "decided.lbug"
    shutil.copy(store, copy)
    sheet = work / "decided.csv"
    with open(sheet, "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(["source_scheme", "source_code", "concept_code", "status"])
        for r in learn_rows:
            w.writerow([source, r["source_code"], r["reference_code"], "accepted"])
    _, times["import_decided"] = graftwork(copy, "import", "mappings", str(sheet), "--by", "benchmark")
    _, times["map_decided"] = graftwork(copy, "map", "--source", source)
    report, _ = evaluate(copy, held_csv, work / "held_out_decided", source)
    return report


def check_targets(result: dict) -> list[dict]:
    rows = []
    for metric, target in TARGETS.get(result["table"], {}).items():
        if metric == "learn_gain":
            learn = result.get("learn") or {}
            value = learn.get("learn_gain")
            note = learn.get("skipped", "" if learn else "not run (--learn-fraction)")
        else:
            value, note = result["metrics"].get(metric), ""
        rows.append({"table": result["table"], "metric": metric, "measured": value, "target": target,
                     "met": None if value is None else value >= target, "note": note})
    return rows


def print_report(results: list[dict]) -> None:
    def f(v):
        return "-" if v is None else f"{v:.3f}" if isinstance(v, float) else str(v)

    print(f"\n{'table':<22}" + "".join(f"{HEAD.get(m, m):>12}" for m in SHOWN))
    for r in results:
        print(f"{r['table']:<22}" + "".join(f"{f(r['metrics'].get(m)):>12}" for m in SHOWN))
    print(f"\n{'table':<22}{'metric':<16}{'measured':>10}{'target':>10}  met")
    for r in results:
        for t in check_targets(r):
            met = "-" if t["met"] is None else "yes" if t["met"] else "NO"
            print(f"{t['table']:<22}{t['metric']:<16}{f(t['measured']):>10}{'>= ' + f(t['target']):>10}  {met}"
                  + (f"  ({t['note']})" if t["note"] else ""))
    for r in results:
        best = r["best_at_precision_target"]
        if best:
            print(f"\n{r['table']}: most coverage with precision >= 0.95 (threshold found with the key): "
                  f"coverage {best['coverage']:.3f} at score >= {best['threshold']:.4f}")
        learn = r.get("learn")
        if learn and "learn_gain" in learn:
            print(f"{r['table']}: learn on {learn['learned_codes']} codes, held-out {learn['held_out_codes']}: "
                  f"top-1 {learn['unsupervised']['top1']:.3f} -> {learn['learned']['top1']:.3f} "
                  f"(gain {learn['learn_gain']:+.3f}); the same codes as accepted decisions instead: "
                  f"{learn['decided']['top1']:.3f} (gain {learn['decided_gain']:+.3f})")
        abl = r.get("ablation")
        if abl:
            print(f"\n{r['table']} ablation (each feature switched off in turn; deltas vs all on)")
            print(f"  {'without':<10}{'top1':>8}{'d top1':>9}{'hit@5':>8}{'auto P':>8}{'auto cov':>9}{'partial':>9}")
            for row in abl["rows"]:
                print(f"  {row['without']:<10}{f(row['top1']):>8}{row['delta_top1']:>+9.3f}{f(row.get('hit@5')):>8}"
                      f"{f(row['auto_precision']):>8}{f(row['auto_coverage']):>9}{f(row['partial']):>9}")
            for s in abl["skipped"]:
                print(f"  skipped {s['feature']}: {s['reason']}")
        print(f"{r['table']} seconds: " + ", ".join(f"{k} {v:.1f}" for k, v in r["seconds"].items()))


def main(argv: list[str] | None = None) -> int:
    p = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    p.add_argument("--oracles", type=Path, default=DEFAULT_ORACLES, help="folder of table folders")
    p.add_argument("--only", nargs="*", help="table folder names (default: all found)")
    p.add_argument("--work", type=Path, help="working folder (default: a temporary one, kept)")
    p.add_argument("--embedder", default="static")
    p.add_argument("--ablation", action="store_true", help="also run the per-feature ablation")
    p.add_argument("--learn-fraction", type=float, help="learn from this share of the key, score the rest")
    p.add_argument("--seed", type=int, default=7)
    p.add_argument("--json", type=Path, help="write all results here (default: <work>/oracles.json)")
    args = p.parse_args(argv)
    if args.learn_fraction is not None and not 0 < args.learn_fraction < 1:
        p.error("--learn-fraction must be between 0 and 1")
    tables = sorted(d for d in args.oracles.iterdir() if d.is_dir() and all((d / n).is_file() for n in NEEDED)) \
        if args.oracles.is_dir() else []
    if args.only:
        tables = [d for d in tables if d.name in args.only]
    if not tables:
        print(f"no oracle tables under {args.oracles} (set GRAFTWORK_ORACLES or --oracles)", file=sys.stderr)
        return 2
    work = args.work or Path(tempfile.mkdtemp(prefix="graftwork-oracles-"))
    results = []
    for d in tables:
        print(f"{d.name}: running ingest, embed, map, evaluate ...", file=sys.stderr, flush=True)
        results.append(run_table(d, work / d.name, embedder=args.embedder, ablation=args.ablation,
                                 learn_fraction=args.learn_fraction, seed=args.seed))
    print_report(results)
    out = args.json or work / "oracles.json"
    out.write_text(json.dumps({"results": results, "targets": [t for r in results for t in check_targets(r)],
                               "embedder": args.embedder, "cpus": os.cpu_count()}, indent=1, default=str) + "\n",
                   encoding="utf-8")
    print(f"\nJSON: {out}; reports and curves under {work}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
