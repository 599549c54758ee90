"""A picture of coverage by top-level concept: items per source, split by how they were placed (PNG or HTML).

PNG: horizontal stacked bars (matplotlib, no display needed); HTML: one self-contained page with a table and
CSS bars (no scripts). Both show, under the chart, each source's share of items placed (from `coverage`).
"""

from __future__ import annotations

import html
from pathlib import Path

import pandas as pd

from pipeline.errors import BadInput, Problem
from pipeline.query.coverage import coverage, coverage_by_top
from pipeline.query.filters import Filters
from pipeline.query.rollup import natural_key
from pipeline.store import Store

FORMATS = ("png", "html")


def export_coverage(store: Store, out: str | Path, *, fmt: str | None = None, reference: str | None = None,
                    filters: Filters | None = None, depth: int = 1) -> dict:
    out = Path(out)
    fmt = fmt or {".png": "png", ".html": "html", ".htm": "html"}.get(out.suffix.lower(), "")
    if fmt not in FORMATS:
        raise BadInput(Problem(f"cannot tell the picture format of {out.name!r}; name it .png or .html, "
                               "or give --format png|html", field="--format"))
    by_top = coverage_by_top(store, reference=reference, filters=filters, depth=depth)
    totals = coverage(store, reference=reference, filters=filters)
    table = _table(by_top)
    tmp = out.with_name(out.name + ".part")
    if fmt == "png":
        _png(table, totals, tmp)
    else:
        tmp.write_text(_html(table, totals), encoding="utf-8")
    tmp.replace(out)
    return {"file": str(out), "format": fmt, "concepts": len(table),
            "bar_items": int(table.to_numpy().sum()) if len(table) else 0}


def _table(by_top: pd.DataFrame) -> pd.DataFrame:
    """Rows: 'code label'; columns: (source, placed_by) item counts."""
    if by_top.empty:
        return pd.DataFrame()
    by_top = by_top.assign(concept=by_top["concept_code"] + "  " + by_top["concept_label"])
    wide = by_top.pivot_table(index="concept", columns=["source", "placed_by"], values="items", aggfunc="sum",
                              fill_value=0)
    order = sorted(wide.index, key=lambda s: natural_key(s.split("  ")[0]))
    return wide.loc[order]


def _png(table: pd.DataFrame, totals: pd.DataFrame, out: Path) -> None:
    import matplotlib

    matplotlib.use("Agg")  # files only, no display
    import matplotlib.pyplot as plt

    height = max(3.0, 0.45 * len(table) + 2.0)
    fig, ax = plt.subplots(figsize=(10, height))
    if table.empty:
        ax.text(0.5, 0.5, "no items placed", ha="center", va="center")
        ax.set_axis_off()
    else:
        colours = plt.get_cmap("tab10")
        left = pd.Series(0, index=table.index, dtype=float)
        sources = sorted({s for s, _ in table.columns})
        for i, src in enumerate(sources):
            for status, hatch, alpha in (("accepted", "", 1.0), ("auto", "//", 0.55)):
                if (src, status) not in table.columns:
                    continue
                vals = table[(src, status)].astype(float)
                ax.barh(table.index, vals, left=left, color=colours(i % 10), alpha=alpha, hatch=hatch,
                        edgecolor="white", label=f"{src} ({status})")
                left += vals
        ax.invert_yaxis()
        ax.set_xlabel("items placed (including descendants)")
        ax.legend(fontsize=8, loc="lower right")
    ax.set_title("Coverage by top-level concept")
    if len(totals):
        note = "   ".join(f"{r.source}: {r.placed_share:.0%} placed" for r in totals.itertuples())
        fig.text(0.01, 0.01, note, fontsize=8)
    fig.tight_layout(rect=(0, 0.04, 1, 1))
    fig.savefig(out, format="png", dpi=100)
    plt.close(fig)


def _html(table: pd.DataFrame, totals: pd.DataFrame) -> str:
    esc = html.escape
    sources = sorted({s for s, _ in table.columns}) if len(table) else []
    peak = max(1, int(table.sum(axis=1).max())) if len(table) else 1
    colours = ["#4e79a7", "#f28e2b", "#59a14f", "#e15759", "#76b7b2", "#edc948", "#b07aa1", "#9c755f"]
    rows = []
    for concept, rec in table.iterrows():
        bars, cells = [], []
        for i, src in enumerate(sources):
            for status, opacity in (("accepted", "1"), ("auto", "0.55")):
                n = int(rec.get((src, status), 0))
                if n:
                    bars.append(f'<span title="{esc(src)} ({status}): {n}" style="display:inline-block;'
                                f'height:12px;width:{400 * n / peak:.1f}px;background:{colours[i % 8]};'
                                f'opacity:{opacity}"></span>')
            cells.append(f"<td>{int(rec.get((src, 'accepted'), 0)) + int(rec.get((src, 'auto'), 0))}</td>")
        rows.append(f"<tr><th>{esc(concept)}</th>{''.join(cells)}<td>{''.join(bars)}</td></tr>")
    head = "".join(f"<th>{esc(s)}</th>" for s in sources)
    share = "".join(f"<li>{esc(str(r.source))}: {r.placed} of {r.items} items placed ({r.placed_share:.1%}), "
                    f"{r.accepted} through accepted edges</li>" for r in totals.itertuples())
    legend = " ".join(f'<span style="color:{colours[i % 8]}">&#9632; {esc(s)}</span>' for i, s in enumerate(sources))
    return ("<!doctype html><html><head><meta charset='utf-8'><title>Coverage by top-level concept</title>"
            "<style>body{font-family:sans-serif}td,th{padding:2px 8px;text-align:left}</style></head><body>"
            "<h1>Coverage by top-level concept</h1>"
            f"<p>{legend} (solid: accepted, faded: auto)</p>"
            f"<table><tr><th>concept</th>{head}<th></th></tr>{''.join(rows)}</table>"
            f"<h2>Items placed per source</h2><ul>{share}</ul></body></html>\n")
