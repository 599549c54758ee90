"""A seeded synthetic workload for the scale benchmarks: a SKOS reference, five source taxonomies, items.

    python benchmarks/workload.py --scale small OUT_DIR        # writes the files and a graftwork.toml

Sizes per scale (`full` is the size the targets are stated for):

| scale  | concepts | categories (5 sources) | items     |
|--------|----------|------------------------|-----------|
| small  | 1,000    | 5,000                  | 50,000    |
| medium | 3,000    | 15,000                 | 250,000   |
| full   | 10,000   | 50,000                 | 1,000,000 |

Everything is invented from two small word lists written here; the same seed and scale give the same bytes.
Items are written row by row (never all held at once). About 10% of item keys are shared: a shared key appears in
two neighbouring sources (with that source's own title), as a product sold by two suppliers would.
`write_delta` adds the nightly change: 1% new items (a second item file per source) and 0.5% of all categories
relabelled in the tree sources.
"""

from __future__ import annotations

import argparse
import csv
import json
import random
from dataclasses import dataclass
from pathlib import Path

SCALES = {
    "small": {"concepts": 1_000, "categories": 5_000, "items": 50_000},
    "medium": {"concepts": 3_000, "categories": 15_000, "items": 250_000},
    "full": {"concepts": 10_000, "categories": 50_000, "items": 1_000_000},
}
MAX_DEPTH = 6
LEVEL_SHARES = [0.002, 0.01, 0.04, 0.15, 0.35, 0.448]  # concepts per level 1..6 (sums to 1)
SHARED_KEY_SHARE = 0.10
TWO_CATEGORY_SHARE = 0.08
DELTA_NEW_ITEMS = 0.01
DELTA_CHANGED_CATEGORIES = 0.005

NOUNS = """
anchor apron arbor bag basin basket beaker bell bench blanket blender board bolt bottle bowl box bracket brush
bucket buckle burner cabinet cable caddy candle canister canopy cape carafe carpet cart case chair chisel clamp
clip clock cloth coat collar comb cooler cord cover crate cup curtain cushion cutter decanter desk dish divider
drawer drill easel fan fence filter flask fork frame funnel gauge glove grater grill hammer hamper hanger harness
hatchet heater helmet hinge hook hose jar jug kettle knife ladder lamp lantern latch ledger lid lock loom mallet
mat mattress mirror mixer mop mortar mug napkin needle net oven pad pail pan pencil pillow pitcher planter plate
pliers pot pouch press pump quilt rack rake razor reel ribbon rope rug sack saddle saucer saw scale scarf scissors
scoop screen screw shade shear shelf shovel sieve skillet sled sling sock spade spatula spindle spoon spool
sprayer stand stool strainer strap table tank tape tent thermos thread tile timer tongs towel tray trellis
trowel tub twine umbrella urn valve vase vest wagon wallet washer whisk wick winch window wrench
""".split()
MODIFIERS = """
bamboo brass bronze canvas cast ceramic clay compact copper cordless cotton cushioned deep denim double electric
enamel felt flat folding glass granite hanging heavy hemp insulated iron jute large leather light linen long
magnetic manual marble mesh metal mini narrow nylon oak outdoor padded pine plastic portable quilted rattan
recycled rubber rustic short silicone silk slim small smooth soft solid steel stone straw tall tempered tin
travel twin velvet walnut waterproof wide wicker wireless wood wool woven
""".split()
DOMAINS = """
kitchen garden workshop bath bedroom office nursery patio pantry laundry studio hallway cellar attic porch
garage library camp barn greenhouse
""".split()
SIZES = ["10 cm", "20 cm", "30 cm", "1 l", "2 l", "5 l", "set of 2", "set of 4", "pack of 6", "XL", "S", "M"]


@dataclass
class Concept:
    code: str
    label: str
    alt: list[str]
    parent: int | None
    depth: int
    noun: str


@dataclass
class SourceSpec:
    key: str
    fmt: str  # tree or paths
    share: float  # of categories and of items
    skip_levels: tuple[int, ...]  # reference levels this source leaves out (a coarser source)
    extra_level: bool  # a deeper source: one more level below the reference's leaves
    wording: str  # pref, alt, upper, reorder, amp


