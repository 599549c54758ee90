"""Property test: any set of generated paths reads back as a valid hierarchy holding every prefix."""

import csv

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from pipeline.ingest.hierarchy import check_hierarchy
from pipeline.ingest.source_taxonomy import read_source_taxonomy

# Segments: any text without the separator character, CR/LF or NUL, not blank after trimming. Other control and
# line-separator characters (VT, NEL, U+2028) are allowed: they must not split lines.
segment = st.text(
    alphabet=st.characters(blacklist_categories=("Cs",), blacklist_characters=">\r\n\x00"),
    min_size=1,
    max_size=8,
).filter(lambda s: s.strip() != "")
path = st.lists(segment, min_size=1, max_size=5)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(paths=st.lists(path, min_size=1, max_size=12))
def test_paths_round_trip(tmp_path, paths):
    p = tmp_path / "paths.csv"
    with open(p, "w", encoding="utf-8", newline="") as fh:
        w = csv.writer(fh)
        w.writerow(["path"])
        for segs in paths:
            w.writerow([" > ".join(segs)])
    tax = read_source_taxonomy(p, fmt="paths")
    by_code = {c.code: c for c in tax.categories}
    assert len(by_code) == len(tax.categories)  # codes unique
    expected = {" > ".join(s.strip() for s in segs[:i]) for segs in paths for i in range(1, len(segs) + 1)}
    assert set(by_code) == expected  # every prefix, nothing else
    for c in tax.categories:
        segs = c.code.split(" > ")
        assert c.label == segs[-1]
        assert c.parent_code == (" > ".join(segs[:-1]) or None)
        assert tax.hierarchy.depth[c.code] == len(segs)
    # independently re-checked: parents exist and no cycles
    check_hierarchy(
        [(c.code, c.label, [c.parent_code] if c.parent_code else []) for c in tax.categories], file="x"
    )
