"""Read a reference hierarchy from an RDF file (SKOS and/or RDFS/OWL) into validated concept records.

Choices made here (the issue left them open):
- Parents come from `skos:broader`, the inverse of `skos:narrower` (both directions merged) and
  `rdfs:subClassOf`. `skos:broaderTransitive`/`narrowerTransitive` are ignored: they usually hold an inferred
  closure, and taking them as parents would attach every ancestor directly.
- A parent (or `skos:narrower` child) that is only the object of links, never the subject of a statement, is
  an error ("dangling"), not a dropped link. A node that has statements but no label is "without a label".
- Labels: the predicate comes first (SKOS nodes: `skos:prefLabel`, then `rdfs:label`; RDFS-only nodes the
  other way round), then the language: `lang`, a regional variant of it (`en-GB` for `en`), no tag, English,
  any; ties sorted.
- Output order is top-down: every parent before its children, ties broken by (depth, code).
- With `root`, parents of branch members that lie outside the branch are dropped (polyhierarchy).
- `scheme_iri`, `title` and `version` come from the one `skos:ConceptScheme` of the file; a file with no
  scheme but one `owl:Ontology` takes title and version from that. Schemes are counted over the whole file,
  even with `root`.

>>> import tempfile, pathlib
>>> p = pathlib.Path(tempfile.mkdtemp()) / "t.ttl"
>>> _ = p.write_text('@prefix skos: <http://www.w3.org/2004/02/skos/core#> . @prefix : <http://ex.org/> .\\n'
...                  ':a a skos:Concept ; skos:prefLabel "A" . :b skos:prefLabel "B" ; skos:broader :a .')
>>> [(c.code, c.parent_codes) for c in read_reference_rdf(p).concepts]
[('a', []), ('b', ['a'])]
"""

from __future__ import annotations

import heapq
import io
import json
import re
import warnings
import xml.sax
from collections import defaultdict, deque
from dataclasses import dataclass
from pathlib import Path

import rdflib
from rdflib import BNode, Literal, URIRef
from rdflib.exceptions import ParserError
from rdflib.namespace import DC, DCTERMS, OWL, RDF, RDFS, SKOS, XSD
from rdflib.parser import StringInputSource
from rdflib.plugins.parsers.notation3 import BadSyntax
from rdflib.plugins.parsers.nquads import NQuadsParser
from rdflib.plugins.parsers.ntriples import W3CNTriplesParser

from pipeline.errors import BadInput, Problem
from pipeline.ingest.hierarchy import check_hierarchy
from pipeline.records import ConceptRecord

# Accepted `rdf_format` names (lower-cased) -> rdflib parser name.
FORMAT_NAMES: dict[str, str] = {
    "turtle": "turtle",
    "ttl": "turtle",
    "text/turtle": "turtle",
    "xml": "xml",
    "rdf/xml": "xml",
    "rdfxml": "xml",
    "rdf": "xml",
    "owl": "xml",
    "application/rdf+xml": "xml",
    "nt": "nt",
    "nt11": "nt",
    "ntriples": "nt",
    "n-triples": "nt",
    "application/n-triples": "nt",
    "json-ld": "json-ld",
    "jsonld": "json-ld",
    "json": "json-ld",
    "application/ld+json": "json-ld",
    "n3": "n3",
    "text/n3": "n3",
    "trig": "trig",
    "application/trig": "trig",
    "nquads": "nquads",
    "nq": "nquads",
    "application/n-quads": "nquads",
}
EXTENSIONS: dict[str, str] = {
    ".ttl": "turtle",
    ".turtle": "turtle",
    ".rdf": "xml",
    ".owl": "xml",
    ".xml": "xml",
    ".nt": "nt",
    ".jsonld": "json-ld",
    ".json": "json-ld",
    ".n3": "n3",
    ".trig": "trig",
    ".nq": "nquads",
}
_QUAD_FORMATS = {"trig", "nquads"}  # parsed into a Dataset so named graphs are not lost
# Terms of these vocabularies (owl:Thing, skos:Concept, ...) are never concepts or parents.
_BUILTIN = (str(RDF), str(RDFS), str(OWL), str(SKOS), str(XSD))
_SCHEMA_VERSION = (URIRef("http://schema.org/version"), URIRef("https://schema.org/version"))


