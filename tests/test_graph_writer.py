"""Writing hierarchies: only changes are written, vanished nodes are retired, moved nodes get new parent links."""

from pipeline.ingest.graph_writer import write_hierarchy


def _rows(labels):
    return [{"code": c, "label": lab, "path": lab, "depth": 1, "is_leaf": True} for c, lab in labels]


def test_rewrite_counts_and_retirement(engine):
    with engine.open() as s:
        d = write_hierarchy(s, "Category", "src", _rows([("a", "A"), ("b", "B")]), {"b": ["a"]})
        assert d.counts() == {"added": 2, "changed": 0, "unchanged": 0, "retired": 0, "revived": 0}
        d = write_hierarchy(s, "Category", "src", _rows([("a", "A"), ("b", "B")]), {"b": ["a"]})
        assert d.counts()["unchanged"] == 2 and not d.added and not d.changed
        d = write_hierarchy(s, "Category", "src", _rows([("a", "A2")]), {})
        assert d.changed == ["src:a"] and d.retired == ["src:b"]
        stored = s.frame("category_hashes", scheme="src").set_index("uid")
        assert bool(stored.at["src:b", "retired"]) is True
        d = write_hierarchy(s, "Category", "src", _rows([("a", "A2"), ("b", "B")]), {"b": ["a"]})
        assert d.revived == ["src:b"]


def test_a_moved_node_gets_only_its_new_parent(engine):
    with engine.open() as s:
        rows = _rows([("a", "A"), ("b", "B"), ("c", "C")])
        write_hierarchy(s, "Category", "src", rows, {"c": ["a"]})
        write_hierarchy(s, "Category", "src", rows, {"c": ["b"]})
        links = s.frame("category_structure", scheme="src")
        assert links[links.uid == "src:c"]["parent"].tolist() == ["src:b"]
