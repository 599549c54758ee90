"""The full evaluation report of one source against an answer key: metrics, curves, optional ablation, files.

`run_evaluation` is what `graftwork evaluate` calls: it scores the edges as they are in the store, optionally runs
the per-evidence ablation (which re-maps the source, see `ablation.py`), and writes `report.json` and
`curves.png` into an output folder. Both files are written beside their final names first and then renamed, so a
failure leaves no half-written report.
"""

from __future__ import annotations

import json
import os
from datetime import UTC, datetime
from pathlib import Path

from pipeline.errors import BadInput, Problem
from pipeline.match.evaluate import (
    PARTIAL_RULE,
    Gathered,
    best_coverage_at_precision,
    flat_metrics,
    gather,
    precision_coverage_curve,
    reliability_curve,
)
from pipeline.store import Store

REPORT_FILE = "report.json"
CURVES_FILE = "curves.png"

DEFINITIONS = {
    "top1": "share of answer-key source codes whose rank-1 prediction is one of their targets",
    "hit@k": "share whose first k predictions contain a target",
    "mrr": "mean of 1/rank of the first correct prediction within the first k (0 when none)",
    "coverage": "share with at least one prediction (auto or proposed edge, or an accepted one)",
    "auto_coverage": "share with at least one auto edge",
    "auto_precision": "correct auto edges / auto edges, over (code, concept) pairs",
    "auto_recall": "correct auto edges / answer-key pairs",
    "auto_f1": "harmonic mean of auto_precision and auto_recall",
    "auto_rank1_precision": "share of codes with an auto rank-1 edge whose rank 1 is correct (1:n extras left out)",
    "partial": PARTIAL_RULE,
    "precision_coverage": "rank 1 accepted at score >= threshold: coverage and precision per distinct threshold",
    "reliability": "rank-1 scores in 10 equal bins: share correct vs mean score; ECE = weighted |gap|",
}


def build_report(data: Gathered, *, k: int = 5, ablation: dict | None = None,
                 precision_target: float = 0.95) -> dict:
    """A JSON-ready dict: `metrics` (as `evaluate`), curves, the operating point with the most coverage at
    `precision_target` (found with the answer key, so a diagnostic, not a claim about unlabelled data), ablation."""
    from pipeline import __version__

    curve = precision_coverage_curve(data.predictions, data.answer_key)
    return {
        "graftwork": __version__,
        "created_at": datetime.now(UTC).isoformat(timespec="seconds"),
        "source": data.source,
        "reference": data.reference,
        "k": k,
        "metrics": flat_metrics(data, k=k),
        "definitions": DEFINITIONS,
        "precision_coverage": {
            "points": curve,
            "precision_target": precision_target,
            "best_at_target": best_coverage_at_precision(curve, precision_target),
        },
        "reliability": reliability_curve(data.predictions, data.answer_key),
        "ablation": ablation,
    }


def write_outputs(report: dict, out_dir: str | Path) -> dict[str, str]:
    """Write report.json and curves.png into `out_dir` (created); both or neither replace older files."""
    from pipeline.match.plots import write_curves

    out = Path(out_dir)
    if out.exists() and not out.is_dir():
        raise BadInput(Problem("is not a folder", file=str(out), field="--out"))
    out.mkdir(parents=True, exist_ok=True)
    final = {"report": out / REPORT_FILE, "curves": out / CURVES_FILE}
    temp = {name: p.with_name(f".{p.name}.{os.getpid()}.tmp") for name, p in final.items()}
    try:
        temp["report"].write_text(json.dumps(report, indent=1, default=_jsonable) + "\n", encoding="utf-8")
        write_curves(report, temp["curves"])
        for name, path in final.items():
            os.replace(temp[name], path)
    finally:
        for p in temp.values():
            p.unlink(missing_ok=True)
    return {name: str(p) for name, p in final.items()}


def summary(report: dict, written: dict[str, str] | None = None) -> dict:
    """What the CLI prints: the headline metrics (rounded), the ablation table, the files written."""
    m = report["metrics"]
    out = {key: _round(v) for key, v in m.items() if key != "partial_breakdown"}
    if m.get("partial_breakdown"):
        out["partial_breakdown"] = m["partial_breakdown"]
    best = report["precision_coverage"]["best_at_target"]
    out[f"best_coverage_at_precision_{report['precision_coverage']['precision_target']:g}"] = (
        {"threshold": best["threshold"], "coverage": _round(best["coverage"]), "precision": _round(best["precision"])}
        if best else None)
    out["ece"] = _round(report["reliability"]["ece"])
    if report.get("ablation") is not None:
        out["ablation"] = [{key: _round(v) for key, v in row.items()} for row in report["ablation"]["rows"]]
        if report["ablation"]["skipped"]:
            out["ablation_skipped"] = report["ablation"]["skipped"]
    if written:
        out["written"] = written
    return out


def run_evaluation(store: Store, source: str, answer_key: dict[str, set[str]], *, reference: str | None = None,
                   k: int = 5, out: str | Path | None = None, ablation: bool = False, run_id: str = "") -> dict:
    """Score `source` against `answer_key`; with `ablation` also re-map once per feature (needs a writable store).
    Writes report.json and curves.png into `out` when given. Returns `summary(...)`."""
    if k < 1:
        raise BadInput(Problem(f"must be at least 1, got {k}", field="--k"))
    data = gather(store, source, answer_key, reference=reference)  # the edges as the user has them, first
    abl = None
    if ablation:
        from pipeline.match.ablation import ablate

        abl = ablate(store, source, answer_key, reference=data.reference, k=k, run_id=run_id)
    report = build_report(data, k=k, ablation=abl)
    written = write_outputs(report, out) if out is not None else None
    return summary(report, written)


def _round(v):
    return round(v, 4) if isinstance(v, float) else v


def _jsonable(v):
    if isinstance(v, (set, frozenset)):
        return sorted(v)
    if hasattr(v, "item"):  # numpy scalars
        return v.item()
    return str(v)