SOURCES = [
    SourceSpec("larkspur", "tree", 0.30, (), False, "pref"),
    SourceSpec("quillon", "tree", 0.25, (2,), False, "alt"),
    SourceSpec("marrowby", "paths", 0.20, (), True, "reorder"),
    SourceSpec("tessaly", "tree", 0.15, (2, 4), False, "upper"),
    SourceSpec("brindmoor", "tree", 0.10, (), True, "amp"),
]


def build_reference(n: int, rng: random.Random) -> list[Concept]:
    counts = [max(8, round(n * s)) for s in LEVEL_SHARES]
    counts[-1] += n - sum(counts)
    concepts: list[Concept] = []
    by_level: list[list[int]] = []
    for depth, count in enumerate(counts, start=1):
        level = []
        for j in range(count):
            parent = None if depth == 1 else rng.choice(by_level[-1])
            noun = rng.choice(NOUNS)
            if depth == 1:
                label = f"{DOMAINS[j % len(DOMAINS)].title()} {noun}s" + (f" {j // len(DOMAINS) + 1}" if j >= len(DOMAINS) else "")
            else:
                label = f"{rng.choice(MODIFIERS).title()} {noun}"
                if rng.random() < 0.3:
                    label += f" {rng.choice(['set', 'kit', 'pack', 'range', 'line', 'parts', 'refills'])}"
                if rng.random() < 0.3:
                    label = f"{rng.choice(DOMAINS).title()} {label.lower()}"
            alt = []
            if rng.random() < 0.6:
                alt.append(f"{noun.title()}, {label.split(' ', 1)[0].lower()}")
            if rng.random() < 0.2:
                alt.append(f"{label} ({rng.choice(DOMAINS)})")
            concepts.append(Concept(f"R{len(concepts) + 1:05d}", label, alt, parent, depth, noun))
            level.append(len(concepts) - 1)
        by_level.append(level)
    return concepts


def _lit(text: str) -> str:
    return '"' + text.replace("\\", "\\\\").replace('"', '\\"') + '"@en'


def write_reference(path: Path, concepts: list[Concept]) -> None:
    base = "https://vocab.example.org/bench/"
    with path.open("w", encoding="utf-8") as f:
        f.write("@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n")
        f.write(f"@prefix b: <{base}> .\n\n")
        f.write('b:scheme a skos:ConceptScheme ; skos:prefLabel "Benchmark reference"@en .\n\n')
        for c in concepts:
            parts = [f"b:{c.code} a skos:Concept", f'skos:notation "{c.code}"', f"skos:prefLabel {_lit(c.label)}",
                     "skos:inScheme b:scheme"]
            parts += [f"skos:altLabel {_lit(a)}" for a in c.alt]
            if c.parent is None:
                parts.append("skos:topConceptOf b:scheme")
            else:
                parts.append(f"skos:broader b:{concepts[c.parent].code}")
                parts.append(f"skos:definition {_lit(f'{c.label} for the {concepts[c.parent].label.lower()} group.')}")
            f.write(" ;\n    ".join(parts) + " .\n")


def _word(c: Concept, style: str, rng: random.Random) -> str:
    if style == "alt" and c.alt:
        return c.alt[0]
    if style == "upper":
        return c.label.upper()
    if style == "reorder" and " " in c.label:
        head, rest = c.label.split(" ", 1)
        return f"{rest.capitalize()} - {head.lower()}"
    if style == "amp":
        return f"{c.label} & {rng.choice(['accessories', 'more', 'spares', 'essentials'])}"
    return c.label


@dataclass
class Category:
    code: str
    label: str
    parent: str | None
    leaf_weight: float = 1.0
    path: str = ""