@dataclass
class ReferenceFile:
    concepts: list[ConceptRecord]  # validated: unique codes, parents exist, acyclic; top-down order
    scheme_iri: str | None  # the skos:ConceptScheme IRI if exactly one is used, else None
    title: str | None  # dcterms:title / rdfs:label / skos:prefLabel of the scheme, if any
    version: str | None  # owl:versionInfo / dcterms:hasVersion / schema version of the scheme, if any


def read_reference_rdf(
    path: str | Path, *, rdf_format: str | None = None, lang: str = "en", root: str | None = None
) -> ReferenceFile:
    """Parse an RDF file; return its concepts (validated, top-down) and the scheme's IRI, title and version.

    Raises BadInput listing every problem found (syntax, dangling links, missing labels, duplicate codes,
    cycles).
    """
    path = Path(path)
    name = str(path)
    graph = _load_graph(path, _parser_name(path, rdf_format))
    found = _collect(graph, name)
    nodes = found.nodes
    if not nodes:
        raise BadInput(
            Problem(
                "no concepts found (no skos:Concept, skos:inScheme, skos:broader/narrower, owl:Class, "
                "rdfs:Class or rdfs:subClassOf with IRIs)",
                file=name,
            )
        )
    parents = found.parents
    if root is not None:
        nodes, parents = _branch(URIRef(root.strip()), nodes, parents, name)
    text = _Text(graph, lang)
    labels, label_problems = _labels(nodes, found, text, name)
    codes, code_problems = _codes(nodes, found, text, name)
    problems = found.problems + label_problems + code_problems
    problems.extend(_cycle_problems(parents, found.link_name, name))
    if problems:
        raise BadInput(problems)

    records = {
        node: ConceptRecord(
            code=codes[node],
            pref_label=labels[node][0],
            parent_codes=sorted(codes[p] for p in parents[node]),
            iri=str(node),
            alt_labels=labels[node][1],
            definition=text.definition(node, skos_first=node in found.skos),
            deprecated=text.deprecated(node),
        )
        for node in nodes
    }
    checked = check_hierarchy([(r.code, r.pref_label, r.parent_codes) for r in records.values()], file=name)
    return ReferenceFile(
        concepts=_top_down(list(records.values()), checked.depth),
        scheme_iri=found.scheme_iri,
        title=text.pick(found.meta_node, (DCTERMS.title, DC.title, RDFS.label, SKOS.prefLabel)),
        version=_version(graph, found.meta_node),
    )


# ---- reading and parsing -----------------------------------------------------------------------------------


def _parser_name(path: Path, rdf_format: str | None) -> str:
    if rdf_format is not None:
        fmt = FORMAT_NAMES.get(rdf_format.strip().lower())
        if fmt is None:
            raise BadInput(
                Problem(
                    f"unknown RDF format {rdf_format!r}; accepted: {', '.join(FORMAT_NAMES)}",
                    file=str(path),
                    field="rdf_format",
                )
            )
        return fmt
    fmt = EXTENSIONS.get(path.suffix.lower())
    if fmt is None:
        raise BadInput(
            Problem(
                f"cannot tell the RDF format from the extension {path.suffix!r} "
                f"(known: {', '.join(EXTENSIONS)}); pass rdf_format",
                file=str(path),
                field="rdf_format",
            )
        )
    return fmt


