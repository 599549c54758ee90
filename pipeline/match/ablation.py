"""Per-evidence ablation: re-map one source with each scoring feature switched off in turn and score every run.

The rows are comparable because each is a fresh re-map with the same settings: the baseline with every feature
on, then one row per feature with that feature neutralised (`MapSettings.disabled`). Re-mapping replaces the
source's machine edges (`auto` / `proposed`; a person's decisions are never touched), so the last step maps once
more with the settings of the store's last map run, leaving the edges as that run left them.

The settings come from the last finished `map` run in the ledger (every option named like a `MapSettings` field,
such as candidates, auto threshold and floor, and the switched-off features), else the defaults. A model learned
with `map --learn` is kept in the store and used by every re-map. Features the map job does not know yet are listed under `skipped` with the reason.
"""

from __future__ import annotations

import dataclasses
import json
import logging

from pipeline.match.evaluate import flat_metrics, gather
from pipeline.store import Store

log = logging.getLogger(__name__)

ROW_METRICS = ("top1", "mrr", "coverage", "auto_coverage", "auto_precision", "auto_rank1_precision", "auto_f1",
               "partial")


def known_features() -> tuple[str, ...] | None:
    """The map job's feature names, or None when this build cannot switch features off."""
    from pipeline.match import map_job

    try:
        from pipeline.match.features import FEATURES
    except ImportError:
        return None
    fields = {f.name for f in dataclasses.fields(map_job.MapSettings)}
    return tuple(FEATURES) if "disabled" in fields else None


def last_map_settings(store: Store):
    """MapSettings as the last finished map run used them (defaults for anything it did not set)."""
    from pipeline.match.map_job import MapSettings

    settings = MapSettings()
    runs = store.rows("evaluate_map_runs", job="map", limit=1)
    if not runs:
        return settings
    try:
        params = json.loads(runs[0]["parameters"] or "{}")
    except (TypeError, ValueError):
        return settings
    # A run's parameters are its CLI options by argparse name; those named like a MapSettings field carry over.
    names = {f.name for f in dataclasses.fields(MapSettings)} - {"disabled"}
    changes = {name: params[name] for name in names if params.get(name) is not None}
    if params.get("without") and hasattr(settings, "disabled"):
        changes["disabled"] = frozenset(params["without"])
    return dataclasses.replace(settings, **changes)


def ablate(store: Store, source: str, answer_key: dict[str, set[str]], *, reference: str | None = None,
           k: int = 5, settings=None, run_id: str = "") -> dict:
    """Rows `{"without": feature or "-", metrics..., "delta_top1": ...}`, baseline first; see the module docstring.

    `settings`: the MapSettings to repeat (default: the last map run's). Writes machine edges of `source`.
    """
    from pipeline.match.map_job import map_sources

    features = known_features()
    restore = settings or last_map_settings(store)
    if features is None:
        return {"rows": [], "skipped": [{"feature": "*", "reason": "this build's map job cannot switch features "
                                         "off (no MapSettings.disabled / pipeline.match.features.FEATURES)"}],
                "settings": _describe(restore)}
    full = dataclasses.replace(restore, disabled=frozenset())
    plan = [(f, dataclasses.replace(full, disabled=frozenset({f}))) for f in features]
    plan.append(("-", full))  # the baseline last: when the last run switched nothing off it is also the restore
    rows, skipped = [], []
    for name, s in plan:
        log.info("ablation %s: re-mapping %s without %s", run_id, source, name)
        try:
            map_sources(store, sources=[source], reference=reference, settings=s, run_id=run_id)
        except Exception as exc:  # one feature that cannot be switched off must not lose the other rows
            if name == "-":
                raise
            skipped.append({"feature": name, "reason": f"{type(exc).__name__}: {exc}"})
            continue
        m = flat_metrics(gather(store, source, answer_key, reference=reference), k=k)
        rows.append({"without": name, **{key: m[key] for key in (*ROW_METRICS, f"hit@{k}")}})
    if restore.disabled:
        map_sources(store, sources=[source], reference=reference, settings=restore, run_id=run_id)
    base = rows[-1]
    rows = [base, *rows[:-1]]
    for r in rows:
        r["delta_top1"] = r["top1"] - base["top1"]
        r["delta_partial"] = (r["partial"] - base["partial"]) if r["partial"] is not None else None
    return {"rows": rows, "skipped": skipped, "settings": _describe(restore)}


def _describe(settings) -> dict:
    out = {}
    for f in dataclasses.fields(settings):
        v = getattr(settings, f.name)
        out[f.name] = sorted(v) if isinstance(v, (set, frozenset)) else v
    return out