def build_source(spec: SourceSpec, concepts: list[Concept], n: int, rng: random.Random) -> list[Category]:
    """Categories for `spec`: chains of reference ancestors (minus skipped levels), relabelled, up to n nodes."""
    cats: dict[str, Category] = {}  # keyed by reference code (or code + suffix for the extra level)
    order = list(range(len(concepts)))
    rng.shuffle(order)
    prefix = spec.key[:2].upper()
    for idx in order:
        if len(cats) >= n:
            break
        chain = []
        i: int | None = idx
        while i is not None:
            if concepts[i].depth not in spec.skip_levels:
                chain.append(i)
            i = concepts[i].parent
        parent_code = None
        parent_path = ""
        for i in reversed(chain):
            c = concepts[i]
            if c.code not in cats:
                label = _word(c, spec.wording, rng)
                code = f"{prefix}{len(cats) + 1:06d}"
                path = f"{parent_path} > {label}" if parent_path else label
                cats[c.code] = Category(code, label, parent_code, path=path)
            parent_code, parent_path = cats[c.code].code, cats[c.code].path
        if spec.extra_level and len(cats) < n and concepts[idx].depth >= 3:
            for size in ("Small", "Large"):
                label = f"{size} {concepts[idx].noun}s"
                key = f"{concepts[idx].code}/{size}"
                if key not in cats:
                    cats[key] = Category(f"{prefix}{len(cats) + 1:06d}", label, parent_code,
                                         path=f"{parent_path} > {label}")
    # A source finer than the reference: once every concept is used, split concepts into variants below them.
    variants = ["Kids", "Professional", "Budget", "Premium", "Spare", "Compact", "Outdoor", "Eco"]
    round_no = 0
    while len(cats) < n and round_no < len(variants):
        for idx in order:
            if len(cats) >= n:
                break
            c = concepts[idx]
            if c.code not in cats:
                continue
            base = cats[c.code]
            label = f"{variants[round_no]} {_word(c, spec.wording, rng).lower()}"
            cats[f"{c.code}/v{round_no}"] = Category(f"{prefix}{len(cats) + 1:06d}", label, base.code,
                                                     path=f"{base.path} > {label}")
        round_no += 1
    out = list(cats.values())
    children = {c.parent for c in out}
    for c in out:
        c.leaf_weight = 0.0 if c.code in children else rng.paretovariate(1.5)
    return out


def write_taxonomy(path: Path, spec: SourceSpec, cats: list[Category]) -> None:
    with path.open("w", encoding="utf-8", newline="") as f:
        w = csv.writer(f)
        if spec.fmt == "paths":
            w.writerow(["path"])
            for c in cats:
                w.writerow([c.path])
        else:
            w.writerow(["code", "label", "parent_code"])
            for c in cats:
                w.writerow([c.code, c.label, c.parent or ""])


def _category_ref(spec: SourceSpec, c: Category) -> str:
    return c.path if spec.fmt == "paths" else c.code


def write_items(path: Path, spec: SourceSpec, index: int, cats: list[Category], n: int, rng: random.Random, *,
                first: int = 0, shared_from: int = 0) -> None:
    """Write n item rows with keys `<source>-<first..>`; about 10% take a shared key `sk-<k>` that the next
    source (cyclically) also uses, each with its own title. Rows stream to the file."""
    leaves = [c for c in cats if c.leaf_weight > 0]
    weights = [c.leaf_weight for c in leaves]
    cum = list(_accumulate(weights))
    with path.open("w", encoding="utf-8", newline="") as f:
        w = csv.writer(f)
        w.writerow(["item_key", "title", "category", "price"])
        shared_seq = shared_from
        for j in range(first, first + n):
            leaf = leaves[_pick(cum, rng.random() * cum[-1])]
            if rng.random() < SHARED_KEY_SHARE:
                # shared key k is used by source k % 5 and the one after it: never twice in one source
                owner = index if rng.random() < 0.5 else (index - 1) % len(SOURCES)
                key = f"sk-{shared_seq * len(SOURCES) + owner:08d}"
                shared_seq += 1
            else:
                key = f"{spec.key}-{j:08d}"
            categories = [_category_ref(spec, leaf)]
            if rng.random() < TWO_CATEGORY_SHARE:
                other = leaves[_pick(cum, rng.random() * cum[-1])]
                if other is not leaf:
                    categories.append(_category_ref(spec, other))
            words = leaf.label.split(" > ")[-1].lower()
            title = f"{rng.choice(MODIFIERS).title()} {words} {rng.choice(SIZES)} {rng.randrange(100, 9999)}"
            w.writerow([key, title, "|".join(categories), f"{rng.uniform(1, 400):.2f}"])


def _accumulate(values):
    total = 0.0
    for v in values:
        total += v
        yield total