def _load_graph(path: Path, fmt: str) -> rdflib.Graph:
    name = str(path)
    try:
        raw = path.read_bytes()
    except OSError as exc:
        raise BadInput(Problem(f"cannot read file: {exc.strerror or exc}", file=name)) from exc
    base = path.resolve().as_uri()  # relative IRIs resolve against the file, as rdflib does for a path
    text = None
    if fmt != "xml":  # RDF/XML declares its own encoding; the other syntaxes are UTF-8 by definition
        try:
            text = raw.decode("utf-8-sig")
        except UnicodeDecodeError as exc:
            line = raw.count(b"\n", 0, exc.start) + 1
            column = exc.start - (raw.rfind(b"\n", 0, exc.start) + 1) + 1
            raise BadInput(
                Problem(f"not valid UTF-8 (byte 0x{raw[exc.start]:02x})", file=name, line=line, column=column)
            ) from exc
    target = rdflib.Dataset(default_union=True) if fmt in _QUAD_FORMATS else rdflib.Graph()
    try:
        with warnings.catch_warnings():
            # rdflib's own TriG/N-Quads code calls its deprecated Dataset API; that is not the user's concern
            warnings.simplefilter("ignore", DeprecationWarning)
            if text is None:
                target.parse(source=io.BytesIO(raw), format=fmt, publicID=base)
            else:
                target.parse(data=text, format=fmt, publicID=base)
    except Exception as exc:  # every parser failure (rdflib raises many types) becomes one BadInput
        raise BadInput(_syntax_problem(exc, name, fmt, text)) from exc
    if isinstance(target, rdflib.Dataset):
        graph = rdflib.Graph()
        for triple in target.triples((None, None, None)):
            graph.add(triple)
        return graph
    return target


def _syntax_problem(exc: Exception, name: str, fmt: str, text: str | None) -> Problem:
    if isinstance(exc, BadSyntax):
        line = getattr(exc, "lines", None)
        line = line + 1 if isinstance(line, int) else _line_from_message(str(exc))
        column = None
        offset = getattr(exc, "_i", None)
        if text is not None and isinstance(offset, int) and text.count("\n", 0, offset) + 1 == line:
            column = offset - (text.rfind("\n", 0, offset) + 1) + 1
        why = getattr(exc, "_why", None) or str(exc)
        return Problem(f"{fmt} syntax error: {why}", file=name, line=line, column=column)
    if isinstance(exc, xml.sax.SAXParseException):
        return Problem(
            f"RDF/XML syntax error: {exc.getMessage()}",
            file=name,
            line=exc.getLineNumber(),
            column=exc.getColumnNumber(),
        )
    if isinstance(exc, json.JSONDecodeError):
        return Problem(f"JSON syntax error: {exc.msg}", file=name, line=exc.lineno, column=exc.colno)
    if isinstance(exc, IndexError) and text is not None:
        # rdflib's Turtle/N3 tokenizer runs off the end of a file cut in the middle of a statement
        last = text.rstrip("\n").count("\n") + 1
        return Problem(f"{fmt} syntax error: the file ends in the middle of a statement (truncated?)",
                       file=name, line=last)
    line = _line_from_message(str(exc))
    if line is None and fmt in ("nt", "nquads") and text is not None:
        line = _first_bad_line(text, fmt)  # the line-based parsers do not say which line failed
    return Problem(f"cannot parse as {fmt}: {exc}", file=name, line=line)


def _line_from_message(message: str) -> int | None:
    m = re.search(r"\bline (\d+)", message)
    return int(m.group(1)) if m else None


def _first_bad_line(text: str, fmt: str) -> int | None:
    """Re-run the line-based parser (only after a failure), counting lines, to find the one it rejected."""
    counter = _CountingNQuads() if fmt == "nquads" else _CountingNTriples(sink=_DropTriples())
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", DeprecationWarning)
            if fmt == "nquads":
                counter.parse(StringInputSource(text.encode("utf-8")), sink=rdflib.Dataset())
            else:
                counter.parse(io.StringIO(text))
    except ParserError:  # expected: the text failed before; only the count matters
        return counter.line_number or None
    return None


class _DropTriples:
    """A sink that keeps nothing (rdflib's default sink prints every triple)."""

    def triple(self, s: object, p: object, o: object) -> None:
        pass


class _CountingNTriples(W3CNTriplesParser):
    """The N-Triples parser reads one line per `readline` call but does not report which one failed."""

    line_number = 0

    def readline(self) -> str | None:
        self.line_number += 1
        return super().readline()


