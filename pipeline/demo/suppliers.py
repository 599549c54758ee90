"""The three invented supplier taxonomies, each derived from the reference with its own ground truth.

- deep tidy tree (format "tree"): mirrors three reference branches, reworded, and goes one level deeper
  under some leaves (one category per product type, which must map to the broader reference leaf); a few
  sibling leaves merged;
- messy tags (format "tags"): flat tags at every level, some concepts tagged twice in different ways;
- mid-depth tree (format "paths"): at most three levels, US wording, levels skipped or cut short, so its
  leaves sit at mixed reference depths; its top level groups whole reference departments.

Every category carries `truth` (the reference codes it should map to) and `pool` (the (leaf, noun) product
types that may be filed under it), which the item generator uses.
"""

from __future__ import annotations

import random
from dataclasses import dataclass, field

from pipeline.demo import vocabulary as vocab
from pipeline.demo.reference import RefConcept, Reference
from pipeline.demo.wording import invert, messy_tag, plural, tag_norm, title_case, us_spelling

PATH_SEPARATOR = " > "
INTERNAL_WEIGHT = 0.2  # share weight of a category that has children: items are seldom filed so high up


@dataclass
class SupplierCategory:
    code: str
    label: str
    parent: str | None
    truth: list[str]  # reference codes this category should map to
    pool: list[tuple[str, int]]  # (reference leaf code, noun index) product types filed here
    kind: str  # mirror | coarse | deeper | merged | grouping | variant
    weight: float = 1.0
    own: list[tuple[str, int]] | None = None  # what is filed here directly, when narrower than `pool`
    children: list[str] = field(default_factory=list)


@dataclass
class Supplier:
    key: str
    name: str
    format: str  # tree | tags | paths
    categories: dict[str, SupplierCategory]  # parents before children

    def ancestors(self, code: str) -> list[str]:
        out, parent = [], self.categories[code].parent
        while parent is not None:
            out.append(parent)
            parent = self.categories[parent].parent
        return out

    def depth(self, code: str) -> int:
        return 1 + len(self.ancestors(code))


def _pool(ref: Reference, codes: list[str]) -> list[tuple[str, int]]:
    return [
        (leaf, i)
        for code in codes
        for leaf in ref.leaves_under(code)
        for i in range(len(ref.concepts[leaf].nouns))
    ]


def _leaf_weight(rng: random.Random, pool_size: int) -> float:
    # skewed shares (a few busy categories, many quiet ones), growing slowly with how much can be filed there
    return rng.uniform(0.3, 2.5) * min(pool_size, 9) ** 0.5


class _Builder:
    """Collects categories under temporary ids, then hands out the supplier's own codes."""

    def __init__(self) -> None:
        self.nodes: list[SupplierCategory] = []

    def add(self, label: str, parent: int | None, truth: list[str], pool, kind: str, weight: float) -> int:
        siblings = {self.nodes[i].label.lower() for i in self._children(parent)}
        base, n = label, 2
        while label.lower() in siblings:
            label, n = f"{base} {n}", n + 1  # only on an accidental clash of two reworded siblings
        self.nodes.append(
            SupplierCategory(
                str(len(self.nodes)),
                label,
                None if parent is None else str(parent),
                truth,
                pool,
                kind,
                weight,
            )
        )
        if parent is not None:
            self.nodes[parent].children.append(str(len(self.nodes) - 1))
        return len(self.nodes) - 1

    def _children(self, parent: int | None) -> list[int]:
        if parent is None:
            return [i for i, n in enumerate(self.nodes) if n.parent is None]
        return [int(c) for c in self.nodes[parent].children]

    def finish(self, code_of) -> dict[str, SupplierCategory]:
        """Re-key with `code_of(node, position, parent_code)`; siblings sorted by label, as suppliers do."""
        out: dict[str, SupplierCategory] = {}

        def walk(ids: list[int], parent_code: str | None) -> None:
            for pos, i in enumerate(sorted(ids, key=lambda j: self.nodes[j].label.lower()), start=1):
                node = self.nodes[i]
                node.code = code_of(node, pos, parent_code)
                node.parent = parent_code
                kids = [int(c) for c in node.children]
                node.children = []
                out[node.code] = node
                if parent_code is not None:
                    out[parent_code].children.append(node.code)
                walk(kids, node.code)

        walk(self._children(None), None)
        return out


# ---- wording ---------------------------------------------------------------------------------------------


def _pick_wording(c: RefConcept, rng: random.Random, label_share: float) -> str:
    r = rng.random()
    if r < label_share or not (c.alt_labels or c.hidden):
        return c.label
    if (r < label_share + (1 - label_share) / 2 and c.alt_labels) or not c.hidden:
        return rng.choice(c.alt_labels)
    return rng.choice(c.hidden)


