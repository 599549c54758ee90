"""Hostile text in every field that reaches a query -- quotes, backticks, braces, Cypher keywords, `//` comments --
is stored and returned verbatim, on both engines (`engine` fixture in conftest.py; the Neo4j runs are marked
`neo4j` and need a server). And a scan of `pipeline/` for query text built from values.

The rule the scan enforces (grep-able): every query an engine runs is `load_query(name, engine)` or a fixed
string literal; store calls name their query by a literal; no f-string, `%`, `+` or `.format` ever produces text
containing a Cypher clause keyword. `grep -rnE "f['\\"].*\\b(MATCH|MERGE|CREATE|RETURN|DELETE|UNWIND)\\b" pipeline/`
must find nothing.
"""

from __future__ import annotations

import ast
import contextlib
import io
import json
import re
from pathlib import Path

import pytest

from pipeline.cli import main

NASTY = [
    "it's \"quoted\"",
    "back`tick`",
    "{braces: 1} $param",
    "x' OR 1=1 //",
    "MATCH (n) DETACH DELETE n",
    "a // comment */ /* b",
    "\\'; DROP TABLE Item; --",
    "}) RETURN 1 UNION MATCH (m) SET m.x = 'y",
]
PIPELINE = Path(__file__).resolve().parent.parent / "pipeline"


def _cli(*argv) -> tuple[int, str]:
    out = io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(io.StringIO()):
        code = main(list(argv))
    return code, out.getvalue()


@pytest.fixture()
def layer(tmp_path, engine):
    """A reference, a source and items whose codes, labels, keys, titles and attribute names are all hostile."""
    import csv

    ttl = ["@prefix skos: <http://www.w3.org/2004/02/skos/core#> .", "@prefix ex: <http://example.org/r/> ."]
    for n, text in enumerate(NASTY):
        literal = json.dumps(text)  # a valid Turtle string literal for these characters
        ttl.append(f"ex:c{n} a skos:Concept ; skos:prefLabel {literal} ; skos:notation {json.dumps('R' + text)} ;"
                   f" skos:altLabel {json.dumps(text + ' alt')} ; skos:definition {literal} .")
    (tmp_path / "ref.ttl").write_text("\n".join(ttl) + "\n")
    with open(tmp_path / "tree.csv", "w", newline="") as f:
        w = csv.writer(f)
        w.writerow(["code", "label", "parent_code"])
        w.writerow(["top", "Top", ""])
        for text in NASTY:
            w.writerow([text, text + " label", "top"])
    with open(tmp_path / "items.csv", "w", newline="") as f:
        w = csv.writer(f)
        w.writerow(["item_key", "title", "category", *NASTY])
        for n, text in enumerate(NASTY):
            w.writerow([text, text + " title", text, *[f"v{n}:{a}" for a in NASTY]])
    cli = engine.cli
    assert _cli(*cli, "ingest", "reference", str(tmp_path / "ref.ttl"), "--scheme", "ref")[0] == 0
    assert _cli(*cli, "ingest", "source", "shop", str(tmp_path / "tree.csv"))[0] == 0
    code, out = _cli(*cli, "--json", "ingest", "items", "shop", str(tmp_path / "items.csv"),
                     "--category-separator", "")
    assert code == 0 and json.loads(out)["rejected"] == 0, out
    return engine


def test_hostile_codes_labels_and_definitions_come_back_verbatim(layer):
    with layer.open(read_only=True) as s:
        concepts = s.frame("audit_concepts")
        cats = s.frame("audit_categories")
        items = s.frame("audit_items")
    assert sorted(concepts["code"]) == sorted("R" + t for t in NASTY)
    assert sorted(concepts["pref_label"]) == sorted(NASTY)
    assert sorted(concepts["definition"]) == sorted(NASTY)
    assert sorted(a for alts in concepts["alt_labels"] for a in alts) == sorted(t + " alt" for t in NASTY)
    assert sorted(cats["code"]) == sorted(["top", *NASTY])
    assert sorted(cats["label"]) == sorted(["Top", *(t + " label" for t in NASTY)])
    assert sorted(items["item_key"]) == sorted(NASTY)
    assert sorted(items["title"]) == sorted(t + " title" for t in NASTY)


def test_hostile_attribute_names_and_values_come_back_verbatim(layer):
    with layer.open(read_only=True) as s:
        items = s.frame("audit_items")
    for key, attrs in zip(items["item_key"], items["attributes"]):
        n = NASTY.index(key)
        assert json.loads(attrs) == {a: f"v{n}:{a}" for a in NASTY}


def test_hostile_values_as_query_parameters_find_exactly_their_node(layer):
    with layer.open(read_only=True) as s:
        for text in NASTY:
            found = s.frame("concept_by_code", uid="ref:R" + text)
            assert found["code"].tolist() == ["R" + text]
        assert len(s.frame("concept_by_code", uid="ref:x' OR 1=1 //")) == 0  # not a code
        assert sorted(s.frame("category_codes", scheme="shop")["code"]) == sorted(["top", *NASTY])
        members = s.frame("category_members", scheme="shop")
    assert sorted(members["title"]) == sorted(t + " title" for t in NASTY)


