"""Helpers for the outside checks: official correspondence tables kept beside the checkout in ../shared/oracles/.

The tables are never copied into the repository; a test that needs one skips with a reason when it is absent.
"""

from __future__ import annotations

import csv
import os
from pathlib import Path

import pytest
from rdflib import Graph, Literal, Namespace, URIRef
from rdflib.namespace import RDF, SKOS

ROOT = Path(__file__).resolve().parent.parent
ORACLES = Path(os.environ.get("GRAFTWORK_ORACLES", ROOT.parent / "shared" / "oracles"))


def oracle_dir(name: str) -> Path:
    d = ORACLES / name
    if not (d / "correspondence.csv").is_file():
        pytest.skip(f"oracle table {name} not found under {ORACLES} (set GRAFTWORK_ORACLES to its folder)")
    return d


def tree_csv_to_skos(tree_csv: Path, out: Path, base: str) -> Path:
    """Write a `code,label,parent_code` tree as SKOS Turtle, the way a user publishes a reference hierarchy."""
    ns = Namespace(base)
    g = Graph()
    g.bind("skos", SKOS)
    scheme = URIRef(base.rstrip("/#"))
    g.add((scheme, RDF.type, SKOS.ConceptScheme))
    with open(tree_csv, newline="", encoding="utf-8") as fh:
        for row in csv.DictReader(fh):
            c = ns[row["code"]]
            g.add((c, RDF.type, SKOS.Concept))
            g.add((c, SKOS.inScheme, scheme))
            g.add((c, SKOS.notation, Literal(row["code"])))
            g.add((c, SKOS.prefLabel, Literal(row["label"], lang="en")))
            if row["parent_code"]:
                g.add((c, SKOS.broader, ns[row["parent_code"]]))
    g.serialize(out, format="turtle")
    return out


def answer_key(folder: Path) -> dict[str, set[str]]:
    key: dict[str, set[str]] = {}
    with open(folder / "correspondence.csv", newline="", encoding="utf-8") as fh:
        for row in csv.DictReader(fh):
            key.setdefault(row["source_code"], set()).add(row["reference_code"])
    return key
