"""The crosswalk as SKOS mapping triples in Turtle (rdflib): `<category> skos:closeMatch <concept>`, with labels.

Rejected edges are left out (SKOS has no negated mapping); `skos:prefLabel` triples name both ends.
"""

from __future__ import annotations

from pathlib import Path

import pandas as pd
from rdflib import Graph, Literal, Namespace, URIRef
from rdflib.namespace import SKOS

from pipeline.exchange.sssom import SKOS_MAPPING_PROPERTIES, MappingSetInfo, _write_atomic


def write_skos_turtle(frame: pd.DataFrame, out: str | Path, info: MappingSetInfo) -> int:
    """Returns the number of mapping triples written."""
    g = Graph()
    g.bind("skos", SKOS)
    for name, ns in info.curie_map.items():
        g.bind(name, Namespace(ns))
    n = 0
    for row in frame.itertuples(index=False):
        if row.status == "rejected" or row.match_type not in SKOS_MAPPING_PROPERTIES:
            continue
        s, o = URIRef(row.subject_iri), URIRef(row.object_iri)
        g.add((s, SKOS[row.match_type], o))
        g.add((s, SKOS.prefLabel, Literal(row.source_label)))
        g.add((o, SKOS.prefLabel, Literal(row.concept_label)))
        n += 1
    _write_atomic(Path(out), g.serialize(format="turtle"))
    return n
