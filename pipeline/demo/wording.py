"""Text transforms that make supplier wording differ from the reference: number, spelling, case, mess.

>>> plural("knife"), singular("hoses"), us_spelling("Grey aluminium planter")
('knives', 'hose', 'Gray aluminum planter')
>>> title_case("led lights & accessories for the garden")
'LED Lights & Accessories for the Garden'
"""

from __future__ import annotations

import random
import re

from pipeline.demo.vocabulary import IRREGULAR_PLURALS, TAG_ABBREVIATIONS, US_SPELLINGS

_SINGULARS = {v: k for k, v in IRREGULAR_PLURALS.items()}
_SMALL_WORDS = {"and", "or", "of", "for", "the", "with", "in", "on", "to", "a", "an", "&"}
_UPPER_TOKENS = {
    "led",
    "tv",
    "pir",
    "usb",
    "sds",
    "hepa",
    "gls",
    "fsc",
    "diy",
    "bbq",
    "bbqs",
    "ppe",
    "hvac",
    "f1",
}
_WORD = re.compile(r"[A-Za-z][A-Za-z'-]*")


def plural(word: str) -> str:
    """English plural of one word (rules good enough for catalogue nouns)."""
    low = word.lower()
    if low in IRREGULAR_PLURALS:
        return _keep_case(word, IRREGULAR_PLURALS[low])
    if low in _SINGULARS or (low.endswith("s") and not low.endswith(("ss", "us"))):
        return word  # already plural
    if re.search(r"[^aeiou]y$", low):
        return word[:-1] + "ies"
    if low.endswith(("s", "x", "ch", "sh")):
        return word + "es"
    return word + "s"


def singular(word: str) -> str:
    """English singular of one word; leaves words that are not plural alone."""
    low = word.lower()
    if low in _SINGULARS:
        return _keep_case(word, _SINGULARS[low])
    if low in IRREGULAR_PLURALS or low.endswith(("ss", "us", "is")):
        return word
    if low.endswith("ies") and len(low) > 4:
        return word[:-3] + "y"
    if low.endswith(("ches", "shes", "xes", "sses")):
        return word[:-2]
    if low.endswith("s"):
        return word[:-1]
    return word


def toggle_number(phrase: str) -> str:
    """Flip the last word between singular and plural: 'garden hoses' <-> 'garden hose'."""
    words = phrase.split(" ")
    last = words[-1]
    flipped = singular(last)
    if flipped == last:
        flipped = plural(last)
    words[-1] = flipped
    return " ".join(words)


def _keep_case(original: str, new: str) -> str:
    return new[:1].upper() + new[1:] if original[:1].isupper() else new


def us_spelling(text: str) -> str:
    """Replace British spellings word by word, keeping the case of each word's first letter."""

    def swap(m: re.Match) -> str:
        word = m.group(0)
        us = US_SPELLINGS.get(word.lower())
        return _keep_case(word, us) if us else word

    return _WORD.sub(swap, text)


def title_case(text: str) -> str:
    """Catalogue title case: small words stay lower (except first), known acronyms upper."""
    out = []
    for i, word in enumerate(text.split(" ")):
        low = word.lower().rstrip(",;:")
        if low in _UPPER_TOKENS and word[len(low) :] in ("", ",", ";", ":"):
            out.append(word.upper())
        elif i > 0 and low in _SMALL_WORDS:
            out.append(word.lower())
        elif word[:1].isalpha():
            out.append(word[:1].upper() + word[1:])
        else:
            out.append(word)
    return " ".join(out)


def sentence_case(text: str) -> str:
    return text[:1].upper() + text[1:]


def invert(label: str) -> str:
    """Catalogue inversion: 'Solar garden lights' -> 'Garden lights, solar'. One-word labels stay."""
    words = label.split(" ")
    if len(words) < 2 or "&" in words or "and" in words:
        return label
    head = " ".join(words[1:]) + ", " + words[0].lower()
    return sentence_case(head) if label[:1].isupper() else head


def typo(word: str, rng: random.Random) -> str:
    """One keyboard slip in a word of five letters or more: swap, drop or double a letter."""
    if len(word) < 5 or not word.isalpha():
        return word
    i = rng.randrange(1, len(word) - 2)
    kind = rng.randrange(3)
    if kind == 0:
        return word[:i] + word[i + 1] + word[i] + word[i + 2 :]
    if kind == 1:
        return word[:i] + word[i + 1 :]
    return word[:i] + word[i] + word[i:]


