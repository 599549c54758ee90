"""Invented products and the item rows each supplier lists for them.

A product is a reference leaf, one of its nouns and a few modifiers (adjective, material, colour, size), a
brand line and a price. Each supplier files it under its own most specific category that covers it and
writes the title in its own style, so a product sold by two suppliers (same product key) reads a bit
differently in each.
"""

from __future__ import annotations

import random
import re
from dataclasses import dataclass
from functools import cache
from itertools import accumulate

from pipeline.demo import vocabulary as vocab
from pipeline.demo.reference import Reference
from pipeline.demo.suppliers import Supplier
from pipeline.demo.wording import render_size, title_case, typo, us_spelling

SUPPLIER_SHARE = {"fennelgrist": 0.38, "wrenmantle": 0.27, "cobbleweir": 0.35}
SHARED_SHARE = 0.10  # of product keys, sold by two suppliers
SECOND_CATEGORY_SHARE = 0.025  # of item rows, filed under two categories
TITLE_STYLE = {"tree": "tidy", "tags": "messy", "paths": "us"}


@dataclass
class Product:
    key: str
    leaf: str
    noun_i: int
    noun: tuple[str, str]
    adjective: str | None
    material: str | None
    colour: str | None
    size: tuple[str, str] | None
    brand: str
    price: float


@dataclass
class ItemRow:
    item_key: str
    title: str
    categories: list[str]
    brand_line: str
    price: str
    leaf: str  # ground truth: the reference leaf of the product (not written to the items file)


class _Catalogue:
    """One supplier's filing view: weighted categories, and (leaf, noun) -> covering categories."""

    def __init__(self, supplier: Supplier) -> None:
        self.supplier = supplier
        self.codes = list(supplier.categories)
        self.cum = list(accumulate(supplier.categories[c].weight for c in self.codes))
        self.covering: dict[tuple[str, int], list[str]] = {}
        for code, cat in supplier.categories.items():
            for entry in cat.pool:
                self.covering.setdefault(entry, []).append(code)

    def most_specific(self, entry: tuple[str, int], rng: random.Random) -> str:
        cands = self.covering[entry]
        smallest = min(len(self.supplier.categories[c].pool) for c in cands)
        return rng.choice([c for c in cands if len(self.supplier.categories[c].pool) == smallest])


_CONSUMABLE = re.compile(vocab.CONSUMABLES)
_FITS = {unit: re.compile(rx) for unit, rx in vocab.SIZE_FITS.items()}
_CONSUMABLE_ADJECTIVES = ["premium", "value", "natural", "eco", "everyday"]


@cache  # a few hundred nouns, checked tens of thousands of times
def size_fits(noun: str, unit: str) -> bool:
    """Whether a size in `unit` makes sense for this noun (no 'greenhouse 2 seater')."""
    if unit in ("cm", "cmx"):
        return not _is_consumable(noun)
    return unit in _FITS and bool(_FITS[unit].search(noun))


@cache
def _is_consumable(noun: str) -> bool:
    return bool(_CONSUMABLE.search(noun))


_MODIFIER_FITS = {m: re.compile(rx) for m, rx in vocab.MODIFIER_FITS.items()}


@cache  # a few hundred nouns, checked tens of thousands of times
def modifier_fits(noun: str, modifier: str) -> bool:
    rx = _MODIFIER_FITS.get(modifier)
    return rx is None or bool(rx.search(noun))


def leaf_prices(ref: Reference, rng: random.Random) -> dict[str, float]:
    """A typical price per reference leaf, drawn once inside its profile's range (a pot is not a sofa)."""
    out = {}
    for code, c in ref.concepts.items():
        if c.nouns:
            lo, hi = vocab.PROFILES[c.profile]["price"]
            out[code] = lo * (hi / lo) ** rng.random()
    return out


def _draw_product(
    key: str, leaf: str, noun_i: int, ref: Reference, base_price: float, rng: random.Random
) -> Product:
    c = ref.concepts[leaf]
    prof = vocab.PROFILES[c.profile]
    noun = c.nouns[noun_i]
    consumable = _is_consumable(noun[0])

    def maybe(options: list[str], p: float) -> str | None:
        if not options or rng.random() >= p:
            return None
        pick = rng.choice(options)
        if pick.lower() in noun[0].lower() or not modifier_fits(noun[0], pick):
            return None  # no "cordless cordless drill", no "reclining water feature"
        return pick

    sizes = [s for s in prof["sizes"] if size_fits(noun[0], s[1])]
    return Product(
        key=key,
        leaf=leaf,
        noun_i=noun_i,
        noun=noun,
        adjective=maybe(_CONSUMABLE_ADJECTIVES if consumable else prof["adjectives"], 0.5),
        material=None if consumable else maybe(prof["materials"], 0.55),
        colour=None if consumable else maybe(prof["colours"], 0.35),
        size=rng.choice(sizes) if sizes and rng.random() < 0.75 else None,
        brand=rng.choice(vocab.BRAND_LINES),
        price=base_price * rng.uniform(0.6, 1.7),
    )


def _price(value: float) -> str:
    return (
        f"{max(1, int(value)) + 0.99:.2f}" if value >= 10 else f"{max(0.49, round(value * 2) / 2 - 0.01):.2f}"
    )