def word_tidy(c: RefConcept, rng: random.Random) -> str:
    """British catalogue wording: mostly the reference label or a synonym, sometimes inverted or qualified."""
    text = _pick_wording(c, rng, 0.5)
    r = rng.random()
    if r < 0.08:
        text = invert(text)
    elif r < 0.15 and c.depth > 1:
        text = rng.choice(vocab.QUALIFIERS_TIDY).format(x=text)
    return title_case(text)


def word_us(c: RefConcept, rng: random.Random) -> str:
    """US wording: the US term when there is one, US spelling always, a marketing qualifier now and then."""
    if c.us_terms and rng.random() < 0.75:
        text = rng.choice(c.us_terms)
    else:
        text = _pick_wording(c, rng, 0.4)
    if rng.random() < 0.08 and c.depth > 1:
        text = rng.choice(vocab.QUALIFIERS_US).format(x=text)
    return title_case(us_spelling(text))


# ---- deep tidy tree ---------------------------------------------------------------------------------------

DEEP_TREE_BRANCHES = ["Garden", "Outdoor living", "Outdoor lighting"]  # the last is a level-2 concept


def build_deep_tree(
    ref: Reference, rng: random.Random, key: str, name: str, max_categories: int = 240
) -> Supplier:
    seed = rng.randrange(2**32)
    for attempt, p_split in enumerate((0.3, 0.2, 0.1, 0.0)):
        cats = _deep_tree(ref, random.Random(seed + attempt), p_split)
        if len(cats) <= max_categories:
            break
    return Supplier(key, name, "tree", cats)


def _deep_tree(ref: Reference, rng: random.Random, p_split: float) -> dict[str, SupplierCategory]:
    b = _Builder()

    def mirror(code: str, parent: int | None) -> None:
        c = ref.concepts[code]
        kids = ref.live_children(code)
        pool = _pool(ref, [code])
        node = b.add(word_tidy(c, rng), parent, [code], pool, "mirror", INTERNAL_WEIGHT)
        if not kids:
            kept = list(range(len(c.nouns)))
            if len(c.nouns) >= 2 and rng.random() < p_split:
                kept = []
                for i, (noun, _) in enumerate(c.nouns):  # deeper than the reference: one category per noun
                    label = title_case(_plural_phrase(noun))
                    if label.lower() == b.nodes[node].label.lower():
                        kept.append(
                            i
                        )  # "Garden Hoses > Garden Hoses" would be silly: these stay on the parent
                    else:
                        b.add(label, node, [code], [(code, i)], "deeper", _leaf_weight(rng, 1))
            if kept:
                b.nodes[node].weight = _leaf_weight(rng, len(kept))
                b.nodes[node].own = [(code, i) for i in kept]
            return
        i = 0
        while i < len(kids):
            k1 = kids[i]
            k2 = kids[i + 1] if i + 1 < len(kids) else None
            if k2 and not ref.live_children(k1) and not ref.live_children(k2) and rng.random() < 0.07:
                a, z = ref.concepts[k1].label, ref.concepts[k2].label
                label = title_case(f"{a} {rng.choice(['&', 'and'])} {z[:1].lower() + z[1:]}")
                pool2 = _pool(ref, [k1, k2])
                b.add(label, node, [k1, k2], pool2, "merged", _leaf_weight(rng, len(pool2)))
                i += 2
                continue
            mirror(k1, node)
            i += 1

    for label in DEEP_TREE_BRANCHES:
        mirror(ref.by_label(label).code, None)

    def code_of(node, pos, parent_code):
        return f"FG-{pos:02d}" if parent_code is None else f"{parent_code}-{pos:02d}"

    return b.finish(code_of)


def _plural_phrase(noun: str) -> str:
    words = noun.split(" ")
    words[-1] = plural(words[-1])
    return " ".join(words)


# ---- mid-depth tree written as paths ----------------------------------------------------------------------

# (top label, reference codes it stands for, reference concepts it carries)
PATH_GROUPS = [
    (
        "Outdoor",
        ["Garden", "Outdoor living"],
        ["Garden tools", "Watering", "Pots & planters", "Outdoor living/*"],
    ),
    (
        "Home",
        ["Furniture", "Home textiles", "Home decor"],
        ["Furniture/*", "Home textiles/*", "Home decor/*"],
    ),
    ("Kitchen", ["Kitchen & dining"], ["Kitchen & dining/*"]),
    ("Bath", ["Bathroom"], ["Bathroom/*"]),
    ("Lighting", ["Lighting"], ["Lighting/*"]),
    (
        "Household",
        ["Cleaning & laundry", "Heating & cooling"],
        ["Cleaning & laundry/*", "Heating & cooling/*"],
    ),
]


