"""Generate the invented demo scenario: reference hierarchy (SKOS Turtle), three suppliers, items, answer key.

Seeded and deterministic: the same seed and size give the same bytes.

>>> files = generate_scenario(tmp_dir, seed=7, n_items=3000)          # doctest: +SKIP
>>> [s["key"] for s in files.sources]                                 # doctest: +SKIP
['fennelgrist', 'wrenmantle', 'cobbleweir']

From a shell: `python -m pipeline.demo.scenario demo_data` (or `graftwork demo`).
"""

from __future__ import annotations

import argparse
import csv
import io
import json
import os
import random
from dataclasses import dataclass
from pathlib import Path

from pipeline.demo import vocabulary as vocab
from pipeline.demo.items import ItemRow, generate_items
from pipeline.demo.reference import Reference, build_reference, turtle_text
from pipeline.demo.suppliers import PATH_SEPARATOR, Supplier, build_suppliers
from pipeline.errors import BadInput, Problem

FORMAT_VERSION = 1
MANIFEST = "manifest.json"
REFERENCE_FILE = "reference.ttl"
ANSWER_KEY_FILE = "answer_key.csv"
CATEGORY_SEPARATOR = "|"  # between two categories of one item
ITEM_COLUMNS = {"tree": ["brand_line", "price"], "tags": ["price"], "paths": ["brand_line", "price"]}
ANSWER_KEY_PER_SUPPLIER = 36
SPECIAL_KINDS = ("deeper", "merged", "coarse", "grouping", "variant")  # the cases worth checking by hand


@dataclass
class ScenarioFiles:
    directory: Path
    reference: Path
    sources: list[dict]  # {"key", "name", "taxonomy", "format", "items", "columns", "separator", ...}
    answer_key: Path


def generate_scenario(out_dir: str | Path, *, seed: int = 7, n_items: int = 30_000) -> ScenarioFiles:
    """Write the scenario into `out_dir` (created if needed) and return where everything is.

    Other files in `out_dir` (such as its README) are left alone. The manifest is removed first and written
    last, so an interrupted run never looks complete to `scenario_present`.
    """
    if isinstance(n_items, bool) or not isinstance(n_items, int) or n_items < 100:
        raise BadInput(
            Problem(f"n_items must be a whole number of at least 100, got {n_items!r}", field="n_items")
        )
    if isinstance(seed, bool) or not isinstance(seed, int):
        raise BadInput(Problem(f"seed must be a whole number, got {seed!r}", field="seed"))
    directory = Path(out_dir)
    rng = random.Random(seed)
    ref = build_reference()
    suppliers = build_suppliers(ref, rng)
    rows = generate_items(ref, suppliers, rng, n_items)
    answer_rows = _answer_key(suppliers, rng)

    contents: dict[str, str] = {REFERENCE_FILE: turtle_text(ref)}
    sources = []
    for s in suppliers:
        tax_name, items_name = f"{s.key}_taxonomy.csv", f"{s.key}_items.csv"
        contents[tax_name] = _taxonomy_csv(s)
        contents[items_name] = _items_csv(rows[s.key], ITEM_COLUMNS[s.format])
        sources.append(
            {
                "key": s.key,
                "name": s.name,
                "format": s.format,
                "taxonomy": directory / tax_name,
                "items": directory / items_name,
                "columns": _columns(s.format),
                "separator": PATH_SEPARATOR if s.format == "paths" else None,
                "category_separator": CATEGORY_SEPARATOR,
                "categories": len(s.categories),
                "item_rows": len(rows[s.key]),
            }
        )
    contents[ANSWER_KEY_FILE] = _csv(["source_key", "source_code", "reference_code"], answer_rows)
    manifest = _manifest(seed, n_items, ref, sources, rows, len(answer_rows))

    directory.mkdir(parents=True, exist_ok=True)
    (directory / MANIFEST).unlink(missing_ok=True)
    for name, text in contents.items():
        _write_atomic(directory / name, text)
    _write_atomic(directory / MANIFEST, json.dumps(manifest, indent=2) + "\n")
    return ScenarioFiles(directory, directory / REFERENCE_FILE, sources, directory / ANSWER_KEY_FILE)


def scenario_present(out_dir: str | Path, *, seed: int | None = None, n_items: int | None = None) -> bool:
    """True if `out_dir` holds a complete scenario: a readable manifest of this format and all its files.

    With `seed` and/or `n_items`, also require the manifest to record those values (so a caller can regenerate
    when the user asks for another size).
    """
    path = Path(out_dir) / MANIFEST
    try:
        manifest = json.loads(path.read_text(encoding="utf-8"))
        if manifest.get("format_version") != FORMAT_VERSION:
            return False
        if (seed is not None and manifest.get("seed") != seed) or (
            n_items is not None and manifest.get("n_items") != n_items
        ):
            return False
        names = [manifest["reference"]["file"], manifest["answer_key"]["file"]]
        for s in manifest["sources"]:
            names += [s["taxonomy"], s["items"]]
    except (OSError, ValueError, KeyError, TypeError):
        return False
    return all((Path(out_dir) / n).is_file() for n in names)