class _CountingNQuads(NQuadsParser):
    line_number = 0

    def readline(self) -> str | None:
        self.line_number += 1
        return super().readline()


# ---- collecting nodes and links ----------------------------------------------------------------------------


@dataclass
class _Found:
    nodes: set[URIRef]
    skos: set[URIRef]  # nodes seen through SKOS terms (labels prefer skos:prefLabel)
    described: set[URIRef]  # nodes that are the subject of at least one statement (others are dangling)
    parents: dict[URIRef, set[URIRef]]
    link_name: dict[tuple[URIRef, URIRef], str]  # (child, parent) -> the predicate that stated it
    referenced_by: dict[URIRef, set[tuple[str, URIRef]]]
    problems: list[Problem]
    scheme_iri: str | None
    meta_node: URIRef | None


def _is_term(node: object) -> bool:
    return isinstance(node, URIRef) and not str(node).startswith(_BUILTIN)


def _collect(graph: rdflib.Graph, name: str) -> _Found:
    skos: set[URIRef] = set()
    rdfs: set[URIRef] = set()
    declared: set[URIRef] = set()
    problems: list[Problem] = []
    blank_concepts = 0
    for s in graph.subjects(RDF.type, SKOS.Concept):
        if isinstance(s, BNode):
            blank_concepts += 1
        elif _is_term(s):
            skos.add(s)
    for pred in (SKOS.inScheme, SKOS.topConceptOf):
        skos.update(s for s in graph.subjects(pred, None) if _is_term(s))
    skos.update(o for o in graph.objects(None, SKOS.hasTopConcept) if _is_term(o))
    for cls in (OWL.Class, RDFS.Class):
        rdfs.update(s for s in graph.subjects(RDF.type, cls) if _is_term(s))
    declared |= skos | rdfs
    if blank_concepts:
        problems.append(
            Problem(
                f"{blank_concepts} skos:Concept node(s) without an IRI (blank nodes); give them IRIs",
                file=name,
                field="skos:Concept",
            )
        )

    parents: dict[URIRef, set[URIRef]] = defaultdict(set)
    link_name: dict[tuple[URIRef, URIRef], str] = {}
    referenced_by: dict[URIRef, set[tuple[str, URIRef]]] = defaultdict(set)

    def link(child: URIRef, parent: URIRef, how: str, subject: URIRef, obj: URIRef) -> None:
        parents[child].add(parent)
        link_name.setdefault((child, parent), how)
        referenced_by[obj].add((how, subject))

    for pred, how in ((SKOS.broader, "skos:broader"), (SKOS.narrower, "skos:narrower")):
        for s, o in graph.subject_objects(pred):
            if not (_is_term(s) and _is_term(o)):
                problems.append(
                    Problem(
                        f"{how} link between {s.n3()} and {o.n3()} is not between two concept IRIs",
                        file=name,
                        field=how,
                    )
                )
                continue
            skos.update((s, o))
            if pred == SKOS.broader:
                link(s, o, how, s, o)
            else:
                link(o, s, how, s, o)
    for s, o in graph.subject_objects(RDFS.subClassOf):
        if not _is_term(s):
            continue  # anonymous class expressions and built-in classes
        rdfs.add(s)
        if _is_term(o):  # blank-node restrictions and owl:Thing are not parents
            rdfs.add(o)
            link(s, o, "rdfs:subClassOf", s, o)

    nodes = skos | rdfs
    described = {n for n in nodes if n in declared or _has_own_data(graph, n)}
    schemes = {s for s in graph.subjects(RDF.type, SKOS.ConceptScheme) if isinstance(s, URIRef)}
    for pred in (SKOS.inScheme, SKOS.topConceptOf):
        schemes.update(o for o in graph.objects(None, pred) if isinstance(o, URIRef))
    schemes.update(s for s in graph.subjects(SKOS.hasTopConcept, None) if isinstance(s, URIRef))
    scheme_iri = next(iter(schemes)) if len(schemes) == 1 else None
    meta_node = scheme_iri
    if not schemes:
        ontologies = {s for s in graph.subjects(RDF.type, OWL.Ontology) if isinstance(s, URIRef)}
        meta_node = next(iter(ontologies)) if len(ontologies) == 1 else None
    return _Found(
        nodes=nodes,
        skos=skos,
        described=described,
        parents={n: parents.get(n, set()) for n in nodes},
        link_name=link_name,
        referenced_by=referenced_by,
        problems=problems,
        scheme_iri=str(scheme_iri) if scheme_iri else None,
        meta_node=meta_node,
    )


