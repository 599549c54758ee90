// concepts_upsert: create or update concepts in bulk (new or changed rows only; the caller diffs by hash).
// writes: Concept. parameters: $rows (uid, scheme, code, iri, pref_label, alt_labels, definition, path, depth,
// is_leaf, deprecated, content_hash). safe to re-run.
UNWIND $rows AS r
MERGE (c:Concept {uid: r.uid})
SET c.scheme = r.scheme, c.code = r.code, c.iri = r.iri, c.pref_label = r.pref_label, c.alt_labels = r.alt_labels,
    c.definition = r.definition, c.path = r.path, c.depth = r.depth, c.is_leaf = r.is_leaf,
    c.deprecated = r.deprecated, c.retired = false, c.content_hash = r.content_hash