def _pick(cum: list[float], x: float) -> int:
    import bisect

    return min(bisect.bisect_left(cum, x), len(cum) - 1)


def generate(out: str | Path, scale: str = "small", *, seed: int = 11) -> Path:
    """Write the workload into `out` (skipped when a manifest with the same scale and seed is there); returns the
    config path."""
    out = Path(out)
    manifest = out / "manifest.json"
    want = {"scale": scale, "seed": seed, "version": 1}
    if manifest.exists() and json.loads(manifest.read_text()) == want:
        return out / "graftwork.toml"
    out.mkdir(parents=True, exist_ok=True)
    manifest.unlink(missing_ok=True)
    size = SCALES[scale]
    rng = random.Random(seed)
    concepts = build_reference(size["concepts"], rng)
    write_reference(out / "reference.ttl", concepts)
    for index, spec in enumerate(SOURCES):
        cats = build_source(spec, concepts, round(size["categories"] * spec.share), random.Random(seed * 100 + index))
        write_taxonomy(out / f"{spec.key}.csv", spec, cats)
        (out / spec.key).mkdir(exist_ok=True)
        write_items(out / spec.key / "items-0001.csv", spec, index, cats, round(size["items"] * spec.share),
                    random.Random(seed * 1000 + index))
    (out / "graftwork.toml").write_text(config_text(), encoding="utf-8")
    manifest.write_text(json.dumps(want))
    return out / "graftwork.toml"


def write_delta(out: str | Path, scale: str = "small", *, seed: int = 11) -> dict:
    """The nightly change: per source a second item file with 1% new items, and 0.5% of all categories relabelled
    (tree sources only, so codes stay). Returns the counts written."""
    out = Path(out)
    size = SCALES[scale]
    rng = random.Random(seed + 1)
    concepts = build_reference(size["concepts"], random.Random(seed))
    tree_sources = [s for s in SOURCES if s.fmt == "tree"]
    to_change = round(size["categories"] * DELTA_CHANGED_CATEGORIES)
    per_tree = [to_change // len(tree_sources) + (1 if i < to_change % len(tree_sources) else 0)
                for i in range(len(tree_sources))]
    counts = {"new_items": 0, "changed_categories": 0}
    for index, spec in enumerate(SOURCES):
        cats = build_source(spec, concepts, round(size["categories"] * spec.share), random.Random(seed * 100 + index))
        n_src = round(size["items"] * spec.share)
        n_new = round(n_src * DELTA_NEW_ITEMS)
        write_items(out / spec.key / "items-0002.csv", spec, index, cats, n_new, random.Random(seed * 1000 + 50 + index),
                    first=n_src, shared_from=n_src)
        counts["new_items"] += n_new
        if spec.fmt == "tree":
            k = per_tree[tree_sources.index(spec)]
            # leaves only, so no descendant's path changes with them: exactly k categories change
            for c in rng.sample([c for c in cats if c.leaf_weight > 0], k):
                c.label = f"{c.label} {rng.choice(['(new)', 'and spares', 'plus', 'selection'])}"
            write_taxonomy(out / f"{spec.key}.csv", spec, cats)
            counts["changed_categories"] += k
    return counts


def config_text() -> str:
    lines = ["# benchmark workload (benchmarks/workload.py)", "[store]", 'path = "bench.lbug"', "",
             "[reference]", 'file = "reference.ttl"', 'scheme = "bench"', "", "[embed]", 'embedder = "static"', "",
             "[map]", "candidates = 5", ""]
    for spec in SOURCES:
        lines += ["[[sources]]", f'key = "{spec.key}"', f'taxonomy = "{spec.key}.csv"', f'format = "{spec.fmt}"',
                  f'items = ["{spec.key}/items-*.csv"]', ""]
    return "\n".join(lines)


def main(argv: list[str] | None = None) -> int:
    p = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    p.add_argument("out")
    p.add_argument("--scale", choices=sorted(SCALES), default="small")
    p.add_argument("--seed", type=int, default=11)
    p.add_argument("--delta", action="store_true", help="also write the nightly change")
    args = p.parse_args(argv)
    print(generate(args.out, args.scale, seed=args.seed))
    if args.delta:
        print(write_delta(args.out, args.scale, seed=args.seed))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