def _has_own_data(graph: rdflib.Graph, node: URIRef) -> bool:
    """A node that is the subject of any statement exists in the file; one that is only an object does not."""
    return next(iter(graph.predicates(node, None)), None) is not None


def _branch(
    root: URIRef, nodes: set[URIRef], parents: dict[URIRef, set[URIRef]], name: str
) -> tuple[set[URIRef], dict[URIRef, set[URIRef]]]:
    """Keep `root` and its descendants; links to parents outside the branch are dropped."""
    if root not in nodes:
        raise BadInput(Problem(f"root <{root}> is not a concept in {name}", file=name, field="root"))
    children: dict[URIRef, list[URIRef]] = defaultdict(list)
    for child, ps in parents.items():
        for p in ps:
            children[p].append(child)
    keep = {root}
    queue = deque([root])
    while queue:
        for child in children[queue.popleft()]:
            if child not in keep:
                keep.add(child)
                queue.append(child)
    # The root's parents inside the branch are kept on purpose: they form a cycle that must be reported.
    return keep, {n: {p for p in parents[n] if p in keep} for n in keep}


def _labels(
    nodes: set[URIRef], found: _Found, text: _Text, name: str
) -> tuple[dict[URIRef, tuple[str, list[str]]], list[Problem]]:
    """Pref and alt labels per node; problems for dangling references and nodes without a label."""
    labels: dict[URIRef, tuple[str, list[str]]] = {}
    problems: list[Problem] = []
    for node in sorted(nodes, key=str):
        if node not in found.described:
            refs = ", ".join(f"{how} of <{other}>" for how, other in sorted(found.referenced_by[node])[:3])
            problems.append(
                Problem(
                    f"<{node}> is referenced ({refs}) but has no data in the file (no statement about it)",
                    file=name,
                    field="parent",
                )
            )
            continue
        label, alts = text.label_and_alts(node, skos_first=node in found.skos)
        if label is None:
            problems.append(Problem(f"concept <{node}> has no label", file=name, field="skos:prefLabel"))
        else:
            labels[node] = (label, alts)
    return labels, problems


def _codes(
    nodes: set[URIRef], found: _Found, text: _Text, name: str
) -> tuple[dict[URIRef, str], list[Problem]]:
    """One code per described node; problems for empty and duplicate codes (naming every IRI involved)."""
    codes = {node: text.code(node) for node in nodes if node in found.described}
    problems: list[Problem] = []
    by_code: dict[str, list[URIRef]] = defaultdict(list)
    for node, code in sorted(codes.items(), key=lambda item: str(item[0])):
        if code:
            by_code[code].append(node)
        else:
            problems.append(
                Problem(
                    f"cannot derive a code for <{node}> (no skos:notation, no local name)",
                    file=name,
                    field="skos:notation",
                )
            )
    for code, iris in sorted(by_code.items()):
        if len(iris) > 1:
            listed = ", ".join(f"<{i}>" for i in sorted(iris, key=str))
            problems.append(
                Problem(f"duplicate code {code!r} used by {listed}", file=name, field="skos:notation")
            )
    return codes, problems


# ---- per-node values ---------------------------------------------------------------------------------------


def _lang_rank(tag: str | None, lang: str) -> int:
    tag = (tag or "").lower()
    lang = lang.lower()
    if tag == lang:
        return 0
    if tag and lang and tag.split("-")[0] == lang.split("-")[0]:
        return 1
    if not tag:
        return 2
    if tag == "en" or tag.startswith("en-"):
        return 3
    return 4


