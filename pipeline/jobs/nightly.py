"""`graftwork run`: the whole nightly job from a config — ingest, embed, map, place — doing only what changed.

What changed is read from the graph itself, so a run killed at any point is finished by the next one:
files already taken in are skipped by content hash; a category is re-mapped when what it was last mapped with
(its content, the embedder, the reference version, the scoring model) differs from now; items wait for placing
under a mark committed with them.
"""

from __future__ import annotations

import json
import logging
import time
from pathlib import Path
from typing import TextIO

from pipeline.errors import BadInput, Problem
from pipeline.hashing import file_hash
from pipeline.jobs.config import Config, redact
from pipeline.jobs.ledger import ledger
from pipeline.store import open_store

log = logging.getLogger(__name__)


def run_pipeline(cfg: Config, *, full: bool = False, out: TextIO | None = None) -> dict:
    from pipeline.embed.embed_job import embed
    from pipeline.ingest.items_job import ingest_items
    from pipeline.ingest.reference_job import ingest_reference
    from pipeline.ingest.source_job import ingest_source
    from pipeline.match.map_job import MapSettings, categories_to_map, map_sources
    from pipeline.place.place_job import place

    say = (lambda msg: print(msg, file=out, flush=True)) if out else (lambda msg: None)
    inputs = {"reference": str(cfg.reference), "sources": {s.key: str(s.taxonomy) for s in cfg.sources}}
    summary: dict = {"store": redact(cfg.neo4j) or cfg.store, "stages": {}, "seconds": {}}
    with open_store(cfg.store, neo4j=cfg.neo4j, lock_timeout=cfg.lock_timeout) as store:
        with ledger(store, "run", {"config": str(cfg.path), "full": full, "inputs": inputs}) as run:
            stages, seconds = summary["stages"], summary["seconds"]

            def timed(name):
                return _Timer(seconds, name)

            def reopen_engine():
                # between stages, so its time (mostly checkpoints) is kept apart from theirs
                t = time.perf_counter()
                store.release_memory()
                seconds["reopen"] = round(seconds.get("reopen", 0.0) + time.perf_counter() - t, 3)

            with timed("ingest"):
                scheme = cfg.reference_scheme or None
                ref_key = scheme or _default_key(cfg)
                ref_changed = full or _changed(store, ref_key, cfg.reference, {"format": cfg.reference_format,
                                                                               "lang": cfg.reference_lang,
                                                                               "root": cfg.reference_root or ""})
                changed_sources = {src.key for src in cfg.sources if full or _changed(
                    store, src.key, src.taxonomy, {"format": src.format, **_taxonomy_options(src)})}
                new_items = {(src.key, f) for src in cfg.sources for f in src.item_files()
                             if full or not _ingested(store, src.key, f)}
                preflight(cfg, reference=ref_changed, sources=changed_sources, items=new_items)
                if ref_changed:
                    stages["reference"] = ingest_reference(store, cfg.reference, fmt=cfg.reference_format,
                                                           scheme=ref_key, lang=cfg.reference_lang,
                                                           root=cfg.reference_root)
                    say(f"  reference {ref_key}: {_counts(stages['reference'])}")
                else:
                    stages["reference"] = {"scheme": ref_key, "skipped": True}
                for src in cfg.sources:
                    opts = _taxonomy_options(src)
                    if src.key in changed_sources:
                        stages[f"source {src.key}"] = ingest_source(store, src.key, src.taxonomy, fmt=src.format,
                                                                    **opts)
                        say(f"  source {src.key}: {_counts(stages[f'source {src.key}'])}")
                    item_runs = []
                    for f in src.item_files():
                        r = ingest_items(store, src.key, f, category_separator=src.category_separator or None,
                                         force=full, run_id=run["run_id"], precheck=False, **_item_options(src))
                        item_runs.append(r)
                        if not r.get("skipped"):
                            say(f"  items {src.key} {f.name}: {r['rows_items']} rows, {r['rejected']} rejected")
                            store.release_memory()  # counted in the ingest stage
                    stages[f"items {src.key}"] = item_runs
            reopen_engine()  # the engine keeps what each stage allocated until it closes
            with timed("embed"):
                stages["embed"] = embed(store, embedder=cfg.embedder)
                say(f"  embed: {stages['embed']['embedded']} texts embedded, {stages['embed']['skipped']} unchanged")
            reopen_engine()
            with timed("map"):
                settings = MapSettings(candidates=cfg.candidates, auto_threshold=cfg.auto_threshold,
                                       index_above=cfg.index_above)
                if cfg.floor is not None:
                    settings.floor = cfg.floor
                reference = ref_key
                only = None
                if not full:
                    only = {}
                    for src in cfg.sources:
                        need, total = categories_to_map(store, src.key, reference)
                        # Everything pending (first run, new reference or embedder): a full map also learns
                        # the depth prior afresh; otherwise map the changed categories alone.
                        only[src.key] = need if len(need) < total else None
                stages["map"] = _map(map_sources, store, reference, settings, run["run_id"], only,
                                     [s.key for s in cfg.sources])
                for key, c in stages["map"].get("sources", {}).items():
                    say(f"  map {key}: {c['categories']} categories -> {c['auto']} auto, {c['proposed']} proposed, "
                        f"{c['unmapped']} unmapped")
            reopen_engine()
            with timed("place"):
                stages["place"] = place(store, sources=[s.key for s in cfg.sources], reference=reference,
                                        pending_only=not full)
                say(f"  place: {stages['place']['categories']} categories re-placed, "
                    f"{stages['place']['items_placed']} items placed in all")
            run["counts"] = {"stages": _compact(stages), "seconds": seconds,
                             "input_hashes": _input_hashes(cfg)}
            summary["run_id"] = run["run_id"]
    return summary


