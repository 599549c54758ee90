"""The evaluation figure: precision against coverage of rank-1 auto-accepting, and the reliability of the scores.

Drawn with matplotlib's Agg canvas directly (no pyplot, no global backend switch), so it works without a display
and does not disturb a caller that uses matplotlib itself.
"""

from __future__ import annotations

from pathlib import Path


def write_curves(report: dict, path: str | Path, *, precision_line: float = 0.95) -> Path:
    """Write a two-panel PNG for an evaluation report (`report.build_report`) to `path`; returns the path.

    Left: precision vs coverage as the rank-1 threshold falls, with this run's auto edges marked. Right: mean
    rank-1 score vs share correct per score bin (bars), the diagonal of perfect calibration, codes per bin.
    """
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(12, 6), dpi=110, layout="constrained")
    FigureCanvasAgg(fig)
    left, right = fig.subplots(1, 2)
    m, k = report["metrics"], report["k"]
    hit = m[f"hit@{k}"]
    fig.suptitle(f"Mapping quality: {report['source']} \u2192 {report['reference']}  "
                 f"({m['scored']} answer-key codes; top-1 {m['top1']:.3f}, hit@{k} {hit:.3f})", fontsize=12)
    _precision_coverage(left, report, precision_line)
    _reliability(right, report)
    path = Path(path)
    fig.savefig(path, format="png")
    return path


def _precision_coverage(ax, report: dict, precision_line: float) -> None:
    pts = report["precision_coverage"]["points"]
    m = report["metrics"]
    if pts:
        cov = [0.0] + [p["coverage"] for p in pts]
        prec = [pts[0]["precision"]] + [p["precision"] for p in pts]
        ax.plot(cov, prec, color="tab:blue", lw=2, label="rank 1 accepted at score \u2265 threshold")
        last_x = None
        for t in (0.95, 0.9, 0.8, 0.7, 0.5, 0.3):
            p = _point_at(pts, t)
            if p and (last_x is None or p["coverage"] - last_x >= 0.06):  # no labels on top of each other
                last_x = p["coverage"]
                ax.plot(p["coverage"], p["precision"], "o", color="tab:blue", ms=4)
                right = p["coverage"] > 0.85  # keep labels near the right edge inside the axes
                ax.annotate(f"\u2265{t:g}", (p["coverage"], p["precision"]), textcoords="offset points",
                            xytext=(-3 if right else 3, -13), ha="right" if right else "left", fontsize=8,
                            color="tab:blue")
    if m.get("auto_rank1_precision") is not None:
        ax.plot(m["auto_coverage"], m["auto_rank1_precision"], "D", color="tab:orange", ms=8,
                label=f"this run's rank-1 auto edges: precision {m['auto_rank1_precision']:.3f}")
    if m["auto_precision"] is not None:
        ax.plot(m["auto_coverage"], m["auto_precision"], "*", color="tab:red", ms=14,
                label=f"all auto edges (with 1:n extras): precision {m['auto_precision']:.3f}; "
                      f"coverage {m['auto_coverage']:.3f}")
    ax.axhline(precision_line, color="grey", ls=":", lw=1, label=f"precision {precision_line:g}")
    ax.set_xlim(0, 1.02)
    ax.set_ylim(0, 1.02)
    ax.set_xlabel("coverage (share of answer-key codes auto-accepted)")
    ax.set_ylabel("precision (share of those correct at rank 1)")
    ax.set_title("Precision vs coverage as the rank-1 threshold falls (dots: thresholds)")
    ax.grid(True, alpha=0.3)
    ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.13), ncol=1, fontsize=8, frameon=False)


def _point_at(points: list[dict], threshold: float) -> dict | None:
    below = [p for p in points if p["threshold"] >= threshold]
    return below[-1] if below else None


def _reliability(ax, report: dict) -> None:
    rel = report["reliability"]
    bins = rel["bins"]
    width = (bins[0]["high"] - bins[0]["low"]) if bins else 0.1
    full = [b for b in bins if b["count"]]
    ax.bar([b["low"] + width / 2 for b in full], [b["accuracy"] for b in full], width=width * 0.9,
           color="tab:green", alpha=0.6, edgecolor="tab:green", label="share correct in bin")
    ax.plot([b["mean_score"] for b in full], [b["accuracy"] for b in full], "o-", color="tab:green", ms=4,
            label="at the bin's mean score")
    ax.plot([0, 1], [0, 1], ls="--", color="grey", lw=1, label="perfectly calibrated")
    for b in full:
        ax.annotate(str(b["count"]), (b["low"] + width / 2, b["accuracy"]), textcoords="offset points",
                    xytext=(0, 3), ha="center", fontsize=7, color="dimgrey")
    ax.set_xlim(0, 1)
    ax.set_ylim(0, 1.12)
    ax.set_xlabel("rank-1 score")
    ax.set_ylabel("share of rank-1 predictions correct")
    ece = rel["ece"]
    ax.set_title("Reliability of the rank-1 score (numbers: codes per bin)"
                 + (f"; ECE {ece:.3f}" if ece is not None else ""))
    ax.grid(True, alpha=0.3)
    ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.13), ncol=3, fontsize=8, frameon=False)
