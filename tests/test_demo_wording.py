"""Text transforms used to make supplier wording differ from the reference."""

from __future__ import annotations

import random

import pytest

from pipeline.demo.wording import (
    invert,
    messy_tag,
    plural,
    render_size,
    singular,
    tag_norm,
    title_case,
    toggle_number,
    typo,
    us_spelling,
)


@pytest.mark.parametrize(
    "word,expected",
    [
        ("hose", "hoses"),
        ("knife", "knives"),
        ("box", "boxes"),
        ("battery", "batteries"),
        ("secateurs", "secateurs"),
        ("compost", "compost"),
    ],
)
def test_plural(word, expected):
    assert plural(word) == expected


@pytest.mark.parametrize(
    "word,expected",
    [
        ("hoses", "hose"),
        ("knives", "knife"),
        ("batteries", "battery"),
        ("glasses", "glass"),
        ("benches", "bench"),
        ("grass", "grass"),
    ],
)
def test_singular(word, expected):
    assert singular(word) == expected


def test_toggle_number_flips_last_word_only():
    assert toggle_number("garden hoses") == "garden hose"
    assert toggle_number("garden hose") == "garden hoses"


def test_us_spelling_keeps_case():
    assert us_spelling("Grey aluminium colour") == "Gray aluminum color"
    assert us_spelling("Galvanised watering can") == "Galvanized watering can"


def test_title_case_small_words_and_acronyms():
    assert title_case("led bulbs and tv units") == "LED Bulbs and TV Units"
    assert title_case("push gas mower, 16 in, yellow") == "Push Gas Mower, 16 in, Yellow"


def test_invert():
    assert invert("Solar garden lights") == "Garden lights, solar"
    assert invert("Sheds") == "Sheds"
    assert invert("Pots & planters") == "Pots & planters"


def test_typo_changes_long_words_only():
    rng = random.Random(1)
    assert typo("hose", rng) == "hose"
    assert typo("planters", rng) != "planters"


def test_messy_tag_never_pads_the_ends():
    rng = random.Random(3)
    for _ in range(500):
        tag = messy_tag("garden tools & accessories", rng)
        assert tag == tag.strip() and tag


def test_messy_tag_is_seeded():
    a = [messy_tag("hose reels & hose fittings", random.Random(9)) for _ in range(3)]
    b = [messy_tag("hose reels & hose fittings", random.Random(9)) for _ in range(3)]
    assert a == b


def test_tag_norm_folds_case_and_spaces():
    assert tag_norm("Garden  Hoses") == tag_norm("garden hoses")


@pytest.mark.parametrize(
    "size,style,expected",
    [
        (("20", "cm"), "tidy", "20cm"),
        (("20", "cm"), "messy", "20 cm"),
        (("20", "cm"), "us", "8 in"),
        (("4", "pack"), "tidy", "Pack of 4"),
        (("4", "pack"), "us", "4-Pack"),
        (("double", "bed"), "us", "Full"),
        (("500", "ml"), "us", "17 fl oz"),
        (("2", "kg"), "us", "4.4 lb"),
        (("120x60", "cmx"), "us", "47x24 in"),
    ],
)
def test_render_size(size, style, expected):
    # conversions: 1 in = 2.54 cm, 1 fl oz = 29.57 ml, 1 kg = 2.205 lb (from memory); US "full" = UK double
    assert render_size(*size, style) == expected