def preflight(cfg: Config, *, reference: bool = True, sources: set[str] | None = None,
              items: set[tuple[str, Path]] | None = None) -> None:
    """Read and check every input the run will take in (the reference and taxonomies that changed, every item
    file) before anything is written, so a bad file stops the run with the store as it was, and every bad file
    is named at once. Raises BadInput. Item rows that are merely bad (unknown category, empty title) are not
    problems here: they go to the reject file as usual."""
    from pipeline.ingest.hierarchy import check_hierarchy
    from pipeline.ingest.items_reader import read_items
    from pipeline.ingest.source_taxonomy import read_source_taxonomy

    problems: list[Problem] = []

    def attempt(check) -> None:
        try:
            check()
        except BadInput as exc:
            problems.extend(exc.problems)
        except (FileNotFoundError, IsADirectoryError, PermissionError) as exc:
            problems.append(Problem(exc.strerror or type(exc).__name__, file=str(exc.filename)))

    def check_reference() -> None:
        if cfg.reference_format == "rdf":
            from pipeline.ingest.rdf_reference import read_reference_rdf

            read_reference_rdf(cfg.reference, lang=cfg.reference_lang, root=cfg.reference_root)
        else:
            from pipeline.ingest.reference_job import _concept_rows
            from pipeline.ingest.reference_tree import read_reference_tree

            _concept_rows(read_reference_tree(cfg.reference), file=str(cfg.reference))

    def check_source(src) -> None:
        cats = read_source_taxonomy(src.taxonomy, fmt=src.format, **_taxonomy_options(src)).categories
        check_hierarchy([(c.code, c.label, [c.parent_code] if c.parent_code else []) for c in cats],
                        file=str(src.taxonomy), lines={c.code: c.line for c in cats if c.line is not None})

    def check_items(src, path) -> None:
        for _ in read_items(path, category_separator=src.category_separator or None, **_item_options(src)):
            pass

    if reference:
        attempt(check_reference)
    for src in cfg.sources:
        if sources is None or src.key in sources:
            attempt(lambda src=src: check_source(src))
        for f in src.item_files():
            if items is None or (src.key, f) in items:
                attempt(lambda src=src, f=f: check_items(src, f))
    if problems:
        raise BadInput(problems)


def _map(map_sources, store, reference, settings, run_id, only, keys):
    if only is None:
        return map_sources(store, sources=keys, reference=reference, settings=settings, run_id=run_id)
    full_keys = [k for k, v in only.items() if v is None]
    partial = {k: v for k, v in only.items() if v}
    result = {"reference": reference, "sources": {}}
    if full_keys:
        result = map_sources(store, sources=full_keys, reference=reference, settings=settings, run_id=run_id)
    if partial:
        part = map_sources(store, sources=list(partial), reference=reference, settings=settings, run_id=run_id,
                           only=partial)
        result.setdefault("sources", {}).update(part["sources"])
    return result


class _Timer:
    def __init__(self, sink: dict, name: str):
        self.sink, self.name = sink, name

    def __enter__(self):
        self.start = time.perf_counter()

    def __exit__(self, *exc):
        self.sink[self.name] = round(time.perf_counter() - self.start, 3)


def _ingested(store, key: str, path: Path) -> bool:
    """Whether this item file's content was taken in whole already (the mark `ingest_items` writes last)."""
    try:
        return bool(store.rows("ingested_file_get", key=f"{key}\x1f{file_hash(path)}"))
    except OSError:
        return False  # preflight names the missing or unreadable file


def _changed(store, key, path, options: dict) -> bool:
    stored = store.rows("scheme_get", key=key)
    if not stored:
        return True
    old_opts = json.loads(stored[0].get("reader_options") or "{}")
    return stored[0]["content_hash"] != file_hash(path) or any(old_opts.get(k) != v for k, v in options.items())


def _default_key(cfg: Config) -> str:
    from pipeline.ingest.scheme_keys import key_from_filename

    return key_from_filename(cfg.reference)


def _taxonomy_options(src) -> dict:
    names = {"code": "code_col", "label": "label_col", "parent": "parent_col", "path": "path_col", "tag": "tag_col"}
    opts = {names[k]: v for k, v in src.columns.items() if k in names}
    if src.format == "paths":
        opts["separator"] = src.separator
    return opts


def _item_options(src) -> dict:
    names = {"key": "key_col", "title": "title_col", "category": "category_col"}
    return {names[k]: v for k, v in src.columns.items() if k in names}


def _counts(d: dict) -> str:
    keys = ("added", "changed", "unchanged", "retired")
    return ", ".join(f"{d[k]} {k}" for k in keys if k in d)


def _compact(stages: dict) -> dict:
    out = {}
    for k, v in stages.items():
        if isinstance(v, dict):
            out[k] = {kk: vv for kk, vv in v.items() if kk != "upgrade_detail"}
        else:
            out[k] = v
    return out


def _input_hashes(cfg: Config) -> dict:
    hashes = {str(cfg.reference): file_hash(cfg.reference)}
    for src in cfg.sources:
        hashes[str(src.taxonomy)] = file_hash(src.taxonomy)
        for f in src.item_files():
            hashes[str(f)] = file_hash(f)
    return hashes