def messy_tag(text: str, rng: random.Random) -> str:
    """Turn a clean wording into a seller's tag: number flips, '&'/'and', abbreviations, typos, case, spaces.

    Extra spaces are only ever doubled inner spaces, never leading or trailing ones, so a reader that strips
    cells still sees the same tag in the taxonomy and the items file.
    """
    tag = text.lower()
    if rng.random() < 0.35:
        tag = toggle_number(tag)
    if " & " in tag and rng.random() < 0.5:
        tag = tag.replace(" & ", rng.choice([" and ", " + ", "&", " n "]))
    elif " and " in tag and rng.random() < 0.4:
        tag = tag.replace(" and ", " & ")
    words = tag.split(" ")
    for i, w in enumerate(words):
        if w in TAG_ABBREVIATIONS and w != "and" and rng.random() < 0.3:
            words[i] = rng.choice(TAG_ABBREVIATIONS[w])
    if rng.random() < 0.09:
        j = rng.randrange(len(words))
        words[j] = typo(words[j], rng)
    tag = " ".join(words)
    r = rng.random()
    if r < 0.45:
        pass  # all lower case
    elif r < 0.8:
        tag = " ".join(w[:1].upper() + w[1:] for w in tag.split(" "))
    elif r < 0.92:
        tag = sentence_case(tag)
    else:
        tag = tag.upper()
    if " " in tag and rng.random() < 0.06:
        spaces = [i for i, ch in enumerate(tag) if ch == " "]
        k = rng.choice(spaces)
        tag = tag[:k] + "  " + tag[k + 1 :]
    return tag


def tag_norm(tag: str) -> str:
    """The form two tags must not share (so no reader folding case or spaces merges two of ours)."""
    return " ".join(tag.lower().split())


_US_BED = {"single": "twin", "double": "full", "king": "king", "super king": "california king"}


def render_size(value: str, unit: str, style: str) -> str:
    """Write one size the way a supplier does: style 'tidy' (British, compact), 'messy' or 'us' (imperial)."""
    if style == "us":
        return _render_us(value, unit)
    spaced = style == "messy"
    if unit in ("cm", "m", "L", "ml", "kg", "g", "V", "W", "mm"):
        if spaced and unit == "L":
            return f"{value} litre"
        return f"{value} {unit}" if spaced else f"{value}{unit}"
    if unit == "cmx":
        return f"{value} cm" if spaced else f"{value}cm"
    if unit == "pack":
        return f"x{value}" if spaced else f"Pack of {value}"
    if unit == "seater":
        return f"{value} seater" if spaced else f"{value} Seater"
    if unit == "piece":
        return f"{value}pc" if spaced else f"{value} Piece"
    if unit == "seeds":
        return f"{value} seeds" if spaced else f"{value} Seeds"
    if unit == "tog":
        return f"{value} tog" if spaced else f"{value} Tog"
    if unit == "bed":
        return value if spaced else title_case(value)
    return f"{value} {unit}"


def _render_us(value: str, unit: str) -> str:
    if unit == "cm":
        return f"{max(1, round(float(value) / 2.54))} in"
    if unit == "cmx":
        parts = [str(max(1, round(float(v) / 2.54))) for v in value.split("x")]
        return "x".join(parts) + " in"
    if unit == "m":
        return f"{round(float(value) * 3.281)} ft"
    if unit == "ml":
        return f"{round(float(value) / 29.57)} fl oz"
    if unit == "kg":
        return f"{round(float(value) * 2.205, 1):g} lb"
    if unit == "g":
        return f"{round(float(value) / 28.35)} oz"
    if unit == "L":
        return f"{value} L"
    if unit == "pack":
        return f"{value}-Pack"
    if unit == "seater":
        return f"{value}-Seat"
    if unit == "piece":
        return f"{value}-Piece"
    if unit == "seeds":
        return f"{value}-Count"
    if unit == "bed":
        return title_case(_US_BED.get(value, value))
    return f"{value}{unit}" if unit in ("V", "W", "mm") else f"{value} {unit.title()}"
