"""Stable identifiers (IRIs and CURIEs) for both ends of a mapping, for the SSSOM and SKOS exports and imports.

Concepts keep the `iri` they were ingested with. Source categories have none, so one is minted per scheme:

    urn:graftwork:<scheme key>:<percent-encoded code>

(the code is encoded with `urllib.parse.quote`, nothing but `-._~` left bare), so it depends only on the scheme key
and the code and stays the same across runs and machines. Reference concepts without an IRI (tree CSV input) are
minted the same way from the reference key. `--prefix KEY=IRI` replaces the namespace of scheme KEY, e.g.
`--prefix shop=https://data.example.org/shop/` gives `https://data.example.org/shop/<code>`.

CURIE prefix names are the scheme keys (a key that is not an XML name or that collides with a prefix SSSOM builds
in gets `g_` in front); concept IRIs outside one namespace get `<key>_2`, `<key>_3`, ...

>>> ns = SchemeNamespaces.build({"shop": None}, {})
>>> ns.iri("shop", "Garden > Tools")
'urn:graftwork:shop:Garden%20%3E%20Tools'
>>> ns.curie('urn:graftwork:shop:Garden%20%3E%20Tools')
'shop:Garden%20%3E%20Tools'
>>> ns.code_of("shop", 'urn:graftwork:shop:Garden%20%3E%20Tools')
'Garden > Tools'
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from urllib.parse import quote, unquote

from pipeline.errors import BadInput, Problem

MINT_BASE = "urn:graftwork:{key}:"
SKOS_NS = "http://www.w3.org/2004/02/skos/core#"
# Prefixes SSSOM treats as built in (SSSOM/TSV spec, "IRI prefixes"): they may be left out of a curie_map and
# must never be given another expansion.
BUILTIN_PREFIXES = {
    "owl": "http://www.w3.org/2002/07/owl#",
    "rdf": "http://www.w3.org/1999/02/22-rdf-syntax-ns#",
    "rdfs": "http://www.w3.org/2000/01/rdf-schema#",
    "semapv": "https://w3id.org/semapv/vocab/",
    "skos": "http://www.w3.org/2004/02/skos/core#",
    "sssom": "https://w3id.org/sssom/",
    "xsd": "http://www.w3.org/2001/XMLSchema#",
    "linkml": "https://w3id.org/linkml/",
}
_NCNAME = re.compile(r"[A-Za-z_][A-Za-z0-9_.-]*")


def encode_code(code: str) -> str:
    return quote(str(code), safe="-._~")


def parse_prefix_overrides(pairs: list[str] | None) -> dict[str, str]:
    """`["shop=https://x.org/shop/"]` -> `{"shop": "https://x.org/shop/"}` (the CLI's `--prefix KEY=IRI`)."""
    out: dict[str, str] = {}
    for pair in pairs or []:
        key, sep, iri = pair.partition("=")
        key, iri = key.strip(), iri.strip()
        if not sep or not key or not re.match(r"^[A-Za-z][A-Za-z0-9+.-]*:\S+$", iri):
            raise BadInput(Problem(f"expected KEY=IRI (an absolute IRI such as https://host/path/), got {pair!r}",
                                   field="--prefix"))
        out[key] = iri
    return out


def prefix_name(key: str) -> str:
    """The CURIE prefix for a scheme key: the key itself when it is an XML name that SSSOM does not reserve."""
    if _NCNAME.fullmatch(key) and key not in BUILTIN_PREFIXES:
        return key
    return f"g_{key}"


@dataclass
class SchemeNamespaces:
    """Per scheme key: the namespace its minted ids live in; plus prefix name -> namespace for CURIEs."""

    bases: dict[str, str]                       # scheme key -> namespace for minted ids
    prefixes: dict[str, str] = field(default_factory=dict)  # prefix name -> namespace (no built-ins)

    @classmethod
    def build(cls, schemes: dict[str, None], overrides: dict[str, str]) -> SchemeNamespaces:
        """`schemes`: the scheme keys to mint for; `overrides`: `--prefix` values (unknown keys are refused)."""
        unknown = sorted(set(overrides) - set(schemes))
        if unknown:
            raise BadInput(Problem(f"--prefix names unknown scheme(s) {', '.join(unknown)}; "
                                   f"known: {', '.join(sorted(schemes))}", field="--prefix"))
        bases = {k: overrides.get(k, MINT_BASE.format(key=k)) for k in schemes}
        return cls(bases, {prefix_name(k): b for k, b in bases.items()})

    def iri(self, scheme: str, code: str) -> str:
        return self.bases[scheme] + encode_code(code)

    def code_of(self, scheme: str, iri: str) -> str | None:
        """The code inside a minted IRI of `scheme`, or None when the IRI is not in that namespace."""
        base = self.bases[scheme]
        return unquote(iri[len(base):]) if iri.startswith(base) and len(iri) > len(base) else None

    def add_namespace(self, key: str, namespace: str) -> str:
        """Register a namespace seen in concept IRIs under a prefix derived from `key`; returns the prefix."""
        for name, ns in self.prefixes.items():
            if ns == namespace:
                return name
        base, n = prefix_name(key), 1
        name = base
        while name in self.prefixes:
            n += 1
            name = f"{base}_{n}"
        self.prefixes[name] = namespace
        return name

    def curie(self, iri: str) -> str:
        """The shortest CURIE for `iri` over the known and built-in prefixes; the IRI itself if none fits."""
        best = None
        for name, ns in {**BUILTIN_PREFIXES, **self.prefixes}.items():
            if iri.startswith(ns) and len(iri) > len(ns) and (best is None or len(ns) > len(best[1])):
                best = (name, ns)
        return f"{best[0]}:{iri[len(best[1]):]}" if best else iri


def split_namespace(iri: str) -> tuple[str, str]:
    """`http://x.org/a/b#c` -> (`http://x.org/a/b#`, `c`): cut after the last '#', '/' or ':'."""
    for i in range(len(iri) - 1, -1, -1):
        if iri[i] in "#/:":
            return iri[: i + 1], iri[i + 1:]
    return "", iri


def expand_curie(value: str, curie_map: dict[str, str]) -> str | None:
    """A CURIE expanded with `curie_map` plus the built-ins; None when its prefix is not declared."""
    prefix, sep, local = value.partition(":")
    if not sep:
        return None
    ns = {**BUILTIN_PREFIXES, **curie_map}.get(prefix)
    return ns + local if ns is not None else None
