"""`graftwork demo`: generate the invented scenario if absent, write a config for it, run the nightly job on it,
and print a cross-source rollup with what to try next."""

from __future__ import annotations

import os
from pathlib import Path
from typing import TextIO

from pipeline.jobs.config import load_config, redact
from pipeline.jobs.nightly import run_pipeline
from pipeline.store import open_store

DEMO_MARK = "# written by `graftwork demo`"


def run_demo(store_path: str | Path, *, data_dir: str | Path = "demo_data", n_items: int = 30_000, seed: int = 7,
             embedder: str = "static", out: TextIO | None = None, config_path: str | Path = "graftwork.toml",
             neo4j: str | None = None) -> dict:
    """Safe to re-run: an unchanged scenario is skipped input by input."""
    from pipeline.demo.scenario import generate_scenario, load_scenario, scenario_present
    from pipeline.query.rollup import rollup

    say = (lambda msg: print(msg, file=out, flush=True)) if out else (lambda msg: None)
    data_dir = Path(data_dir)
    if scenario_present(data_dir, seed=seed, n_items=n_items):
        say(f"Using the invented demo scenario in {data_dir}/")
        files = load_scenario(data_dir)
    else:
        say(f"Generating the invented demo scenario into {data_dir}/ ...")
        files = generate_scenario(data_dir, seed=seed, n_items=n_items)
    config_path = Path(config_path)
    if config_path.exists() and not config_path.read_text(encoding="utf-8").startswith(DEMO_MARK):
        config_path = data_dir / "graftwork.toml"  # never overwrite a user's own config
    write_config(config_path, demo_config(files, Path(store_path), embedder, config_path.parent, neo4j=neo4j),
                 secret=bool(neo4j) and redact(neo4j) != neo4j)
    say(f"Wrote {config_path} (so `graftwork --config {config_path} run` re-runs this job)")
    summary = run_pipeline(load_config(config_path), out=out)
    with open_store(store_path, neo4j=neo4j, read_only=True) as store:
        table = rollup(store, depth=1)
    summary["rollup"] = table.to_dict("records")
    summary["config"] = str(config_path)
    if out:
        total = sum(summary["seconds"].values())
        say("\nItems per top-level reference concept (including descendants), by supplier:\n")
        say(table.to_string(index=False) if len(table) else "(nothing placed)")
        shown = redact(neo4j)  # never print a password given in the URI
        where = f"--neo4j {shown}" if neo4j else f"--store {store_path}"
        say(f"\nDone in {total:.1f} s. Store: {shown or store_path}. Try next:")
        if len(table):
            say(f"  graftwork {where} query rollup --concept {table['concept_code'].iloc[0]} --depth 1")
        say(f"  graftwork {where} export mappings --candidates 3 mappings.csv")
        say(f"  graftwork {where} status")
        say(f"  graftwork --config {config_path} run      (re-run: only what changed is redone)")
    return summary


def write_config(path: Path, text: str, *, secret: bool) -> None:
    """Write a config; one holding a secret (a password in the Neo4j URI) readable by its owner only, as `run`
    requires, also when the file existed before with wider rights."""
    if not secret:
        path.write_text(text, encoding="utf-8")
        return
    fd = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_TRUNC, 0o600)
    os.fchmod(fd, 0o600)
    with os.fdopen(fd, "w", encoding="utf-8") as fh:
        fh.write(text)


def demo_config(files, store_path: Path, embedder: str, base: Path, *, neo4j: str | None = None) -> str:
    def rel(p: Path) -> str:
        return os.path.relpath(Path(p).resolve(), base.resolve())

    lines = [
        DEMO_MARK + " for the invented demo scenario; edit freely (then remove this first line)",
        "[store]",
        f'neo4j = "{neo4j}"' if neo4j else f'path = "{rel(store_path)}"',
        "lock_timeout = 60",
        "",
        "[reference]",
        f'file = "{rel(files.reference)}"',
        'scheme = "market"',
        "",
        "[embed]",
        f'embedder = "{embedder}"',
        "",
        "[map]",
        "candidates = 5",
        "",
    ]
    for src in files.sources:
        cols = {k: v for k, v in src["columns"].items() if isinstance(v, str)}
        lines += [
            "[[sources]]",
            f'key = "{src["key"]}"',
            f'taxonomy = "{rel(src["taxonomy"])}"',
            f'format = "{src["format"]}"',
            f'items = ["{rel(src["items"])}"]',
        ]
        if src.get("separator"):
            lines.append(f'separator = "{src["separator"]}"')
        lines.append(f'category_separator = "{src.get("category_separator") or "|"}"')
        lines.append("[sources.columns]")
        lines += [f'{k} = "{v}"' for k, v in cols.items()]
        lines.append("")
    return "\n".join(lines)