def load_scenario(out_dir: str | Path) -> ScenarioFiles:
    """The ScenarioFiles of a complete scenario already in `out_dir` (check with `scenario_present` first)."""
    directory = Path(out_dir)
    manifest = json.loads((directory / MANIFEST).read_text(encoding="utf-8"))
    sources = [
        {**s, "taxonomy": directory / s["taxonomy"], "items": directory / s["items"]} for s in manifest["sources"]
    ]
    return ScenarioFiles(directory, directory / manifest["reference"]["file"], sources,
                         directory / manifest["answer_key"]["file"])


# ---- file contents ----------------------------------------------------------------------------------------


def _csv(header: list[str], rows: list[list[str]]) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(header)
    w.writerows(rows)
    return buf.getvalue()


def _taxonomy_csv(s: Supplier) -> str:
    cats = s.categories.values()
    if s.format == "tree":
        return _csv(["code", "label", "parent_code"], [[c.code, c.label, c.parent or ""] for c in cats])
    if s.format == "paths":
        return _csv(["path"], [[c.code] for c in cats])  # every node listed, parents before children
    return _csv(["tag"], [[c.code] for c in cats])


def _columns(fmt: str) -> dict:
    cols = {"key": "item_key", "title": "title", "category": "category", "attributes": ITEM_COLUMNS[fmt]}
    if fmt == "tree":
        cols.update(code="code", label="label", parent="parent_code")
    else:
        cols["path" if fmt == "paths" else "tag"] = "path" if fmt == "paths" else "tag"
    return cols


def _items_csv(rows: list[ItemRow], attributes: list[str]) -> str:
    header = ["item_key", "title", "category"] + attributes
    out = []
    for r in rows:
        values = {"brand_line": r.brand_line, "price": r.price}
        out.append(
            [r.item_key, r.title, CATEGORY_SEPARATOR.join(r.categories)] + [values[a] for a in attributes]
        )
    return _csv(header, out)


def _answer_key(suppliers: list[Supplier], rng: random.Random) -> list[list[str]]:
    """A few dozen categories per supplier with the reference codes they should map to (generator's truth).

    Up to four of each special kind (deeper than the reference, merged, cut short, grouping, second tag for
    one concept) are always included, so the key exercises the hard cases, the rest is a plain random sample.
    """
    rows = []
    for s in suppliers:
        picked: list[str] = []
        for kind in SPECIAL_KINDS:
            of_kind = [c for c, cat in s.categories.items() if cat.kind == kind]
            picked += rng.sample(of_kind, min(4, len(of_kind)))
        rest = [c for c in s.categories if c not in picked]
        picked += rng.sample(rest, max(0, min(len(rest), ANSWER_KEY_PER_SUPPLIER - len(picked))))
        for code in sorted(picked):
            rows += [[s.key, code, t] for t in s.categories[code].truth]
    return rows


def _manifest(
    seed: int,
    n_items: int,
    ref: Reference,
    sources: list[dict],
    rows: dict[str, list[ItemRow]],
    n_answers: int,
) -> dict:
    keys: dict[str, int] = {}
    for rs in rows.values():
        for r in rs:
            keys[r.item_key] = keys.get(r.item_key, 0) + 1
    return {
        "generator": "pipeline.demo.scenario",
        "format_version": FORMAT_VERSION,
        "seed": seed,
        "n_items": n_items,
        "marketplace": vocab.MARKETPLACE,
        "invented": True,
        "reference": {
            "file": REFERENCE_FILE,
            "concepts": len(ref.concepts),
            "title": vocab.REFERENCE_TITLE,
            "version": vocab.REFERENCE_VERSION,
            "base_iri": vocab.REFERENCE_BASE,
        },
        "sources": [
            {
                "key": s["key"],
                "name": s["name"],
                "format": s["format"],
                "taxonomy": s["taxonomy"].name,
                "items": s["items"].name,
                "columns": s["columns"],
                "separator": s["separator"],
                "category_separator": s["category_separator"],
                "categories": s["categories"],
                "item_rows": s["item_rows"],
            }
            for s in sources
        ],
        "product_keys": len(keys),
        "shared_product_keys": sum(1 for n in keys.values() if n > 1),
        "answer_key": {"file": ANSWER_KEY_FILE, "rows": n_answers},
    }


def _write_atomic(path: Path, text: str) -> None:
    tmp = path.with_name(path.name + ".tmp")
    tmp.write_text(text, encoding="utf-8", newline="")
    os.replace(tmp, path)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(
        prog="python -m pipeline.demo.scenario",
        description="Write the invented demo scenario into a directory.",
    )
    parser.add_argument("out_dir", help="directory to write (created if missing), e.g. demo_data")
    parser.add_argument("--seed", type=int, default=7)
    parser.add_argument("--items", type=int, default=30_000, dest="n_items", help="item rows in total")
    args = parser.parse_args(argv)
    try:
        files = generate_scenario(args.out_dir, seed=args.seed, n_items=args.n_items)
    except BadInput as exc:
        parser.exit(2, f"error: {exc}\n")
    print(f"wrote {files.reference}")
    for s in files.sources:
        print(
            f"wrote {s['taxonomy']} ({s['categories']} categories) and {s['items']} ({s['item_rows']} items)"
        )
    print(f"wrote {files.answer_key}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