# Predicates looked up per node, bound once (rdflib's namespace attribute access is slow in a 10k loop).
_PREF, _ALT, _HIDDEN, _LABEL = SKOS.prefLabel, SKOS.altLabel, SKOS.hiddenLabel, RDFS.label
_DEFINITION, _SCOPE, _COMMENT = SKOS.definition, SKOS.scopeNote, RDFS.comment
_NOTATION, _DEPRECATED = SKOS.notation, OWL.deprecated

_Value = tuple[
    int, str, str
]  # (language rank, language tag lower-cased, trimmed text): sorting picks the best


class _Text:
    """Picks labels and definitions by predicate order, then language."""

    def __init__(self, graph: rdflib.Graph, lang: str):
        self.graph = graph
        self.lang = lang
        self._index: dict[URIRef, dict[URIRef, list[_Value]]] = {}
        self._ranks: dict[str, int] = {}

    def values(self, node: URIRef | None, pred: URIRef) -> list[_Value]:
        """Non-empty literal values of `pred` on `node`, best language first."""
        # One pass per predicate over the store, then dictionary look-ups (per-node queries were slower).
        by_subject = self._index.get(pred)
        if by_subject is None:
            by_subject = defaultdict(list)
            for s, o in self.graph.subject_objects(pred):
                text = str(o).strip() if isinstance(o, Literal) else ""
                if text:
                    tag = (o.language or "").lower()
                    rank = self._ranks.get(tag)
                    if rank is None:
                        rank = self._ranks[tag] = _lang_rank(tag, self.lang)
                    by_subject[s].append((rank, tag, text))
            for found in by_subject.values():
                found.sort()
            self._index[pred] = by_subject
        return by_subject.get(node, [])

    def first(self, node: URIRef | None, preds: tuple[URIRef, ...]) -> list[_Value]:
        """The values of the first predicate in `preds` that has any."""
        for pred in preds:
            found = self.values(node, pred)
            if found:
                return found
        return []

    def pick(self, node: URIRef | None, preds: tuple[URIRef, ...]) -> str | None:
        found = self.first(node, preds)
        return found[0][2] if found else None

    def label_and_alts(self, node: URIRef, *, skos_first: bool) -> tuple[str | None, list[str]]:
        found = self.first(node, (_PREF, _LABEL) if skos_first else (_LABEL, _PREF))
        if not found:
            return None, []
        _, tag, pref = found[0]
        out = [text for _, t, text in found[1:] if t == tag]  # more pref labels in the chosen language
        for pred in (_ALT, _HIDDEN):
            out.extend(sorted(text for rank, t, text in self.values(node, pred) if rank <= 2 or t == tag))
        return pref, [a for a in dict.fromkeys(out) if a != pref]

    def definition(self, node: URIRef, *, skos_first: bool) -> str:
        preds = (_DEFINITION, _SCOPE, _COMMENT) if skos_first else (_COMMENT, _DEFINITION, _SCOPE)
        return self.pick(node, preds) or ""

    def code(self, node: URIRef) -> str:
        """The first `skos:notation` (sorted, trimmed), else the IRI's local name."""
        notations = sorted(text for _, _, text in self.values(node, _NOTATION))
        return notations[0] if notations else _local_name(str(node))

    def deprecated(self, node: URIRef) -> bool:
        return any(text.lower() in ("true", "1") for _, _, text in self.values(node, _DEPRECATED))


def _local_name(iri: str) -> str:
    """The part after '#', else after the last '/', else after the last ':' (URNs); a trailing '/' is ignored.

    >>> _local_name("http://ex.org/v#A1"), _local_name("http://ex.org/c/01/"), _local_name("urn:x:7")
    ('A1', '01', '7')
    """
    s = iri.rstrip("/#")
    for sep in ("#", "/", ":"):
        if sep in s:
            return s.rsplit(sep, 1)[1].strip()
    return s.strip()