def build_path_tree(
    ref: Reference, rng: random.Random, key: str, name: str, max_categories: int = 240
) -> Supplier:
    seed = rng.randrange(2**32)
    for attempt, p_stop in enumerate((0.2, 0.3, 0.4, 0.55, 0.75, 1.0)):
        cats = _path_tree(ref, random.Random(seed + attempt), p_stop)
        if len(cats) <= max_categories:
            break
    return Supplier(key, name, "paths", cats)


def _path_tree(ref: Reference, rng: random.Random, p_stop: float) -> dict[str, SupplierCategory]:
    b = _Builder()

    def place(code: str, parent: int, depth: int) -> None:
        c = ref.concepts[code]
        kids = [k for k in ref.live_children(code) if rng.random() > 0.06]  # a few lines it does not carry
        pool = _pool(ref, [code])
        if not kids or depth == 3 or rng.random() < p_stop:
            kind = "coarse" if ref.live_children(code) else "mirror"
            b.add(word_us(c, rng), parent, [code], pool, kind, _leaf_weight(rng, len(pool)))
            return
        node = b.add(word_us(c, rng), parent, [code], pool, "mirror", INTERNAL_WEIGHT)
        for k in kids:
            place(k, node, depth + 1)

    for label, truth_labels, carried in PATH_GROUPS:
        codes = []
        for spec in carried:
            base, _, star = spec.partition("/")
            top = ref.by_label(base).code
            codes.extend(ref.live_children(top) if star else [top])
        truth = [ref.by_label(t).code for t in truth_labels]
        top = b.add(label, None, truth, _pool(ref, codes), "grouping", INTERNAL_WEIGHT)
        for code in codes:
            if ref.live_children(code) and rng.random() < 0.3:  # skip a level: its children move up
                for k in ref.live_children(code):
                    place(k, top, 2)
            else:
                place(code, top, 2)

    def code_of(node, pos, parent_code):
        return node.label if parent_code is None else parent_code + PATH_SEPARATOR + node.label

    return b.finish(code_of)


# ---- flat messy tags --------------------------------------------------------------------------------------


def build_tags(ref: Reference, rng: random.Random, key: str, name: str, n_concepts: int = 120) -> Supplier:
    live = [c for c in ref.concepts.values() if not c.deprecated]

    def weight(c: RefConcept) -> float:
        if not ref.live_children(c.code):
            return 1.0
        return {1: 0.05, 2: 0.25}.get(c.depth, 0.6)

    # weighted sampling without replacement (Efraimidis-Spirakis keys), deterministic for a seed
    keyed = sorted(live, key=lambda c: rng.random() ** (1 / weight(c)), reverse=True)
    chosen = keyed[:n_concepts]
    seen: set[str] = set()
    tags: list[SupplierCategory] = []

    def add(text: str, truth: list[str], pool, kind: str) -> bool:
        for _ in range(5):
            tag = messy_tag(text, rng)
            if tag_norm(tag) not in seen and "|" not in tag:
                seen.add(tag_norm(tag))
                tags.append(SupplierCategory(tag, tag, None, truth, pool, kind, _leaf_weight(rng, len(pool))))
                return True
        return False

    for c in chosen:
        pool = _pool(ref, [c.code])
        for n_tag in range(2 if rng.random() < 0.22 else 1):
            r = rng.random()
            if r < 0.12 and c.nouns:  # tagged by product type: narrower than the leaf it maps to
                i = rng.randrange(len(c.nouns))
                add(_plural_phrase(rng.choice(c.nouns[i])), [c.code], [(c.code, i)], "deeper")
            elif r < 0.22 and c.us_terms:
                add(rng.choice(c.us_terms), [c.code], pool, "variant" if n_tag else "mirror")
            else:
                add(_pick_wording(c, rng, 0.5), [c.code], pool, "variant" if n_tag else "mirror")
    leaves = [c for c in chosen if not ref.live_children(c.code)]
    for c in leaves[:40:6]:  # a few tags that lump two sibling leaves together
        sibs = [k for k in ref.live_children(c.parent) if k != c.code and not ref.live_children(k)]
        if sibs:
            other = ref.concepts[rng.choice(sibs)]
            add(
                f"{c.label} & {other.label}", [c.code, other.code], _pool(ref, [c.code, other.code]), "merged"
            )
    rng.shuffle(tags)
    return Supplier(key, name, "tags", {t.code: t for t in tags})


def build_suppliers(ref: Reference, rng: random.Random) -> list[Supplier]:
    """The three suppliers, in the order of vocabulary.SUPPLIERS."""
    builders = {"tree": build_deep_tree, "tags": build_tags, "paths": build_path_tree}
    return [
        builders[fmt](ref, random.Random(rng.randrange(2**32)), key, name)
        for key, name, fmt in vocab.SUPPLIERS
    ]