def render_title(p: Product, style: str, rng: random.Random) -> str:
    """The product title as one supplier writes it."""
    size = render_size(*p.size, style) if p.size else None
    if style == "tidy":
        parts = [p.brand if rng.random() < 0.35 else None, p.adjective, p.colour, p.material, p.noun[0], size]
        return title_case(_join(parts))
    if style == "us":
        head = _join([p.brand if rng.random() < 0.5 else None, p.adjective, p.material, p.noun[1]])
        tail = [x for x in (size, p.colour) if x]
        return title_case(us_spelling(", ".join([head] + tail)))
    noun = rng.choice(p.noun)
    pattern = rng.randrange(3)
    if pattern == 0:
        text = _join([noun, p.material, size])
    elif pattern == 1:
        text = _join([p.brand.lower(), noun, "-" if (p.colour or size) else None, p.colour, size])
    else:
        text = _join([p.adjective, noun, p.material, size])
    r = rng.random()
    if r < 0.1:
        text += rng.choice([" NEW", " x2", " (pack of 2)", " - fast dispatch", " **sale**"])
    if rng.random() < 0.08:
        words = text.split(" ")
        j = rng.randrange(len(words))
        words[j] = typo(words[j], rng)
        text = " ".join(words)
    r = rng.random()
    return text.upper() if r < 0.08 else title_case(text) if r < 0.4 else text


def _join(parts: list[str | None]) -> str:
    return re.sub(r"\s+", " ", " ".join(x for x in parts if x)).strip()


def _second_category(
    cat_view: _Catalogue, primary: str, leaf: str, noun_i: int, ref: Reference, rng: random.Random
) -> str | None:
    """Another category of this supplier for the product: a parallel one, else a sibling product type's."""
    sup = cat_view.supplier
    related = set(sup.ancestors(primary))
    same = [
        c
        for c in cat_view.covering[(leaf, noun_i)]
        if c != primary and c not in related and primary not in sup.ancestors(c)
    ]
    if same:
        return rng.choice(same)
    parent = ref.concepts[leaf].parent
    sibs = [s for s in ref.leaves_under(parent) if s != leaf and (s, 0) in cat_view.covering]
    if not sibs:
        return None
    other = cat_view.most_specific((rng.choice(sibs), 0), rng)
    return None if other == primary or other in related else other


def generate_items(
    ref: Reference, suppliers: list[Supplier], rng: random.Random, n_items: int
) -> dict[str, list[ItemRow]]:
    """Exactly `n_items` rows in total; about SHARED_SHARE of product keys appear at two suppliers."""
    views = {s.key: _Catalogue(s) for s in suppliers}
    n_shared = round(n_items * SHARED_SHARE / (1 + SHARED_SHARE))
    n_products = n_items - n_shared
    key_pool = iter(rng.sample(range(100_000, 1_000_000), n_items))
    prices = leaf_prices(ref, rng)
    plan: list[tuple[Product, list[tuple[str, str]]]] = []  # product, [(supplier key, category)]

    def new_product(sup_key: str) -> None:
        view = views[sup_key]
        cat = rng.choices(view.codes, cum_weights=view.cum)[0]
        category = view.supplier.categories[cat]
        leaf, noun_i = rng.choice(category.own or category.pool)
        plan.append(
            (_draw_product(f"P{next(key_pool)}", leaf, noun_i, ref, prices[leaf], rng), [(sup_key, cat)])
        )

    counts = _split(n_products, [SUPPLIER_SHARE[s.key] for s in suppliers])
    for s, count in zip(suppliers, counts, strict=True):
        for _ in range(count):
            new_product(s.key)

    def others(p: Product, first: str) -> list[str]:
        return [k for k, v in views.items() if k != first and (p.leaf, p.noun_i) in v.covering]

    eligible = [i for i, (p, where) in enumerate(plan) if others(p, where[0][0])]
    chosen = rng.sample(eligible, min(n_shared, len(eligible)))
    for i in sorted(chosen):
        p, where = plan[i]
        second = rng.choice(others(p, where[0][0]))
        where.append((second, views[second].most_specific((p.leaf, p.noun_i), rng)))
    for _ in range(n_shared - len(chosen)):  # not enough overlap: keep the total exact with single products
        new_product(rng.choice(suppliers).key)

    rows: dict[str, list[ItemRow]] = {s.key: [] for s in suppliers}
    fmt = {s.key: s.format for s in suppliers}
    for p, where in plan:
        for sup_key, cat in where:
            cats = [cat]
            if rng.random() < SECOND_CATEGORY_SHARE:
                extra = _second_category(views[sup_key], cat, p.leaf, p.noun_i, ref, rng)
                if extra:
                    cats.append(extra)
            factor = {"tidy": 1.0, "messy": rng.uniform(0.85, 1.05), "us": rng.uniform(0.95, 1.15)}
            style = TITLE_STYLE[fmt[sup_key]]
            rows[sup_key].append(
                ItemRow(
                    p.key, render_title(p, style, rng), cats, p.brand, _price(p.price * factor[style]), p.leaf
                )
            )
    for r in rows.values():
        r.sort(key=lambda row: row.item_key)
    return rows


def _split(total: int, shares: list[float]) -> list[int]:
    """Largest-remainder split of `total` by `shares`."""
    raw = [total * s / sum(shares) for s in shares]
    out = [int(x) for x in raw]
    for i in sorted(range(len(raw)), key=lambda i: raw[i] - out[i], reverse=True)[: total - sum(out)]:
        out[i] += 1
    return out
