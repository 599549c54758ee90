"""Registry of mapping exporters by format name, so a new format is one function and one line here.

An exporter is `write(frame, out, info) -> rows written`: `frame` is the mappings frame with `subject_iri`,
`object_iri`, `subject_id` and `object_id` (CURIEs) added, `info` the set-level metadata (`MappingSetInfo`).
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pandas as pd

from pipeline import __version__
from pipeline.errors import BadInput, NotFound, Problem
from pipeline.exchange.iris import SchemeNamespaces, prefix_name, split_namespace
from pipeline.exchange.mappings_csv import mappings_frame, write_mappings_csv
from pipeline.exchange.skos_turtle import write_skos_turtle
from pipeline.exchange.sssom import UNSPECIFIED_LICENSE, MappingSetInfo, write_sssom
from pipeline.store import Store

Exporter = Callable[[pd.DataFrame, Path, MappingSetInfo], int]
EXPORTERS: dict[str, Exporter] = {"csv": write_mappings_csv, "sssom": write_sssom, "turtle": write_skos_turtle}
ALIASES = {"tsv": "sssom", "sssom.tsv": "sssom", "ttl": "turtle", "skos": "turtle"}
STATUSES = ("accepted", "auto", "proposed", "rejected")


def export_mappings(store: Store, out: str | Path, *, fmt: str = "csv", candidates: int = 1,
                    sources: list[str] | None = None, statuses: list[str] | None = None,
                    prefixes: dict[str, str] | None = None, license: str | None = None,
                    set_id: str | None = None) -> dict:
    """Write edges up to rank `candidates` (plus every decided edge) of `sources` (default all) in `fmt`.
    `prefixes`: scheme key -> IRI namespace overrides for minted ids (see pipeline/exchange/iris.py)."""
    fmt = ALIASES.get(fmt, fmt)
    if fmt not in EXPORTERS:
        raise BadInput(Problem(f"unknown export format {fmt!r}; use one of: {', '.join(EXPORTERS)}",
                               field="--format"))
    bad = [s for s in statuses or [] if s not in STATUSES]
    if bad:
        raise BadInput(Problem(f"unknown status {', '.join(bad)}; use: {', '.join(STATUSES)}", field="--status"))
    schemes = store.rows("schemes_list")
    known = [s["key"] for s in schemes if s["role"] == "source"]
    unknown = [s for s in sources or [] if s not in known]
    if unknown:
        raise NotFound(f"unknown source(s): {', '.join(unknown)}; known: {', '.join(known) or 'none'}")
    frame = mappings_frame(store, candidates=candidates, sources=sources, statuses=statuses)
    frame, info = with_identifiers(frame, schemes, prefixes or {})
    info.license = license or UNSPECIFIED_LICENSE
    refs = sorted(set(frame["reference_scheme"])) or [s["key"] for s in schemes if s["role"] == "reference"]
    info.mapping_set_id = set_id or f"urn:graftwork:mapping-set:{'+'.join(refs)}"
    info.title = f"graftwork crosswalk onto {', '.join(refs)}"
    n = EXPORTERS[fmt](frame, Path(out), info)
    return {"file": str(out), "format": fmt, "rows": n}


def with_identifiers(frame: pd.DataFrame, schemes: list[dict], overrides: dict[str, str]
                     ) -> tuple[pd.DataFrame, MappingSetInfo]:
    """Add IRIs and CURIEs for both ends, and the CURIE map of the prefixes those CURIEs use."""
    keys = {s["key"]: None for s in schemes}
    refs = {s["key"] for s in schemes if s["role"] == "reference"}
    ns = SchemeNamespaces.build(keys, overrides)
    for ref in refs - set(overrides):
        ns.prefixes.pop(prefix_name(ref), None)  # concepts bring their own IRIs; mint only for those without
    frame = frame.copy()
    frame["subject_iri"] = [ns.iri(s, c) for s, c in zip(frame["source_scheme"], frame["source_code"])]
    objects = []
    for ref, code, iri in zip(frame["reference_scheme"], frame["concept_code"], frame["concept_iri"]):
        if not iri:
            iri = ns.iri(ref, code)
            ns.add_namespace(ref, ns.bases[ref])
        else:
            ns.add_namespace(ref, split_namespace(iri)[0])
        objects.append(iri)
    frame["object_iri"] = objects
    frame["subject_id"] = [ns.curie(i) for i in frame["subject_iri"]]
    frame["object_id"] = [ns.curie(i) for i in frame["object_iri"]]
    used = {c.split(":", 1)[0] for c in [*frame["subject_id"], *frame["object_id"]]}
    curie_map = {p: v for p, v in ns.prefixes.items() if p in used}
    return frame, MappingSetInfo(curie_map=curie_map, mapping_set_id="", tool_version=__version__)