# -- the scan ---------------------------------------------------------------------------------------------------
KEYWORDS = re.compile(r"\b(MATCH|MERGE|CREATE|RETURN|DELETE|DETACH|UNWIND|SET|LOAD FROM|COPY)\b")
RUNNERS = {"execute", "execute_read", "execute_write", "run", "begin_transaction"}
STORE_CALLS = {"frame", "run", "bulk", "rows", "scalar"}
ALLOWED_LITERALS = {"BEGIN TRANSACTION", "COMMIT", "ROLLBACK"}


def _sources():
    return sorted(p for p in PIPELINE.rglob("*.py"))


def _builds_query_text(node: ast.AST) -> bool:
    """An f-string, `%`, `+` or `.format` whose constant parts hold a Cypher clause keyword."""
    if isinstance(node, ast.JoinedStr):
        text = "".join(v.value for v in node.values if isinstance(v, ast.Constant) and isinstance(v.value, str))
        return bool(KEYWORDS.search(text)) and any(isinstance(v, ast.FormattedValue) for v in node.values)
    if isinstance(node, ast.BinOp) and isinstance(node.op, (ast.Add, ast.Mod)):
        consts = [n.value for n in ast.walk(node) if isinstance(n, ast.Constant) and isinstance(n.value, str)]
        return any(KEYWORDS.search(c) for c in consts)
    if isinstance(node, ast.Call) and isinstance(node.func, ast.Attribute) and node.func.attr == "format":
        base = node.func.value
        return isinstance(base, ast.Constant) and isinstance(base.value, str) and bool(KEYWORDS.search(base.value))
    return False


def test_no_query_text_is_built_from_values_anywhere_in_pipeline():
    found = []
    for path in _sources():
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if _builds_query_text(node):
                found.append(f"{path.relative_to(PIPELINE.parent)}:{node.lineno}")
    assert found == []


def test_every_engine_call_runs_a_query_file_or_a_fixed_statement():
    """Raw engine calls in pipeline/store/ (`conn.execute`, `session.run`, `tx.run`, ...) get `load_query(...)`,
    a variable, or one of the fixed transaction statements -- never built text or another literal query."""
    bad = []
    for path in sorted((PIPELINE / "store").glob("*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if not (isinstance(node, ast.Call) and isinstance(node.func, ast.Attribute)
                    and node.func.attr in RUNNERS and node.args):
                continue
            arg = node.args[0]
            if isinstance(arg, ast.Constant):
                ok = arg.value in ALLOWED_LITERALS or not KEYWORDS.search(str(arg.value))
            elif isinstance(arg, ast.Call):
                ok = getattr(arg.func, "id", getattr(arg.func, "attr", "")) == "load_query"
            else:
                ok = isinstance(arg, ast.Name)
            if not ok or _builds_query_text(arg):
                bad.append(f"{path.name}:{node.lineno} {ast.unparse(arg)[:60]}")
    assert bad == []


def test_store_calls_name_their_query_by_a_literal():
    """`store.frame/run/bulk/rows/scalar(NAME, ...)`: NAME is a string literal or a name taken from a literal
    table (graph_writer's _QUERIES); a name is looked up as a file, never run as text (queries.load_query checks
    it against [a-z0-9_]+)."""
    bad = []
    for path in _sources():
        if path.parent.name == "store":
            continue
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if (isinstance(node, ast.Call) and isinstance(node.func, ast.Attribute)
                    and node.func.attr in STORE_CALLS and node.args):
                arg = node.args[0]
                if isinstance(arg, (ast.JoinedStr, ast.BinOp)) or (
                        isinstance(arg, ast.Constant) and isinstance(arg.value, str) and " " in arg.value
                        and KEYWORDS.search(arg.value)):
                    bad.append(f"{path.relative_to(PIPELINE.parent)}:{node.lineno} {ast.unparse(arg)[:60]}")
    assert bad == []


def test_a_query_name_cannot_smuggle_text():
    from pipeline.store.queries import load_query

    with pytest.raises(ValueError):
        load_query("count_nodes RETURN 1", "ladybug")
    with pytest.raises(ValueError):
        load_query("../../etc/passwd", "ladybug")


def test_the_scan_would_catch_a_built_query():
    built = ast.parse('q = f"MATCH (c:Category {{code: \'{code}\'}}) RETURN c"').body[0].value
    assert _builds_query_text(built)
    assert _builds_query_text(ast.parse('q = "MATCH (c) WHERE c.code = \'" + code + "\'"').body[0].value)
    assert not _builds_query_text(ast.parse('msg = f"no source {key!r}; ingest it"').body[0].value)