def _version(graph: rdflib.Graph, node: URIRef | None) -> str | None:
    if node is None:
        return None
    for pred in (OWL.versionInfo, DCTERMS.hasVersion, *_SCHEMA_VERSION):
        values = sorted(str(o).strip() for o in graph.objects(node, pred) if str(o).strip())
        if values:
            return values[0]
    return None


# ---- structure ---------------------------------------------------------------------------------------------


def _cycle_problems(
    parents: dict[URIRef, set[URIRef]], link_name: dict[tuple[URIRef, URIRef], str], name: str
) -> list[Problem]:
    """Every self-loop and one cycle per strongly connected group, named by IRIs (child -> parent)."""
    problems = []
    graph: dict[URIRef, list[URIRef]] = {}
    for node in sorted(parents, key=str):
        if node in parents[node]:
            how = link_name.get((node, node), "parent link")
            problems.append(Problem(f"<{node}> is its own parent ({how})", file=name, field=how))
        graph[node] = sorted((p for p in parents[node] if p != node and p in parents), key=str)
    for group in _strongly_connected(graph):
        chain = " -> ".join(f"<{n}>" for n in _cycle_path(graph, group))
        problems.append(Problem(f"cycle in hierarchy (child -> parent): {chain}", file=name, field="parent"))
    return problems


def _strongly_connected(graph: dict[URIRef, list[URIRef]]) -> list[set[URIRef]]:
    """Tarjan's algorithm, iterative; returns the groups of more than one node."""
    index: dict[URIRef, int] = {}
    low: dict[URIRef, int] = {}
    on_stack: set[URIRef] = set()
    stack: list[URIRef] = []
    groups = []
    for start, targets in graph.items():
        if start in index:
            continue
        index[start] = low[start] = len(index)
        stack.append(start)
        on_stack.add(start)
        work = [(start, iter(targets))]
        while work:
            node, it = work[-1]
            for nxt in it:
                if nxt not in index:
                    index[nxt] = low[nxt] = len(index)
                    stack.append(nxt)
                    on_stack.add(nxt)
                    work.append((nxt, iter(graph[nxt])))
                    break
                if nxt in on_stack:
                    low[node] = min(low[node], index[nxt])
            else:
                work.pop()
                if work:
                    low[work[-1][0]] = min(low[work[-1][0]], low[node])
                if low[node] == index[node]:
                    group = set()
                    while True:
                        member = stack.pop()
                        on_stack.discard(member)
                        group.add(member)
                        if member == node:
                            break
                    if len(group) > 1:
                        groups.append(group)
    return groups


def _cycle_path(graph: dict[URIRef, list[URIRef]], group: set[URIRef]) -> list[URIRef]:
    """Shortest cycle through the smallest member of a strongly connected group (breadth-first)."""
    start = min(group, key=str)
    came_from: dict[URIRef, URIRef] = {}
    queue = deque([start])
    while queue:
        node = queue.popleft()
        for nxt in graph[node]:
            if nxt == start:
                path = [node]
                while path[-1] != start:
                    path.append(came_from[path[-1]])
                return [*reversed(path), start]
            if nxt in group and nxt not in came_from:
                came_from[nxt] = node
                queue.append(nxt)
    return sorted(group, key=str)  # unreachable for a true strongly connected group


def _top_down(records: list[ConceptRecord], depth: dict[str, int]) -> list[ConceptRecord]:
    """Parents before children; among ready nodes the smallest (depth, code) first."""
    by_code = {r.code: r for r in records}
    pending = {r.code: len(r.parent_codes) for r in records}
    children: dict[str, list[str]] = defaultdict(list)
    for r in records:
        for p in r.parent_codes:
            children[p].append(r.code)
    ready = [(depth[c], c) for c, n in pending.items() if n == 0]
    heapq.heapify(ready)
    out = []
    while ready:
        _, code = heapq.heappop(ready)
        out.append(by_code[code])
        for child in children[code]:
            pending[child] -= 1
            if pending[child] == 0:
                heapq.heappush(ready, (depth[child], child))
    return out
